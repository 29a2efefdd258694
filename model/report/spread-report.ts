// The report of a sweep summary (`pycno report summary.nc`): one self-contained HTML page like the
// run report (report.ts: no script, a Content-Security-Policy that forbids any, every text
// escaped). Per-member scalars against the varied value (or the member number), failed and
// missing members listed with their message; for seed ensembles, per ensemble the mean
// with a band of plus and minus one standard deviation for the probe series and the energy, and
// the Hovmoller diagrams of the mean and of the standard deviation.

import { MEMBER_SCALARS, SEED_PATH } from '../ensemble/summary-file.ts';
import type { SummaryData, SummaryGroupRead, SummaryMemberRead } from '../ensemble/summary-read.ts';
import * as pm from '../portable-math.ts';
import { pngDataUrl } from './png.ts';
import { symmetricRange } from '../display/conventions.ts';
import { CAUTION, colourBar, colourOf, escapeHtml, niceTicks, REPORT_STYLE } from './report.ts';

const fmt = (x: number, digits = 3) => {
  if (!Number.isFinite(x)) return '–';
  // Energies (1e15 J) and volume changes (1e-16) in powers of ten, the rest as plain numbers.
  const a = Math.abs(x);
  return a >= 1e5 || (a > 0 && a < 1e-3)
    ? x.toExponential(Math.max(0, digits - 2))
    : Number(x.toPrecision(digits)).toString();
};

/** Tick labels with as many digits as the spacing of the ticks needs. */
function tickLabels(a: number, b: number, n: number): Array<[number, string]> {
  const t = niceTicks(a, b, n);
  const step = t.length > 1 ? t[1] - t[0] : Math.abs(b - a) || 1;
  return t.map((v) => {
    const digits = v === 0 ? 1 : Math.max(2, Math.ceil(pm.log10(Math.abs(v) / step) + 1e-9) + 1);
    return [v, fmt(v, Math.min(6, digits))];
  });
}

const SPREAD_STYLE = `
.plots{display:flex;flex-wrap:wrap;gap:10px}.plot{margin:0}.plot .pt{fill:#1a4f8b}.plot .bad{stroke:#b22;stroke-width:1.5}
.plot .band{fill:#1a4f8b;fill-opacity:.18;stroke:none}.plot .mean{fill:none;stroke:#1a4f8b;stroke-width:1.4}.plot .theory{stroke:#555;stroke-dasharray:4 3}
.plot .axis{stroke:#999;stroke-width:.7}td.failed{color:#b22}td.missing{color:#a60}
`;

interface Axis {
  label: string;
  /** x of each member, NaN when it has none. */
  of: (m: SummaryMemberRead) => number;
}

/** The x axis of the scalar plots: the one numeric varied value but the seed, else the member number. */
function memberAxis(s: SummaryData): Axis {
  const candidates = s.vary.filter(
    (v) => v.path !== SEED_PATH && v.values.every((x) => x.trim() !== '' && Number.isFinite(Number(x))),
  );
  if (candidates.length === 1 && s.vary.filter((v) => v.path !== SEED_PATH).length === 1) {
    const p = candidates[0].path;
    return { label: p, of: (m) => Number(m.values[p]) };
  }
  return { label: 'member', of: (m) => m.id };
}

