// Pycno's page: wires the engine (in a worker) to the map, the panels and the controls.
// Frames arrive with transferred buffers; the page keeps the latest (and some history for the
// time slider) and draws at most once per animation frame, so stale frames are simply skipped.

import { EARTH } from '../model/config.ts';
import type { FieldName } from '../model/diagnostics/fields.ts';
import type { EngineError, EngineStatus, Frame, LoadedScenario } from '../worker/protocol.ts';
import { connectEngine, EngineLostError, NoWorkerError, type EngineClient } from './engine-client.ts';
import { showEngineLost } from './panels/engine-lost.ts';
import { drawColourBar, formatValue } from './panels/colour-bar.ts';
import { HovmollerPanel } from './panels/hovmoller.ts';
import { ProbePanel } from './panels/probes.ts';
import { RunTotals } from './panels/run-totals.ts';
import { CoupledPanel } from './panels/coupled-panel.ts';
import { ScenarioPanel } from './panels/scenario-panel.ts';
import { WindPanel } from './wind/wind-panel.ts';
import { LibraryPage } from './library-panel/library-page.ts';
import { fieldChecksum } from './wind/checksum.ts';
import { lookupTable, mapFor } from './render/colour-maps.ts';
import { lonLabel, latLabel } from './render/geo.ts';
import { NoWebGLError } from './render/map-gl.ts';
import { MapView, type VectorLayer } from './render/map-view.ts';
import { autoRange, checkFixedRange, steadyRange, type Range } from './state/colour-range.ts';
import { availableDisplays, displayAt, displayField, fillDisplay, type DisplayKey } from './state/display-fields.ts';
import { FrameHistory, type KeptFrame } from './state/frame-history.ts';
import { HovmollerStore } from './state/hovmoller-store.ts';
import { ProbeStore } from './state/probe-store.ts';

const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;

/** What the tests (and a curious user in the console) can read; the page never reads it back. */
interface PageInfo {
  ready: boolean;
  status: EngineStatus;
  framesReceived: number;
  framesDrawn: number;
  lastDay: number;
  shownDay: number;
  errors: string[];
  floatTextures: boolean;
}
const info: PageInfo = { ready: false, status: 'empty', framesReceived: 0, framesDrawn: 0, lastDay: 0, shownDay: 0, errors: [], floatTextures: false };
(window as unknown as { __pycno: PageInfo }).__pycno = info;

// ---- shipped scenarios (vite's JSON import) ----
const shipped = Object.entries(import.meta.glob('../configs/*.json', { eager: true, import: 'default' }) as Record<string, Record<string, unknown>>)
  .filter(([path]) => !path.endsWith('.schema.json'))
  .map(([path, json]) => ({ file: path.split('/').pop()!, json }))
  .sort((a, b) => (a.file === 'westerly-burst.json' ? -1 : b.file === 'westerly-burst.json' ? 1 : a.file.localeCompare(b.file)));

function showNoGo(title: string, detail: string): void {
  $('app').hidden = true;
  for (const id of ['messages']) $(id).hidden = true;
  for (const b of document.querySelectorAll<HTMLButtonElement>('.controls button, .controls select')) b.disabled = true;
  const box = $('no-go');
  const h = document.createElement('h2');
  h.textContent = title;
  const p = document.createElement('p');
  p.textContent = detail;
  box.replaceChildren(h, p);
  box.hidden = false;
  $('status').textContent = 'cannot run here';
}

function message(text: string, kind: 'error' | 'info' = 'error'): void {
  const div = document.createElement('div');
  div.className = `message ${kind}`;
  const span = document.createElement('span');
  span.textContent = text;
  const close = document.createElement('button');
  close.type = 'button';
  close.textContent = 'dismiss';
  close.addEventListener('click', () => div.remove());
  div.append(span, close);
  $('messages').append(div);
  if (kind === 'error') info.errors.push(text);
}

function clearMessages(): void {
  $('messages').replaceChildren();
}

