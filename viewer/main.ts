// Pycno's page: makes its parts and wires them. The engine runs in a worker; frames arrive with
// transferred buffers; the page keeps the latest (and some history for the time slider) and draws
// at most once per animation frame, so stale frames are simply skipped. What each part does lives
// in viewer/page/: the shared state, the draw loop, a run's lifecycle, the inputs and controls,
// opening scenarios, PNG export, the messages.

import { connectEngine, NoWorkerError } from './engine-client.ts';
import { LibraryPage } from './library-panel/library-page.ts';
import { HovmollerPanel } from './panels/hovmoller.ts';
import { ProbePanel } from './panels/probes.ts';
import { RunTotals } from './panels/run-totals.ts';
import { CoupledPanel } from './panels/coupled-panel.ts';
import { ScenarioPanel } from './panels/scenario-panel.ts';
import { lonLabel } from './render/geo.ts';
import { NoWebGLError } from './render/map-gl.ts';
import { MapView } from './render/map-view.ts';
import { FrameHistory } from './state/frame-history.ts';
import { HovmollerStore } from './state/hovmoller-store.ts';
import { ProbeStore } from './state/probe-store.ts';
import { fieldChecksum } from './wind/checksum.ts';
import { WindPanel } from './wind/wind-panel.ts';
import { wireControls } from './page/controls.ts';
import { $ } from './page/dom.ts';
import { DrawLoop } from './page/draw-loop.ts';
import { wireHelp } from './page/help.ts';
import { wireMapInput } from './page/map-input.ts';
import { Notices } from './page/notices.ts';
import type { Page } from './page/page.ts';
import { publishPageInfo } from './page/page-info.ts';
import { exportPng } from './page/png-export.ts';
import { RunLifecycle } from './page/run-lifecycle.ts';
import { ScenarioOpener, shippedScenarios } from './page/scenario-open.ts';
import { newPageState } from './page/state.ts';

const info = publishPageInfo();
const notices = new Notices(info);
const state = newPageState();

function startMap(): MapView {
  try {
    const map = new MapView($<HTMLCanvasElement>('map-gl'), $<HTMLCanvasElement>('map-overlay'), {
      forceBytes: new URLSearchParams(location.search).has('bytes'),
    });
    info.floatTextures = map.gl.floatTextures;
    info.gpu = map.counts;
    info.arrows = () => map.referenceArrows();
    return map;
  } catch (e) {
    if (e instanceof NoWebGLError) {
      notices.noGo(
        'This browser gives the page no WebGL',
        'Pycno draws the ocean with WebGL. Turn on hardware acceleration (or WebGL) in the browser settings, or use another browser, then reload. Nothing was run.',
      );
    } else if (e instanceof EvalError) {
      notices.noGo(
        "The page's security policy stops its drawing library",
        "The map is drawn with regl, which builds its WebGL programs at run time and so needs the Content-Security-Policy to allow 'unsafe-eval' for scripts (see docs/reliability.md). Serve the page with the policy of vite.config.ts, then reload. Nothing was run.",
      );
    } else notices.noGo('The map could not start', String(e));
    throw e;
  }
}
const map = startMap();

