// The run report: one self-contained, printable HTML page. Inline CSS, images as data: URLs of
// PNGs encoded here (model/report/png.ts), plots as inline SVG, no script of any kind (a
// Content-Security-Policy meta tag forbids them too), every text from the run HTML-escaped.
// Colours, places and theory lines as the page draws them (model/display/): the anomaly map,
// one place formatter, Kelvin solid and long Rossby dashed, one rule for the colour range.

import { lookupTable } from '../display/colour-maps.ts';
import { latLabel, lonLabel, placeLabel } from '../display/coordinates.ts';
import { svgDash, symmetricRange, THEORY_LINES } from '../display/conventions.ts';
import { hovmollerData, type RunData } from '../io/run-data.ts';
import { longRossbySpeed } from '../theory.ts';
import { derivedNumbers, resolveScenario, validateScenario, type DerivedNumbers } from '../scenario/index.ts';
import { isMeasured, measureWaves, METRES_PER_DEGREE, type SpeedMeasure, type WaveMeasures } from './measure.ts';
import { pngDataUrl } from './png.ts';
import { coupledSeries, type CoupledSeries } from '../coupling/run-indices.ts';
import { coupledMode, coupledModeLine } from '../coupling/mode-fit.ts';
import * as pm from '../portable-math.ts';

export const CAUTION =
  'Idealised experiment of a reduced-gravity model: not a forecast, and not for navigation or safety decisions.';

const LAND: [number, number, number] = [160, 160, 150];

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** 256 colours of the anomaly map (Pycno Split): blue below zero, pale at zero, copper above. */
const ANOMALY_LUT = lookupTable('anomaly');
const DIVERGING: Array<[number, number, number]> = Array.from({ length: 256 }, (_, k) => [
  ANOMALY_LUT[4 * k],
  ANOMALY_LUT[4 * k + 1],
  ANOMALY_LUT[4 * k + 2],
]);

export function colourOf(v: number, range: number): [number, number, number] {
  if (!Number.isFinite(v)) return LAND;
  const t = Math.max(0, Math.min(1, 0.5 + v / (2 * range)));
  return DIVERGING[Math.round(t * 255)];
}

/** A field (nx * ny from the south-west) as an RGB image with north up. */
function mapImage(values: ArrayLike<number>, nx: number, ny: number, range: number): string {
  const rgb = new Uint8Array(nx * ny * 3);
  for (let y = 0; y < ny; y++) {
    const j = ny - 1 - y;
    for (let i = 0; i < nx; i++) rgb.set(colourOf(values[j * nx + i], range), 3 * (y * nx + i));
  }
  return pngDataUrl(nx, ny, rgb);
}

const fmt = (x: number, digits = 3) => (Number.isFinite(x) ? Number(x.toPrecision(digits)).toString() : '–');

function table(rows: Array<[string, string]>): string {
  return `<table>${rows.map(([k, v]) => `<tr><th>${escapeHtml(k)}</th><td>${v}</td></tr>`).join('')}</table>`;
}

export function colourBar(range: number, units: string): string {
  const w = 256;
  const rgb = new Uint8Array(w * 3);
  for (let i = 0; i < w; i++) rgb.set(DIVERGING[i], 3 * i);
  return `<div class="bar"><span>${fmt(-range, 2)}</span><img src="${pngDataUrl(w, 1, rgb)}" alt="colour scale" width="256" height="12"><span>${fmt(range, 2)} ${escapeHtml(units)}</span></div>`;
}

function derivedFor(run: RunData): DerivedNumbers | null {
  try {
    const v = validateScenario(JSON.parse(run.scenarioJson));
    return v.ok ? derivedNumbers(resolveScenario(v.scenario)) : null;
  } catch {
    return null;
  }
}

/** Ocean width along the equatorial row of the run's own mask, km. */
function equatorialWidthKm(run: RunData): number {
  const { nx, lat, ocean, lon } = run.grid;
  let j = 0;
  for (let q = 1; q < lat.length; q++) if (Math.abs(lat[q]) < Math.abs(lat[j])) j = q;
  let wet = 0;
  for (let i = 0; i < nx; i++) wet += ocean[j * nx + i];
  return (wet * Math.abs(lon[1] - lon[0]) * METRES_PER_DEGREE) / 1000;
}