let map: MapView;
try {
  map = new MapView($<HTMLCanvasElement>('map-gl'), $<HTMLCanvasElement>('map-overlay'), { forceBytes: new URLSearchParams(location.search).has('bytes') });
  info.floatTextures = map.gl.floatTextures;
  // GPU uploads and WebGL draws, read by the page benchmark.
  (info as unknown as { gpu: typeof map.counts }).gpu = map.counts;
} catch (e) {
  if (e instanceof NoWebGLError) {
    showNoGo('This browser gives the page no WebGL', 'Pycno draws the ocean with WebGL. Turn on hardware acceleration (or WebGL) in the browser settings, or use another browser, then reload. Nothing was run.');
  } else if (e instanceof EvalError) {
    showNoGo(
      "The page's security policy stops its drawing library",
      "The map is drawn with regl, which builds its WebGL programs at run time and so needs the Content-Security-Policy to allow 'unsafe-eval' for scripts (see docs/reliability.md). Serve the page with the policy of vite.config.ts, then reload. Nothing was run.",
    );
  } else showNoGo('The map could not start', String(e));
  throw e;
}

const history = new FrameHistory(128e6);
// What the time slider holds, read by the memory benchmark.
(info as unknown as { kept: () => unknown }).kept = () => ({ frames: history.length, bytes: history.bytes, budget: history.budgetBytes, oldestDay: history.at(0)?.day ?? null });
const hov = new HovmollerStore();
const probes = new ProbeStore();
let engine: EngineClient;
let run: LoadedScenario | null = null;
let layerThickness = 150;
let status: EngineStatus = 'empty';
/** Index into the history while scrubbing, null to follow the latest frame. */
let viewIndex: number | null = null;
let fieldKey: DisplayKey = 'h_anom';
let rangeState: Range | null = null;
let cursor: { i: number; j: number } | null = null;
let hover: { i: number; j: number } | null = null;
let display = new Float32Array(0);
let drawQueued = false;
let lastProbeDraw = 0;
let probeTimer: ReturnType<typeof setTimeout> | null = null;
let loading = false;
const early: Frame[] = [];

const totals = new RunTotals($('totals'));
const coupledPanel = new CoupledPanel($('coupled-panel'));
const panel = new ScenarioPanel($<HTMLFormElement>('params'), $('derived'), $<HTMLUListElement>('other-issues'), $('restart-note'), $<HTMLButtonElement>('btn-apply'));
const hovPanel = new HovmollerPanel($<HTMLCanvasElement>('hovmoller'), hov, (s) => {
  $('hov-start').textContent = `from ${lonLabel(s.lon)}, day ${s.day.toFixed(1)}`;
});
// The wind designer: edits the wind of the scenario panel's copy; runs only through its Apply.
const windPanel = new WindPanel($('wind-panel'), {
  map,
  stack: $('map-stack'),
  colourBar: $<HTMLCanvasElement>('colour-bar'),
  baseScenario: () => panel.edited,
  fileName: () => panel.fileName,
  apply: async (text, fileName) => {
    clearMessages();
    if (!(await loadIntoEngine(text, fileName))) return false;
    panel.setScenario(JSON.parse(text), fileName);
    return true;
  },
  redraw: () => queueDraw(false),
  message: (text, kind) => message(text, kind),
});
// Debug hook for the tests: the checksum of the latest h_anom frame, to compare with a Node run.
(info as unknown as { hAnomChecksum: () => unknown }).hAnomChecksum = () => {
  const f = history.latest();
  return f?.fields.h_anom ? { day: f.day, step: f.step, checksum: fieldChecksum(f.fields.h_anom) } : null;
};
// Debug hook: the engine's own SHA-256 of its u, v, h bits, to compare with the command line.
(info as unknown as { stateChecksum: () => unknown }).stateChecksum = () => engine.stateChecksum();
const probePanel = new ProbePanel($('probe-chart'), $<HTMLUListElement>('probe-list'), probes, (id) => {
  probes.remove(id);
  probePanel.renderList();
  queueDraw(true);
});

try {
  engine = connectEngine({ frame: onFrame, status: onStatus, error: onEngineError, lost: onEngineLost });
} catch (e) {
  if (e instanceof NoWorkerError) showNoGo('This browser cannot run the model', `Pycno runs the model in a Web Worker (a module worker), which this browser did not start: ${e.message}. Use a current Chromium, Firefox or Safari.`);
  throw e;
}

// The run library and the comparison (viewer/library-panel/, viewer/compare/): it keeps the run on
// screen from the engine's samples, so it sees every sample before anything else here.
const library = new LibraryPage($('library-panel'), $('compare-panel'), {
  setSampleFields: (every) => engine.setSampleFields(every),
  openScenario: (text, fileName) => openText(text, fileName),
  message: (text, kind) => message(text, kind),
  outputEveryDays: () => run?.outputEveryDays ?? 1,
});