const history = new FrameHistory(128e6);
info.kept = () => ({
  frames: history.length,
  bytes: history.bytes,
  budget: history.budgetBytes,
  oldestDay: history.at(0)?.day ?? null,
});
const hov = new HovmollerStore();
const probes = new ProbeStore();
const totals = new RunTotals($('totals'));
const coupledPanel = new CoupledPanel($('coupled-panel'));
const panel = new ScenarioPanel(
  $<HTMLFormElement>('params'),
  $('derived'),
  $<HTMLUListElement>('other-issues'),
  $('restart-note'),
  $<HTMLButtonElement>('btn-apply'),
);
const hovPanel = new HovmollerPanel($<HTMLCanvasElement>('hovmoller'), hov, (s) => {
  $('hov-start').textContent = `from ${lonLabel(s.lon)}, day ${s.day.toFixed(1)}`;
});
// The wind designer: edits the wind of the scenario panel's copy; runs only through its Apply.
const windPanel = new WindPanel($('wind-panel'), {
  map,
  stack: $('map-stack'),
  colourBar: $<HTMLCanvasElement>('colour-bar'),
  baseScenario: () => panel.edited,
  openedScenario: () => panel.opened,
  valuesEdited: () => panel.changedFrom(panel.opened),
  fileName: () => panel.fileName,
  // Apply and run: the designed wind with the panel's values from day 0, and the run goes at once.
  apply: async (text, fileName) => {
    notices.clear();
    if (!(await runs.load(text, fileName))) return false;
    // What runs becomes the panel's base; values typed meanwhile stay in their boxes.
    panel.ranWith(JSON.parse(text));
    state.viewIndex = null;
    void engine.start();
    return true;
  },
  redraw: () => drawing.queue(false),
  message: (text, kind) => notices.message(text, kind),
});
info.hAnomChecksum = () => {
  const f = history.latest();
  return f?.fields.h_anom ? { day: f.day, step: f.step, checksum: fieldChecksum(f.fields.h_anom) } : null;
};
const probePanel = new ProbePanel($('probe-chart'), $<HTMLUListElement>('probe-list'), probes, (id) => {
  probes.remove(id);
  probePanel.renderList();
  drawing.queue(true);
});

function startEngine() {
  try {
    return connectEngine({
      frame: (f) => runs.onFrame(f),
      status: (s) => runs.onStatus(s),
      error: (e) => runs.onEngineError(e),
      lost: () => runs.onEngineLost(),
    });
  } catch (e) {
    if (e instanceof NoWorkerError)
      notices.noGo(
        'This browser cannot run the model',
        `Pycno runs the model in a Web Worker (a module worker), which this browser did not start: ${e.message}. Use a current Chromium, Firefox or Safari.`,
      );
    throw e;
  }
}
const engine = startEngine();
info.stateChecksum = () => engine.stateChecksum();

// The run library and the comparison (viewer/library-panel/, viewer/compare/): it keeps the run on
// screen from the engine's samples, so it sees every sample before anything else here.
const library = new LibraryPage($('library-panel'), $('compare-panel'), {
  setSampleFields: (every) => engine.setSampleFields(every),
  openScenario: (text, fileName) => opener.open(text, fileName),
  message: (text, kind) => notices.message(text, kind),
  outputEveryDays: () => state.run?.outputEveryDays ?? 1,
});

const page: Page = {
  state,
  info,
  notices,
  map,
  history,
  hov,
  probes,
  totals,
  coupledPanel,
  panel,
  hovPanel,
  probePanel,
  windPanel,
  library,
  engine,
};
const drawing = new DrawLoop(page);
/** The map and the Hovmoller diagram fill their columns; the map's height follows the basin. */
function layoutMap(): void {
  const host = $('map-stack');
  map.layout(host.clientWidth || 600, Math.max(200, window.innerHeight * 0.5));
  const hov = $<HTMLCanvasElement>('hovmoller');
  const w = Math.round($('hov-host').clientWidth);
  const h = Math.round(Math.min(340, Math.max(200, window.innerHeight * 0.36)));
  if (w > 100 && (hov.width !== w || hov.height !== h)) {
    hov.width = w;
    hov.height = h;
  }
  windPanel.layout();
}
const runs = new RunLifecycle(page, drawing, layoutMap);
const shipped = shippedScenarios();
const opener = new ScenarioOpener(page, runs, shipped);

wireMapInput(page, drawing);
wireControls(page, runs, drawing, layoutMap);
opener.wire();
$('btn-png').addEventListener('click', () => exportPng(page));
wireHelp();

// Start with the default scenario ready to run.
runs.onStatus('empty');
if (shipped.length) void opener.openShipped(shipped[0]);
else notices.message('No shipped scenarios were found; open a scenario file.', 'info');