/** One scalar against the axis: a dot per member with a result, a red cross on the axis per member without. */
function scalarPlot(
  s: SummaryData,
  axis: Axis,
  title: string,
  units: string,
  value: (m: SummaryMemberRead) => number,
  theory?: (m: SummaryMemberRead) => number,
): string {
  const W = 260;
  const H = 170;
  const m = { l: 56, r: 8, t: 18, b: 30 };
  const pts = s.members.map((x) => ({ m: x, x: axis.of(x), y: value(x) }));
  const xs = pts.map((p) => p.x).filter(Number.isFinite);
  const ys = pts.map((p) => p.y).filter(Number.isFinite);
  const th = theory
    ? s.members
        .map((x) => ({ x: axis.of(x), y: theory(x) }))
        .filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y))
    : [];
  ys.push(...th.map((p) => p.y));
  if (xs.length === 0) return '';
  let [x0, x1] = [Math.min(...xs), Math.max(...xs)];
  let [y0, y1] = ys.length ? [Math.min(...ys), Math.max(...ys)] : [0, 1];
  if (!(x1 > x0)) [x0, x1] = [x0 - 1, x1 + 1];
  if (!(y1 > y0)) [y0, y1] = [y0 - (Math.abs(y0) || 1) * 0.1, y1 + (Math.abs(y1) || 1) * 0.1];
  const padX = 0.05 * (x1 - x0);
  const padY = 0.08 * (y1 - y0);
  [x0, x1, y0, y1] = [x0 - padX, x1 + padX, y0 - padY, y1 + padY];
  const X = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const Y = (y: number) => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const dots = pts
    .map((p) =>
      Number.isFinite(p.y)
        ? `<circle class="pt" cx="${X(p.x).toFixed(1)}" cy="${Y(p.y).toFixed(1)}" r="2.6"><title>member ${p.m.id}: ${fmt(p.y, 5)} ${escapeHtml(units)}</title></circle>`
        : `<path class="bad" d="M${(X(p.x) - 3).toFixed(1)},${(H - m.b - 3).toFixed(1)}l6,6m0,-6l-6,6"><title>member ${p.m.id}: ${p.m.state}</title></path>`,
    )
    .join('');
  const theoryLine = th.length
    ? `<polyline class="theory" fill="none" points="${th
        .sort((a, b) => a.x - b.x)
        .map((p) => `${X(p.x).toFixed(1)},${Y(p.y).toFixed(1)}`)
        .join(' ')}"/>`
    : '';
  const ticks = tickLabels(x0, x1, 4)
    .map(([v, t]) => `<text x="${X(v).toFixed(1)}" y="${H - m.b + 12}" text-anchor="middle">${t}</text>`)
    .join('');
  const yt = tickLabels(y0, y1, 4)
    .map(([v, t]) => `<text x="${m.l - 3}" y="${(Y(v) + 3).toFixed(1)}" text-anchor="end">${t}</text>`)
    .join('');
  return (
    `<figure class="plot"><svg viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeHtml(title)}">` +
    `<text class="t" x="${m.l}" y="12">${escapeHtml(title)} (${escapeHtml(units)})</text>` +
    `<line class="axis" x1="${m.l}" x2="${W - m.r}" y1="${H - m.b}" y2="${H - m.b}"/><line class="axis" x1="${m.l}" x2="${m.l}" y1="${m.t}" y2="${H - m.b}"/>` +
    `${theoryLine}${dots}${ticks}${yt}<text x="${W - m.r}" y="${H - 3}" text-anchor="end">${escapeHtml(axis.label)}</text></svg></figure>`
  );
}