// ---- engine events ----
function onFrame(f: Frame): void {
  // The first frame of a scenario may come before load() answers: hold it until the run is set up.
  if (loading) {
    early.push(f);
    return;
  }
  info.framesReceived++;
  info.lastDay = f.day;
  for (const s of f.samples) {
    library.sample(s);
    hov.add(s.day, s.hovmoller);
    probes.addSample(s.day, s.probeValues);
  }
  probes.addFrame(f.day, f.fields);
  totals.add(f.samples.map((s) => s.integrals), f.integrals);
  coupledPanel.addSamples(f.samples);
  if (run?.derived.answering) panel.setCoupledMode(coupledPanel.shortMode());
  history.push({ day: f.day, step: f.step, fields: f.fields });
  queueDraw(false);
}

function onStatus(s: EngineStatus): void {
  status = s;
  info.status = s;
  const st = $('status');
  st.textContent = s === 'running' ? 'running' : s === 'paused' ? 'paused' : s === 'finished' ? 'run finished' : s === 'failed' ? 'stopped by an error' : s === 'ready' ? 'ready to run' : 'no scenario';
  st.classList.toggle('failed', s === 'failed');
  const has = run !== null && s !== 'empty';
  $<HTMLButtonElement>('btn-run').disabled = !has || s === 'running' || s === 'finished' || s === 'failed';
  $<HTMLButtonElement>('btn-pause').disabled = s !== 'running';
  $<HTMLButtonElement>('btn-step').disabled = !has || s === 'finished' || s === 'failed';
  $<HTMLButtonElement>('btn-reset').disabled = run === null;
}

function onEngineError(e: EngineError): void {
  // The engine's own text, word for word as the command line prints it.
  message(e.message);
}

// The worker is gone: say so, keep everything on screen (it can still be saved), offer a new engine.
function onEngineLost(): void {
  const day = run ? info.lastDay : null;
  onStatus('failed');
  $('status').textContent = 'engine stopped';
  $<HTMLButtonElement>('btn-reset').disabled = true;
  showEngineLost($('messages'), {
    day,
    restart: async () => {
      engine.restart();
      const again = run;
      const ok = again ? await loadIntoEngine(again.scenarioJson, panel.fileName) : await loadIntoEngine(panel.text(), panel.fileName);
      if (!ok) throw new Error('the scenario did not load in the new engine (see the message above)');
    },
  });
}

// ---- loading ----
async function loadIntoEngine(text: string, fileName: string): Promise<boolean> {
  loading = true;
  early.length = 0;
  try {
    const r = await engine.load(text, fileName);
    // The speed picker's choice holds for every run, the first included.
    const speed = $<HTMLSelectElement>('speed').value;
    await engine.setSpeed(speed === 'max' ? 'max' : Number(speed));
    loading = false;
    startRun(r);
    for (const f of early.splice(0)) onFrame(f);
    return true;
  } catch (e) {
    loading = false;
    early.length = 0;
    const err = e as EngineError;
    // A lost worker has its own notice, with the restart button.
    if (!(e instanceof EngineLostError)) message(err.message ?? String(e));
    // The engine holds no run now; the map keeps the last picture but the controls wait for a scenario.
    run = null;
    onStatus('failed');
    return false;
  }
}

function startRun(r: LoadedScenario): void {
  run = r;
  library.runStarted(r);
  const sc = JSON.parse(r.scenarioJson) as { physics?: { layerThickness?: number }; wind?: { parts?: unknown[] } };
  layerThickness = sc.physics?.layerThickness ?? 150;
  probePanel.layerThickness = layerThickness;
  history.clear();
  forgetDrawn();
  hov.reset(r.hovmollerLats);
  probes.reset(r.fields, r.probes);
  viewIndex = null;
  rangeState = null;
  cursor = null;
  map.setGrid(r.grid);
  layoutMap();
  $('run-name').textContent = r.name;
  $('scenario-description').textContent = r.description;
  // Field picker: what this run's output fields allow.
  const pick = $<HTMLSelectElement>('field-pick');
  const probePick = $<HTMLSelectElement>('probe-field');
  const avail = availableDisplays(r.fields);
  for (const sel of [pick, probePick]) {
    const keep = sel.value;
    sel.replaceChildren(...avail.map((d) => new Option(`${d.label} (${d.units})`, d.key)));
    if (avail.some((d) => d.key === keep)) sel.value = keep;
  }
  fieldKey = pick.value as DisplayKey;
  probePanel.key = probePick.value as DisplayKey;
  $<HTMLSelectElement>('hov-lat').replaceChildren(...r.hovmollerLats.map((lat, n) => new Option(latLabel(lat), String(n))));
  hovPanel.setRun({ lonWest: r.grid.lonWest, lonEast: r.grid.lonEast, days: r.days, nx: r.grid.nx }, r.derived.c, EARTH.radius, defaultStart(sc));
  $('hov-start').textContent = hovPanel.start ? `from ${lonLabel(hovPanel.start.lon)}, day ${hovPanel.start.day.toFixed(1)}` : '';
  probePanel.renderList();
  const d = r.derived;
  coupledPanel.setRun(r.grid, r.fields, d.answering !== null);
  panel.setCoupledMode(coupledPanel.shortMode());
  totals.setRun(
    [
      ['dt', `${formatValue(r.dt)} s`],
      ['c', `${formatValue(d.c)} m/s`],
      ['Kelvin crossing', `${formatValue(d.kelvinCrossingDays)} days`],
    ],
    r.dynamics,
  );
  info.ready = true;
  onStatus(status);
  queueDraw(true);
}