function speedText(m: SpeedMeasure | { reason: string } | null, theoryName: string, theory: number): string {
  if (m === null)
    return `not measured: the run has no off-equatorial Hovmoller section (theory ${theoryName} = ${fmt(theory)} m/s)`;
  if (!isMeasured(m)) return `not measured: ${escapeHtml(m.reason)} (theory ${theoryName} = ${fmt(theory)} m/s)`;
  const dev = (100 * (m.speed - theory)) / theory;
  return (
    `<b>${fmt(m.speed)} ± ${fmt(m.standardError, 2)} m/s</b> measured ${m.direction}ward at ${latLabel(m.lat)} ` +
    `(${m.sign > 0 ? 'downwelling' : 'upwelling'} front, ${m.points.length} times, days ${fmt(m.points[0][0])}–${fmt(m.points[m.points.length - 1][0])}); ` +
    `theory ${theoryName} = ${fmt(theory)} m/s; difference ${dev >= 0 ? '+' : ''}${dev.toFixed(1)} %`
  );
}

/** The Hovmoller diagram with the Kelvin (c) and long Rossby (c/3) lines, as SVG. */
function hovmollerFigure(run: RunData, section: number, waves: WaveMeasures): string {
  const h = hovmollerData(run, section);
  const nx = h.lon.length;
  const nt = h.days.length;
  const range = symmetricRange(h.rows);
  // Time runs upward: the first record is the bottom row of the image.
  const rgb = new Uint8Array(nx * nt * 3);
  for (let y = 0; y < nt; y++) {
    const row = h.rows[nt - 1 - y];
    for (let i = 0; i < nx; i++) rgb.set(colourOf(row[i], range), 3 * (y * nx + i));
  }
  const W = 520;
  const H = 320;
  const m = { l: 46, r: 10, t: 10, b: 34 };
  const lon0 = h.lon[0];
  const lon1 = h.lon[nx - 1];
  const d0 = h.days[0];
  const d1 = h.days[nt - 1];
  const X = (lon: number) => m.l + ((lon - lon0) / (lon1 - lon0 || 1)) * (W - m.l - m.r);
  const Y = (day: number) => H - m.b - ((day - d0) / (d1 - d0 || 1)) * (H - m.t - m.b);
  const degPerDay = (s: number) => (s * 86400) / METRES_PER_DEGREE;
  const lines: string[] = [];
  const kelvin = waves.kelvin;
  // Kelvin line through the first measured front position (or from the west coast at day 0).
  const start: [number, number] = isMeasured(kelvin) ? kelvin.points[0] : [d0, lon0];
  const sK = degPerDay(waves.c);
  const tEast = start[0] + (lon1 - start[1]) / sK;
  const kEnd = Math.min(d1, tEast);
  lines.push(
    `<line class="kelvin" x1="${X(start[1]).toFixed(1)}" y1="${Y(start[0]).toFixed(1)}" x2="${X(start[1] + sK * (kEnd - start[0])).toFixed(1)}" y2="${Y(kEnd).toFixed(1)}"/>`,
  );
  if (tEast < d1) {
    // Long Rossby line from the east coast where the Kelvin line arrives (the reflection).
    const sR = degPerDay(waves.rossbyTheory);
    const rEnd = Math.min(d1, tEast + (lon1 - lon0) / sR);
    lines.push(
      `<line class="rossby" x1="${X(lon1).toFixed(1)}" y1="${Y(tEast).toFixed(1)}" x2="${X(lon1 - sR * (rEnd - tEast)).toFixed(1)}" y2="${Y(rEnd).toFixed(1)}"/>`,
    );
  }
  const dots =
    isMeasured(kelvin) && kelvin.lat === run.hovmoller[section].rowLat
      ? kelvin.points.map(([t, x]) => `<circle cx="${X(x).toFixed(1)}" cy="${Y(t).toFixed(1)}" r="1.6"/>`).join('')
      : '';
  const ticksX = niceTicks(lon0, lon1, 6).map(
    (v) => `<text x="${X(v).toFixed(1)}" y="${H - m.b + 14}" text-anchor="middle">${lonLabel(v)}</text>`,
  );
  const ticksY = niceTicks(d0, d1, 6).map(
    (v) => `<text x="${m.l - 4}" y="${(Y(v) + 4).toFixed(1)}" text-anchor="end">${fmt(v)}</text>`,
  );
  return (
    `<svg class="hov" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="Hovmoller diagram">` +
    `<image x="${m.l}" y="${m.t}" width="${W - m.l - m.r}" height="${H - m.t - m.b}" preserveAspectRatio="none" href="${pngDataUrl(nx, nt, rgb)}"/>` +
    `<g class="lines">${lines.join('')}</g><g class="dots">${dots}</g>` +
    `<g class="ticks">${ticksX.join('')}${ticksY.join('')}<text x="12" y="${(H / 2).toFixed(0)}" transform="rotate(-90 12 ${(H / 2).toFixed(0)})" text-anchor="middle">model day</text></g>` +
    `</svg>${colourBar(range, 'm')}`
  );
}