/** Mean with a band of plus and minus one standard deviation against time. */
export function bandPlot(
  days: Float64Array,
  mean: Float64Array,
  std: Float64Array,
  title: string,
  units: string,
): string {
  const W = 260;
  const H = 150;
  const m = { l: 48, r: 8, t: 18, b: 22 };
  const lo = (n: number) => mean[n] - (Number.isFinite(std[n]) ? std[n] : 0);
  const hi = (n: number) => mean[n] + (Number.isFinite(std[n]) ? std[n] : 0);
  const idx = Array.from(days.keys()).filter((n) => Number.isFinite(mean[n]));
  if (idx.length === 0) return `<figure class="plot"><figcaption>${escapeHtml(title)}: no values</figcaption></figure>`;
  let y0 = Math.min(0, ...idx.map(lo));
  let y1 = Math.max(0, ...idx.map(hi));
  if (!(y1 > y0)) [y0, y1] = [y0 - 1, y1 + 1];
  const d0 = days[0];
  const d1 = days[days.length - 1];
  const X = (d: number) => m.l + ((d - d0) / (d1 - d0 || 1)) * (W - m.l - m.r);
  const Y = (v: number) => H - m.b - ((v - y0) / (y1 - y0)) * (H - m.t - m.b);
  const upper = idx.map((n) => `${X(days[n]).toFixed(1)},${Y(hi(n)).toFixed(1)}`);
  const lower = idx.map((n) => `${X(days[n]).toFixed(1)},${Y(lo(n)).toFixed(1)}`).reverse();
  return (
    `<figure class="plot"><svg viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeHtml(title)}">` +
    `<text class="t" x="${m.l}" y="12">${escapeHtml(title)} (${escapeHtml(units)})</text>` +
    `<line class="axis" x1="${m.l}" x2="${W - m.r}" y1="${Y(0).toFixed(1)}" y2="${Y(0).toFixed(1)}"/>` +
    `<polygon class="band" points="${[...upper, ...lower].join(' ')}"/>` +
    `<polyline class="mean" points="${idx.map((n) => `${X(days[n]).toFixed(1)},${Y(mean[n]).toFixed(1)}`).join(' ')}"/>` +
    `<text x="${m.l - 3}" y="${(Y(y1) + 4).toFixed(1)}" text-anchor="end">${fmt(y1, 2)}</text><text x="${m.l - 3}" y="${(Y(y0) + 4).toFixed(1)}" text-anchor="end">${fmt(y0, 2)}</text>` +
    `<text x="${m.l}" y="${H - 5}">day ${fmt(d0)}</text><text x="${W - m.r}" y="${H - 5}" text-anchor="end">${fmt(d1)}</text></svg></figure>`
  );
}

/** A Hovmoller diagram (time upward) of a group's mean or standard deviation along one row. */
function hovmollerImage(days: Float64Array, lon: Float64Array, rows: Float64Array, caption: string): string {
  const nx = lon.length;
  const nt = days.length;
  const range = symmetricRange([rows]);
  const rgb = new Uint8Array(nx * nt * 3);
  // One diverging scale for both: a standard deviation (>= 0) runs from white to red.
  for (let y = 0; y < nt; y++)
    for (let i = 0; i < nx; i++) rgb.set(colourOf(rows[(nt - 1 - y) * nx + i], range), 3 * (y * nx + i));
  return `<figure class="plot"><img src="${pngDataUrl(nx, nt, rgb)}" alt="${escapeHtml(caption)}" width="260" height="200" style="image-rendering:pixelated;border:1px solid #888"><figcaption>${escapeHtml(caption)}; ${fmt(lon[0])}°E to ${fmt(lon[nx - 1])}°E, days ${fmt(days[0])}–${fmt(days[nt - 1])} upward</figcaption>${colourBar(range, 'm')}</figure>`;
}

function groupLabel(g: SummaryGroupRead, k: number): string {
  const v = Object.entries(g.values)
    .map(([p, x]) => `${p} = ${x}`)
    .join(', ');
  return `seed ensemble ${k + 1}${v ? ` (${v})` : ''}: ${g.members} member${g.members === 1 ? '' : 's'}`;
}