/** Where the characteristic lines start before the user clicks: the first pulsed patch of wind, at its middle. */
function defaultStart(sc: { wind?: { parts?: unknown[] } }): { lon: number; day: number } | null {
  for (const p of (sc.wind?.parts ?? []) as Array<{ source?: { shape?: { kind?: string; lon?: number } }; envelope?: { kind?: string; start?: number; duration?: number } }>) {
    const shape = p.source?.shape;
    const env = p.envelope;
    if (shape?.kind === 'patch' && typeof shape.lon === 'number' && env?.kind === 'pulse' && typeof env.start === 'number' && typeof env.duration === 'number') {
      return { lon: shape.lon, day: env.start + env.duration / 2 };
    }
  }
  return null;
}


async function openText(text: string, fileName: string): Promise<void> {
  clearMessages();
  const check = ScenarioPanel.checkText(text, fileName);
  if (!check.ok) {
    // The validator's own lines, as `pycno check` prints them; the run on screen stays.
    message(check.lines.join('\n'));
    return;
  }
  if (await loadIntoEngine(text, fileName)) {
    panel.setScenario(check.json, fileName);
    windPanel.setScenario(check.json);
    // Show an opened file in the picker too, so the panel never names the wrong scenario.
    const pick = $<HTMLSelectElement>('scenario-pick');
    if (!shipped.some((s) => s.file === fileName)) {
      pick.querySelector('option[data-opened]')?.remove();
      const o = new Option(`${String(check.json.name ?? fileName)} (opened ${fileName})`, `opened:${fileName}`);
      o.dataset.opened = '1';
      pick.append(o);
      pick.value = o.value;
    } else pick.value = fileName;
  }
}

// ---- drawing ----
function queueDraw(all: boolean): void {
  if (all) lastProbeDraw = 0;
  if (drawQueued) return;
  drawQueued = true;
  requestAnimationFrame(() => {
    drawQueued = false;
    draw();
  });
}

function shownFrame(): KeptFrame | null {
  if (viewIndex !== null) return history.at(viewIndex);
  return history.latest();
}

// What was drawn last, so a redraw without new data repeats no work: the display field is
// filled (and its range scanned) once per shown frame, the colour bar, read-out, Hovmoller diagram
// and texts are touched only when what they show changed.
let displayFrom: { frame: KeptFrame; key: DisplayKey } | null = null;
let displayOk = false;
let barKey = '';
let readoutKey = '';
let readoutFrame: KeptFrame | null = null;
let hovShown = { rows: -1, rest: '' };
let lastHovDraw = 0;
let hovTimer: ReturnType<typeof setTimeout> | null = null;

function setText(id: string, text: string): void {
  const el = $(id);
  if (el.textContent !== text) el.textContent = text;
}

function forgetDrawn(): void {
  displayFrom = null;
  barKey = '';
  readoutKey = '';
  readoutFrame = null;
  hovShown = { rows: -1, rest: '' };
}