export function niceTicks(a: number, b: number, n: number): number[] {
  const span = b - a;
  if (!(span > 0)) return [a];
  const raw = span / n;
  const p = pm.pow(10, Math.floor(pm.log10(raw)));
  const step = [1, 2, 5, 10].map((k) => k * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(a / step) * step; v <= b + 1e-9 * span; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

/** One probe's h' series as a small SVG line plot. */
function probePlot(days: Float64Array, values: Float32Array, title: string): string {
  const W = 250;
  const H = 120;
  const m = { l: 38, r: 6, t: 16, b: 20 };
  const finite = Array.from(values).filter(Number.isFinite);
  if (finite.length === 0)
    return `<figure class="probe"><figcaption>${escapeHtml(title)}: land (no values)</figcaption></figure>`;
  let lo = Math.min(0, ...finite);
  let hi = Math.max(0, ...finite);
  if (hi - lo < 1e-12) {
    lo -= 1;
    hi += 1;
  }
  const d0 = days[0];
  const d1 = days[days.length - 1];
  const X = (d: number) => m.l + ((d - d0) / (d1 - d0 || 1)) * (W - m.l - m.r);
  const Y = (v: number) => H - m.b - ((v - lo) / (hi - lo)) * (H - m.t - m.b);
  const pts: string[] = [];
  for (let n = 0; n < days.length; n++)
    if (Number.isFinite(values[n])) pts.push(`${X(days[n]).toFixed(1)},${Y(values[n]).toFixed(1)}`);
  return (
    `<figure class="probe"><svg viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeHtml(title)}">` +
    `<text x="${m.l}" y="11" class="t">${escapeHtml(title)}</text>` +
    `<line class="zero" x1="${m.l}" x2="${W - m.r}" y1="${Y(0).toFixed(1)}" y2="${Y(0).toFixed(1)}"/>` +
    `<polyline points="${pts.join(' ')}"/>` +
    `<text x="${m.l - 3}" y="${(Y(hi) + 4).toFixed(1)}" text-anchor="end">${fmt(hi, 2)}</text><text x="${m.l - 3}" y="${(Y(lo) + 4).toFixed(1)}" text-anchor="end">${fmt(lo, 2)}</text>` +
    `<text x="${m.l}" y="${H - 5}">day ${fmt(d0)}</text><text x="${W - m.r}" y="${H - 5}" text-anchor="end">${fmt(d1)}</text>` +
    `</svg></figure>`
  );
}

/** The coupled run's two indices against time: eastern SST (K, left scale) and warm-water volume (m, right scale). */
function indexPlot(c: CoupledSeries): string {
  const W = 520;
  const H = 200;
  const m = { l: 44, r: 44, t: 16, b: 22 };
  const d0 = c.days[0];
  const d1 = c.days[c.days.length - 1];
  const X = (d: number) => m.l + ((d - d0) / (d1 - d0 || 1)) * (W - m.l - m.r);
  const scaleOf = (v: number[]) => Math.max(1e-12, ...v.filter(Number.isFinite).map(Math.abs));
  const line = (v: number[], cls: string) => {
    const s = scaleOf(v);
    const Y = (y: number) => m.t + (0.5 - y / (2 * s)) * (H - m.t - m.b);
    const pts = v
      .map((y, n) => (Number.isFinite(y) ? `${X(c.days[n]).toFixed(1)},${Y(y).toFixed(1)}` : ''))
      .filter(Boolean);
    return { poly: `<polyline class="${cls}" points="${pts.join(' ')}"/>`, s };
  };
  const sst = line(c.eastSst, 'sst');
  const warm = line(c.warmWater, 'warm');
  const mid = (m.t + H - m.b) / 2;
  return (
    `<svg class="indices" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="Eastern SST anomaly and warm-water volume">` +
    `<line class="zero" x1="${m.l}" x2="${W - m.r}" y1="${mid}" y2="${mid}"/>${sst.poly}${warm.poly}` +
    `<text x="${m.l - 3}" y="${m.t + 4}" text-anchor="end">${fmt(sst.s, 2)} K</text><text x="${m.l - 3}" y="${H - m.b}" text-anchor="end">${fmt(-sst.s, 2)} K</text>` +
    `<text x="${W - m.r + 3}" y="${m.t + 4}">${fmt(warm.s, 2)} m</text><text x="${W - m.r + 3}" y="${H - m.b}">${fmt(-warm.s, 2)} m</text>` +
    `<text x="${m.l}" y="11" class="t sst">eastern SST anomaly (K)</text><text x="${W - m.r}" y="11" class="t warm" text-anchor="end">warm-water volume, mean h′ 5S–5N (m)</text>` +
    `<text x="${m.l}" y="${H - 5}">day ${fmt(d0)}</text><text x="${W - m.r}" y="${H - 5}" text-anchor="end">${fmt(d1)}</text>` +
    `</svg>`
  );
}

/** The coupled section of a report: the mode measured from the run's indices, and their plot; '' for an uncoupled run. */
function coupledSection(run: RunData): string {
  const c = coupledSeries(run);
  if (!c || c.days.length < 2) return '';
  const mode = coupledMode(c.days, c.eastSst, c.warmWater);
  const p = c.part;
  return (
    `<h2>Coupled ocean and atmosphere</h2>` +
    `<p>The answering wind (strength ${fmt(p.strength)} m/s per K, coupled every ${p.everySteps} steps, Gill atmosphere c<sub>a</sub> = ${fmt(p.atmosphere.speed)} m/s, 1/ε = ${fmt(p.atmosphere.dampingDays)} days). ` +
    `Eastern SST: the SST anomaly averaged over the upwelling region, weighted by it; warm-water volume: mean h′ between 5S and 5N. ${run.snapshots.length < run.days.length ? `From the ${c.days.length} records that kept their fields.` : ''}</p>` +
    table([['coupled mode', escapeHtml(coupledModeLine(mode))]]) +
    indexPlot(c)
  );
}

export const REPORT_STYLE = () => `
body{font:13px/1.4 system-ui,sans-serif;color:#111;max-width:1100px;margin:16px auto;padding:0 12px}
h1{font-size:20px;margin:0 0 4px}h2{font-size:15px;margin:18px 0 6px;border-bottom:1px solid #bbb}
.caution{border:1px solid #b55;background:#fdf3f0;padding:4px 8px;margin:8px 0}
table{border-collapse:collapse;margin:4px 0}th,td{text-align:left;padding:2px 10px 2px 0;vertical-align:top}th{font-weight:600;white-space:nowrap}
.maps{display:flex;flex-wrap:wrap;gap:10px}.maps figure{margin:0}.maps img{width:250px;image-rendering:pixelated;border:1px solid #888}
figcaption{font-size:12px;color:#333}.bar{display:flex;align-items:center;gap:6px;font-size:12px;margin:4px 0}.bar img{image-rendering:pixelated;border:1px solid #888}
svg text{font-size:10px;fill:#222}svg .t{font-size:11px;font-weight:600}
.hov .kelvin{stroke:${THEORY_LINES.kelvin.colour};stroke-width:${THEORY_LINES.kelvin.width};stroke-dasharray:${svgDash(THEORY_LINES.kelvin)}}.hov .rossby{stroke:${THEORY_LINES.rossby.colour};stroke-width:${THEORY_LINES.rossby.width};stroke-dasharray:${svgDash(THEORY_LINES.rossby)}}.hov .dots circle{fill:#000}
.probes{display:flex;flex-wrap:wrap;gap:8px}.probe{margin:0}.probe polyline{fill:none;stroke:#1a4f8b;stroke-width:1.3}.probe .zero{stroke:#999;stroke-width:.7}
footer{margin-top:18px;font-size:11px;color:#444}
.indices polyline{fill:none;stroke-width:1.3}.indices .sst{stroke:#b2182b;fill:#b2182b}.indices .warm{stroke:#2166ac;fill:#2166ac}.indices .zero{stroke:#999;stroke-width:.7}
@media print{body{margin:0;max-width:none}h2{break-after:avoid}.maps,.probes,svg{break-inside:avoid}}
`;

export interface ReportOptions {
  /** Name of the file the run came from, for the footer. */
  source?: string;
  /** How many h' maps (spread over the snapshots). Default 4. */
  maps?: number;
}

/** What the report shows of the scenario as written: its basin and wind parts (a run file may hold an older scenario, so all optional). */
interface WrittenScenario {
  basin?: {
    lonWest?: number;
    lonEast?: number;
    latSouth?: number;
    latNorth?: number;
    resolution?: number | { lon?: number; lat?: number };
  };
  wind?: {
    parts?: Array<{
      kind?: string;
      name?: string;
      quantity?: string;
      enabled?: boolean;
      strength?: number;
      drag?: string;
      source?: { kind?: string; shape?: { kind?: string } };
      envelope?: { kind?: string };
    }>;
  };
}

/** The report of one run, as the text of an HTML page. */
export function runReport(run: RunData, options: ReportOptions = {}): string {
  const scenario = JSON.parse(run.scenarioJson) as WrittenScenario;
  const d = derivedFor(run);
  const waves = measureWaves(run);
  const c = waves.c;
  const beta = run.physics.beta;
  const widthKm = equatorialWidthKm(run);
  const b = scenario.basin ?? {};
  const res = typeof b.resolution === 'number' ? `${b.resolution}°` : `${b.resolution?.lon}° x ${b.resolution?.lat}°`;
  const parts: string[] = (scenario.wind?.parts ?? []).map((w, k) => {
    const what =
      w.kind === 'fixed'
        ? `${w.source?.kind === 'shaped' ? w.source.shape?.kind : w.source?.kind} x ${w.envelope?.kind}`
        : w.kind;
    const how = w.kind === 'answering' ? `strength ${w.strength} m/s per K, ${w.drag} drag` : w.quantity;
    return `${k + 1}. ${w.name ? `'${w.name}' ` : ''}${w.kind} (${what}), ${how}${w.enabled === false ? ', off' : ''}`;
  });

  const params = table([
    [
      'basin',
      escapeHtml(
        `${lonLabel(Number(b.lonWest))} to ${lonLabel(Number(b.lonEast))}, ${latLabel(Number(b.latSouth))} to ${latLabel(Number(b.latNorth))}, cells ${res} (${run.grid.nx} x ${run.grid.ny})`,
      ),
    ],
    ["reduced gravity g'", `${fmt(run.physics.reducedGravity)} m s⁻²`],
    ['layer thickness H', `${fmt(run.physics.layerThickness)} m`],
    ['dynamics', escapeHtml(run.physics.dynamics)],
    ['friction', run.physics.frictionDays === null ? 'none' : `1 / (${fmt(run.physics.frictionDays)} days)`],
    ['wind parts', parts.length ? parts.map(escapeHtml).join('<br>') : 'none'],
    [
      'length',
      `${fmt(run.days[run.days.length - 1] - run.days[0])} days, ${run.days.length} output records, ${run.snapshots.length} with maps`,
    ],
    ['seed', escapeHtml(String(run.seed))],
  ]);
  const L = run.physics.equatorialRadius / 1000;
  const derived = table([
    ["Kelvin speed c = √(g'H)", `${fmt(c)} m/s`],
    ['equatorial radius L = √(c/β)', `${fmt(L)} km (β = ${fmt(beta)} m⁻¹ s⁻¹)`],
    ['Kelvin crossing', `${fmt(widthKm / c / 86.4)} days over ${fmt(widthKm, 4)} km of ocean on the equator`],
    [
      'long Rossby speed c/3',
      `${fmt(longRossbySpeed(c))} m/s, crossing in ${fmt(widthKm / longRossbySpeed(c) / 86.4)} days`,
    ],
    ['time step', `dt = ${fmt(run.dt, 4)} s${d ? ` (stability limit ${fmt(d.stability.dtMax, 4)} s)` : ''}`],
  ]);
  const measured = table([
    ['Kelvin wave', speedText(waves.kelvin, 'c', c)],
    ['long Rossby wave', speedText(waves.rossby, 'c/3', waves.rossbyTheory)],
  ]);
  const arrivals = waves.arrivals.length
    ? `<table><tr><th>probe</th><th>where</th><th>arrival (half the largest ${'h′'})</th></tr>${waves.arrivals
        .map(
          (a) =>
            `<tr><td>${escapeHtml(a.probe)}</td><td>${placeLabel(a.lon, a.lat)}</td><td>${a.day === null ? 'no signal' : `day ${fmt(a.day)} (${a.sign > 0 ? 'h′ > 0' : 'h′ < 0'})`}</td></tr>`,
        )
        .join('')}</table>`
    : '<p>No probes in this run.</p>';

  // Maps of h' at a few times spread over the snapshots, on one colour range.
  let maps = '<p>No field snapshots were kept for this run.</p>';
  const snaps = run.snapshots.filter((s) => s.fields.h_anom);
  if (snaps.length > 0) {
    const count = Math.min(options.maps ?? 4, snaps.length);
    const chosen = Array.from(
      { length: count },
      (_, k) => snaps[Math.round(((k + 1) * (snaps.length - 1)) / count)] ?? snaps[snaps.length - 1],
    );
    const unique = chosen.filter((s, k) => chosen.indexOf(s) === k);
    const range = symmetricRange(unique.map((s) => s.fields.h_anom!));
    maps =
      `<div class="maps">${unique.map((s) => `<figure><img src="${mapImage(s.fields.h_anom!, run.grid.nx, run.grid.ny, range)}" alt="h' on day ${fmt(s.day)}"><figcaption>day ${fmt(s.day)}</figcaption></figure>`).join('')}</div>` +
      colourBar(range, 'm (thermocline anomaly h′, positive down; grey: land)');
  }

  let hov = '<p>The run has no Hovmoller section.</p>';
  if (run.hovmoller.length > 0) {
    let eq = 0;
    run.hovmoller.forEach((h, k) => {
      if (Math.abs(h.rowLat) < Math.abs(run.hovmoller[eq].rowLat)) eq = k;
    });
    hov =
      `<p>h′ along ${latLabel(run.hovmoller[eq].rowLat)} against time (upward). Solid: a Kelvin wave at c = ${fmt(c)} m/s; dashed: a long Rossby wave at c/3 from the east coast where that line arrives; dots: the measured front.</p>` +
      hovmollerFigure(run, eq, waves);
  }

  const probes = run.probes.length
    ? `<div class="probes">${run.probes.map((pr) => probePlot(run.days, pr.series.h_anom ?? new Float32Array(run.days.length).fill(NaN), `${pr.name}: h′ (m)`)).join('')}</div>`
    : '<p>No probes in this run.</p>';

  const title = `Pycno run report: ${run.name}`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">
<title>${escapeHtml(title)}</title><style>${REPORT_STYLE()}</style></head>
<body>
<h1>${escapeHtml(title)}</h1>
<p>${escapeHtml(run.description || '')}</p>
<p class="caution">${escapeHtml(CAUTION)}</p>
<h2>Scenario</h2>${params}
<h2>Derived numbers</h2>${derived}
<h2>Measured against theory</h2>${measured}
<h2>Arrival at the probes</h2>${arrivals}
<h2>Thermocline anomaly</h2>${maps}
<h2>Equatorial Hovmoller diagram</h2>${hov}
<h2>Probe series</h2>${probes}
${coupledSection(run)}
<footer>Pycno ${escapeHtml(run.version)}${run.createdAt ? `, run made ${escapeHtml(run.createdAt)}` : ''}${run.command ? ` by “${escapeHtml(run.command)}”` : ''}. Scenario SHA-256 ${escapeHtml(run.scenarioSha256)}${options.source ? `; from ${escapeHtml(options.source)}` : ''}. The scenario JSON in the run file repeats the run exactly.</footer>
</body></html>
`;
}