export function spreadReport(s: SummaryData, options: { source?: string } = {}): string {
  const axis = memberAxis(s);
  const count = (st: string) => s.members.filter((m) => m.state === st).length;
  const bad = s.members.filter((m) => m.state !== 'complete');
  const memberRows = s.members
    .map((m) => {
      const values = Object.entries(m.values)
        .map(([p, v]) => `${p} = ${v}`)
        .join(', ');
      return `<tr><td>${m.id}</td><td>${escapeHtml(values)}</td><td class="${m.state}">${m.state}</td><td>${fmt(m.scalars.kelvin_speed ?? NaN)}</td><td>${fmt(m.scalars.ssh_peak ?? NaN)}</td><td>${fmt(m.scalars.energy_end ?? NaN)}</td><td>${escapeHtml((m.message ?? '').split('\n')[0])}</td></tr>`;
    })
    .join('');
  const table = `<table><tr><th>member</th><th>varied values</th><th>state</th><th>Kelvin speed (m/s)</th><th>peak sea level (m)</th><th>energy at the end (J)</th><th>note</th></tr>${memberRows}</table>`;
  const unit = (name: string) => MEMBER_SCALARS.find((x) => x.name === name)?.units ?? '';
  const scalars = [
    scalarPlot(
      s,
      axis,
      'Kelvin speed (dashed: c)',
      unit('kelvin_speed'),
      (m) => m.scalars.kelvin_speed,
      (m) => m.scalars.kelvin_speed_theory,
    ),
    scalarPlot(s, axis, 'peak sea-level anomaly', unit('ssh_peak'), (m) => m.scalars.ssh_peak),
    scalarPlot(s, axis, 'energy at the end', unit('energy_end'), (m) => m.scalars.energy_end),
    scalarPlot(s, axis, 'relative volume change', unit('volume_change'), (m) => m.scalars.volume_change),
    ...s.probes.map((p, k) => scalarPlot(s, axis, `arrival at ${p.name}`, 'day', (m) => m.arrivalDay[k] ?? NaN)),
  ].join('');
  let spread = '<p>No seed among the varied values: no ensemble statistics (vary <code>seed</code> for them).</p>';
  if (s.groups.length && s.days && s.lon) {
    const days = s.days;
    const lon = s.lon;
    let eq = 0;
    s.hovmollerLat.forEach((l, k) => {
      if (Math.abs(l) < Math.abs(s.hovmollerLat[eq])) eq = k;
    });
    spread = s.groups
      .map((g, k) => {
        const probes = s.probes
          .map((p, q) =>
            g.probeMean[q] ? bandPlot(days, g.probeMean[q], g.probeStd[q], `${p.name}: h′ mean ± std`, 'm') : '',
          )
          .join('');
        const energy = bandPlot(days, g.energyMean, g.energyStd, 'energy mean ± std', 'J');
        const hov = g.hovmollerMean[eq]
          ? hovmollerImage(days, lon, g.hovmollerMean[eq], `h′ mean along ${fmt(s.hovmollerLat[eq])}°N`) +
            hovmollerImage(days, lon, g.hovmollerStd[eq], `h′ standard deviation along ${fmt(s.hovmollerLat[eq])}°N`)
          : '';
        return `<h3>${escapeHtml(groupLabel(g, k))}</h3><div class="plots">${probes}${energy}${hov}</div>`;
      })
      .join('');
  }
  const title = `Pycno sweep report: ${s.title}`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">
<title>${escapeHtml(title)}</title><style>${REPORT_STYLE()}${SPREAD_STYLE}</style></head>
<body>
<h1>${escapeHtml(title)}</h1>
<p>${s.members.length} members over ${escapeHtml(s.vary.map((v) => `${v.path} (${v.values.length} values)`).join(' x '))}: ${count('complete')} complete, ${count('failed')} failed, ${count('missing')} missing.</p>
<p class="caution">${escapeHtml(CAUTION)}</p>
${bad.length ? `<h2>Members without results</h2><ul>${bad.map((m) => `<li>member ${m.id} (${m.state}${m.exit !== null ? `, exit ${m.exit}` : ''}): ${escapeHtml(m.message ?? '')}</li>`).join('')}</ul><p>pycno sweep --gather on the batch folder prints the command that reruns each.</p>` : ''}
<h2>Results per member</h2><div class="plots">${scalars}</div>
<h2>Ensemble spread over the seeds</h2>${spread}
<h2>Members</h2>${table}
<footer>Pycno sweep summary${options.source ? ` ${escapeHtml(options.source)}` : ''}. Dots: members with results; red crosses on the axis: members without. Standard deviations have n - 1 in the denominator.</footer>
</body></html>
`;
}