function draw(): void {
  const f = shownFrame();
  if (!run || !f) return;
  const g = run.grid;
  const df = displayField(fieldKey);
  const fresh = displayFrom === null || displayFrom.frame !== f || displayFrom.key !== fieldKey || display.length !== g.nx * g.ny;
  if (fresh) {
    if (display.length !== g.nx * g.ny) display = new Float32Array(g.nx * g.ny);
    displayOk = fillDisplay(fieldKey, f.fields, layerThickness, display);
    displayFrom = { frame: f, key: fieldKey };
  }
  if (!displayOk) return;
  const range = currentRange(df.kind, fresh);
  const layers: VectorLayer[] = [];
  if ($<HTMLInputElement>('show-currents').checked && f.fields.u_surf && f.fields.v_surf) {
    layers.push({ name: 'surface current', u: f.fields.u_surf, v: f.fields.v_surf, units: 'm/s', colour: [20, 20, 20] });
  }
  if ($<HTMLInputElement>('show-wind').checked && f.fields.taux && f.fields.tauy) {
    layers.push({ name: 'wind stress', u: f.fields.taux, v: f.fields.tauy, units: 'N m-2', colour: [120, 30, 160] });
  }
  // Over the SST anomaly, the wind that answers it.
  if (fieldKey === 'sst_anom' && f.fields.u_atm && f.fields.v_atm) {
    layers.push({ name: 'answering wind', u: f.fields.u_atm, v: f.fields.v_atm, units: 'm/s', colour: [0, 90, 40] });
  }
  if (fresh) coupledPanel.drawFields(f.fields);
  map.gl.setColourMap(mapFor(fieldKey), lookupTable(mapFor(fieldKey)));
  // While the wind preview is on, the map shows the designed forcing instead of the run's field.
  if (!windPanel.drawOnMap()) {
    map.draw(display, range, layers, probes.probes, cursor, { frame: f, field: fieldKey });
    const bar = `${fieldKey}|${range.min}|${range.max}`;
    if (bar !== barKey) {
      drawColourBar($<HTMLCanvasElement>('colour-bar'), lookupTable(mapFor(fieldKey)), range, df.label, df.units);
      barKey = bar;
    }
  } else barKey = ''; // the preview drew its own colour bar
  windPanel.setModelDay(f.day);
  if (fresh) info.framesDrawn++;
  info.shownDay = f.day;
  setText('map-day', `day ${f.day.toFixed(1)}${viewIndex !== null ? ' (looking back)' : ''}`);
  updateSlider(f);
  const cell = hover ?? cursor;
  const rk = cell ? `${cell.i},${cell.j}|${fieldKey}` : '';
  if (f !== readoutFrame || rk !== readoutKey) {
    readoutFrame = f;
    readoutKey = rk;
    showReadout(cell);
  }
  hovPanel.setMark(viewIndex !== null ? f.day : null);
  drawHovmollerIfChanged();
  const now = performance.now();
  // The chart is the slowest panel to redraw; a few times a second is plenty to follow a run.
  if (now - lastProbeDraw > 250) {
    lastProbeDraw = now;
    probePanel.draw();
  } else if (!probeTimer) {
    // Catch up once the pause is over, so the chart also shows the last frame of a burst.
    probeTimer = setTimeout(() => {
      probeTimer = null;
      lastProbeDraw = performance.now();
      probePanel.draw();
    }, 260 - (now - lastProbeDraw));
  }
  setText('budget-note', budgetNote());
}

/**
 * What the scrubbing budget buys; once full, the history says it has thinned the older frames
 * (the time slider still reaches back to the start). A budget under 3 frames keeps the newest.
 */
function budgetNote(): string {
  const first = history.at(0);
  if (run && first && history.length >= history.maxFrames && history.spacing === 0 && first.day > (run.startDay ?? 0) + 1e-9) {
    return `${history.describe()}; frames before day ${first.day.toFixed(1)} were let go to stay within it`;
  }
  return history.describe();
}

/**
 * The Hovmoller diagram again only when it changed: a new row at most five times a second (it
 * redraws every row), a new mark, latitude, size or start of the lines at once.
 */
function drawHovmollerIfChanged(): void {
  const c = $<HTMLCanvasElement>('hovmoller');
  const mark = viewIndex !== null ? info.shownDay : null;
  const rest = `${mark}|${$<HTMLSelectElement>('hov-lat').value}|${c.width}x${c.height}|${hovPanel.start?.lon},${hovPanel.start?.day}`;
  if (hovPanel.rows === hovShown.rows && rest === hovShown.rest) return;
  const drawNow = () => {
    if (hovTimer) clearTimeout(hovTimer);
    hovTimer = null;
    lastHovDraw = performance.now();
    hovShown = { rows: hovPanel.rows, rest };
    hovPanel.draw();
  };
  const now = performance.now();
  if (rest !== hovShown.rest || now - lastHovDraw >= 200) drawNow();
  else if (!hovTimer) hovTimer = setTimeout(drawNow, 210 - (now - lastHovDraw));
}

function currentRange(kind: 'diverging' | 'sequential', fresh: boolean): Range {
  const fixed = (document.querySelector<HTMLInputElement>('input[name="range-mode"]:checked')?.value ?? 'auto') === 'fixed';
  const lo = Number($<HTMLInputElement>('range-min').value);
  const hi = Number($<HTMLInputElement>('range-max').value);
  if (fixed) {
    const problem = checkFixedRange(lo, hi);
    setText('range-msg', problem ?? '');
    if (!problem) return { min: lo, max: hi };
  } else setText('range-msg', '');
  // The automatic range scans the field: once per new frame or field, not per redraw.
  if (fresh || !rangeState) rangeState = steadyRange(rangeState, autoRange(display, kind), kind);
  if (!fixed) {
    setValue('range-min', formatValue(rangeState.min));
    setValue('range-max', formatValue(rangeState.max));
  }
  return rangeState;
}

function setValue(id: string, value: string): void {
  const el = $<HTMLInputElement>(id);
  if (el.value !== value) el.value = value;
}

function updateSlider(f: KeptFrame): void {
  const s = $<HTMLInputElement>('time-slider');
  const max = String(Math.max(0, history.length - 1));
  if (s.max !== max) s.max = max;
  const value = String(viewIndex ?? history.length - 1);
  if (s.value !== value) s.value = value;
  const first = history.at(0);
  setText('scrub-day', first ? `kept: day ${first.day.toFixed(1)} to ${history.latest()!.day.toFixed(1)}` : '');
  const vt = `day ${f.day.toFixed(1)}`;
  if (s.getAttribute('aria-valuetext') !== vt) s.setAttribute('aria-valuetext', vt);
}

function showReadout(cell: { i: number; j: number } | null): void {
  const table = $<HTMLTableElement>('readout');
  const f = shownFrame();
  if (!run || !f || !cell) {
    table.replaceChildren();
    return;
  }
  const g = run.grid;
  const k = cell.j * g.nx + cell.i;
  const rows: Array<[string, string]> = [
    ['Longitude', lonLabel(g.lon[cell.i])],
    ['Latitude', latLabel(g.lat[cell.j])],
    ['Day', f.day.toFixed(2)],
  ];
  if (!g.ocean[k]) rows.push(['', 'land']);
  else for (const d of availableDisplays(run.fields)) rows.push([`${d.label}`, `${formatValue(displayAt(d.key, f.fields, layerThickness, k))} ${d.units}`]);
  table.replaceChildren(
    ...rows.map(([a, b]) => {
      const tr = document.createElement('tr');
      const th = document.createElement('th');
      th.textContent = a;
      const td = document.createElement('td');
      td.textContent = b;
      tr.append(th, td);
      return tr;
    }),
  );
}

function layoutMap(): void {
  const host = $('map-stack');
  map.layout(host.clientWidth || 600, Math.max(220, window.innerHeight * 0.55));
  windPanel.layout();
}

// ---- map interaction: pointer, click, keyboard ----
const glCanvas = $<HTMLCanvasElement>('map-gl');
glCanvas.addEventListener('pointermove', (ev) => {
  hover = map.cellAtPixel(ev.offsetX, ev.offsetY);
  showReadout(hover ?? cursor);
});
glCanvas.addEventListener('pointerleave', () => {
  hover = null;
  showReadout(cursor);
});
glCanvas.addEventListener('click', (ev) => {
  const c = map.cellAtPixel(ev.offsetX, ev.offsetY);
  if (!c) return;
  cursor = c;
  const mode = document.querySelector<HTMLInputElement>('input[name="click-mode"]:checked')?.value;
  if (mode === 'probe') addProbeAt(c);
  queueDraw(true);
});
glCanvas.addEventListener('keydown', (ev) => {
  if (!run) return;
  const g = run.grid;
  const c = cursor ?? { i: Math.floor(g.nx / 2), j: Math.floor(g.ny / 2) };
  const step = ev.shiftKey ? 5 : 1;
  const moves: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, step], ArrowDown: [0, -step] };
  if (moves[ev.key]) {
    const [di, dj] = moves[ev.key];
    cursor = { i: Math.min(g.nx - 1, Math.max(0, c.i + di)), j: Math.min(g.ny - 1, Math.max(0, c.j + dj)) };
    ev.preventDefault();
    queueDraw(false);
  } else if (ev.key === 'Enter' || ev.key === 'p') {
    cursor = c;
    addProbeAt(c);
    ev.preventDefault();
    queueDraw(true);
  }
});

function addProbeAt(c: { i: number; j: number }): void {
  if (!run) return;
  const g = run.grid;
  const k = c.j * g.nx + c.i;
  if (!g.ocean[k]) {
    message('A probe must sit over the ocean; that cell is land.', 'info');
    return;
  }
  probes.addPageProbe(g.lon[c.i], g.lat[c.j], k);
  // Start its series with the frames still kept, oldest first.
  const p = probes.probes[probes.probes.length - 1];
  for (let n = 0; n < history.length; n++) {
    const f = history.at(n)!;
    p.days.push(f.day);
    for (const name of run.fields as FieldName[]) p.values[name]!.push(f.fields[name] ? f.fields[name]![k] : NaN);
  }
  probePanel.renderList();
}

// ---- controls ----
$('btn-run').addEventListener('click', () => {
  viewIndex = null;
  void engine.start();
});
$('btn-pause').addEventListener('click', () => void engine.pause());
$('btn-step').addEventListener('click', () => {
  viewIndex = null;
  void engine.stepOutput();
});
$<HTMLSelectElement>('speed').addEventListener('change', (ev) => {
  const v = (ev.target as HTMLSelectElement).value;
  void engine.setSpeed(v === 'max' ? 'max' : Number(v));
});
$('btn-reset').addEventListener('click', async () => {
  if (!run) return;
  clearMessages();
  const same = run;
  loading = true;
  early.length = 0;
  try {
    await engine.stop();
  } finally {
    loading = false;
  }
  startRun(same);
  for (const f of early.splice(0)) onFrame(f);
});
$('btn-apply').addEventListener('click', async () => {
  if (!panel.lastCheck.valid) return;
  clearMessages();
  if (await loadIntoEngine(panel.text(), panel.fileName)) panel.commit();
});
$('btn-revert').addEventListener('click', () => panel.revert());
$<HTMLSelectElement>('field-pick').addEventListener('change', (ev) => {
  fieldKey = (ev.target as HTMLSelectElement).value as DisplayKey;
  rangeState = null;
  queueDraw(false);
});
$<HTMLSelectElement>('probe-field').addEventListener('change', (ev) => {
  probePanel.key = (ev.target as HTMLSelectElement).value as DisplayKey;
  queueDraw(true);
});
for (const id of ['show-currents', 'show-wind', 'range-min', 'range-max']) $(id).addEventListener('input', () => queueDraw(false));
for (const r of document.querySelectorAll('input[name="range-mode"]')) r.addEventListener('change', () => {
  rangeState = null;
  queueDraw(false);
});
// Another latitude: the engine samples it from now on; the days before come from the kept frames.
async function addHovmollerLatitude(): Promise<void> {
  if (!run) return;
  const input = $<HTMLInputElement>('hov-lat-other');
  const lat = Number(input.value);
  if (input.value.trim() === '' || !Number.isFinite(lat)) {
    message('Hovmoller latitude: type a latitude in degrees north, e.g. 4 or -3.5');
    return;
  }
  const r = await engine.addSection(lat);
  if (!r.ok) {
    message(`Hovmoller latitude: ${r.message}`);
    return;
  }
  const g = run.grid;
  const j = Math.min(g.ny - 1, Math.max(0, Math.round((r.rowLat - g.latSouth) / g.dLat - 0.5)));
  const backfill: Array<{ day: number; values: Float32Array }> = [];
  for (let n = 0; n < history.length; n++) {
    const f = history.at(n);
    const h = f?.fields.h_anom;
    if (f && h) backfill.push({ day: f.day, values: h.slice(j * g.nx, (j + 1) * g.nx) });
  }
  if (r.index >= hov.lats.length || hov.at(r.index).length === 0) hov.addLatitude(r.index, r.rowLat, backfill);
  // Kept with the run, so that stop-and-reset shows it again (the engine keeps sampling it).
  if (r.index >= run.hovmollerLats.length) run.hovmollerLats.push(r.rowLat);
  const sel = $<HTMLSelectElement>('hov-lat');
  if (r.index >= sel.options.length) sel.add(new Option(latLabel(r.rowLat), String(r.index)));
  sel.value = String(r.index);
  hovPanel.setLatitude(r.index);
  if (backfill.length && history.at(0) && history.at(0)!.day > run.startDay! + 1e-9) {
    message(`Hovmoller at ${latLabel(r.rowLat)}: days before ${history.at(0)!.day.toFixed(1)} were no longer kept, so the diagram starts there`, 'info');
  }
  queueDraw(false);
}
$('btn-hov-lat').addEventListener('click', () => void addHovmollerLatitude());
$<HTMLInputElement>('hov-lat-other').addEventListener('keydown', (ev) => {
  if (ev.key === 'Enter') void addHovmollerLatitude();
});
$<HTMLSelectElement>('hov-lat').addEventListener('change', (ev) => {
  hovPanel.setLatitude(Number((ev.target as HTMLSelectElement).value));
  queueDraw(false);
});
$<HTMLInputElement>('time-slider').addEventListener('input', (ev) => {
  const i = Number((ev.target as HTMLInputElement).value);
  viewIndex = i >= history.length - 1 ? null : i;
  queueDraw(false);
});
$('btn-latest').addEventListener('click', () => {
  viewIndex = null;
  queueDraw(false);
});
$<HTMLSelectElement>('budget').addEventListener('change', (ev) => {
  history.setBudget(Number((ev.target as HTMLSelectElement).value) * 1e6);
  if (viewIndex !== null && viewIndex >= history.length) viewIndex = null;
  queueDraw(false);
});
window.addEventListener('resize', () => {
  layoutMap();
  queueDraw(true);
});

// Scenario choice, file and drag-and-drop.
const pickScenario = $<HTMLSelectElement>('scenario-pick');
pickScenario.replaceChildren(...shipped.map((s) => new Option(`${String(s.json.name ?? s.file)} (${s.file})`, s.file)));
pickScenario.addEventListener('change', () => {
  const s = shipped.find((x) => x.file === pickScenario.value);
  if (s) void openText(JSON.stringify(s.json, null, 2), s.file);
});
$<HTMLInputElement>('scenario-file').addEventListener('change', async (ev) => {
  const input = ev.target as HTMLInputElement;
  const file = input.files?.[0];
  if (file) await openText(await file.text(), file.name);
  input.value = '';
});
document.addEventListener('dragover', (ev) => {
  ev.preventDefault();
  document.body.classList.add('dropping');
});
document.addEventListener('dragleave', (ev) => {
  if (ev.target === document.documentElement || ev.target === document.body) document.body.classList.remove('dropping');
});
document.addEventListener('drop', async (ev) => {
  ev.preventDefault();
  document.body.classList.remove('dropping');
  const file = ev.dataTransfer?.files?.[0];
  if (file) await openText(await file.text(), file.name);
});

// PNG export: the map with its overlay, the colour bar, the Hovmoller diagram and the probe chart.
$('btn-png').addEventListener('click', () => {
  const parts = [map.compose(), $<HTMLCanvasElement>('colour-bar'), $<HTMLCanvasElement>('hovmoller'), probePanel.canvas()].filter((c): c is HTMLCanvasElement => c !== null);
  const title = `${run?.name ?? 'Pycno'}, ${displayField(fieldKey).label}, day ${info.shownDay.toFixed(1)}`;
  const w = Math.max(...parts.map((p) => p.width));
  const h = 24 + parts.reduce((s, p) => s + p.height + 8, 0);
  const out = document.createElement('canvas');
  out.width = w;
  out.height = h;
  const ctx = out.getContext('2d')!;
  ctx.fillStyle = '#fff';
  ctx.fillRect(0, 0, w, h);
  ctx.fillStyle = '#000';
  ctx.font = '14px system-ui, sans-serif';
  ctx.fillText(title, 8, 17);
  let y = 24;
  for (const p of parts) {
    ctx.drawImage(p, 0, y);
    y += p.height + 8;
  }
  out.toBlob((blob) => {
    if (!blob) return;
    const a = document.createElement('a');
    a.href = URL.createObjectURL(blob);
    a.download = `pycno-day${Math.round(info.shownDay)}.png`;
    a.click();
    setTimeout(() => URL.revokeObjectURL(a.href), 5000);
  }, 'image/png');
});

// Start with the default scenario ready to run.
onStatus('empty');
if (shipped.length) void openText(JSON.stringify(shipped[0].json, null, 2), shipped[0].file);
else message('No shipped scenarios were found; open a scenario file.', 'info');
