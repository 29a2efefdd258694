// A run's life on the page: loading a scenario into the engine, setting the page up for the run
// it answers with, taking its frames, following its status, resetting it, and what happens when
// the engine's worker is gone.

import type { EngineError, EngineStatus, Frame, LoadedScenario } from '../../worker/protocol.ts';
import { EngineLostError } from '../engine-client.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { showEngineLost } from '../panels/engine-lost.ts';
import { latLabel, lonLabel } from '../render/geo.ts';
import { pulseStart } from '../state/characteristics.ts';
import { availableDisplays, type DisplayKey } from '../state/display-fields.ts';
import { $ } from './dom.ts';
import type { DrawLoop } from './draw-loop.ts';
import type { Page } from './page.ts';

const STATUS_TEXT: Record<EngineStatus, string> = {
  running: 'running',
  paused: 'paused',
  finished: 'run finished',
  failed: 'stopped by an error',
  ready: 'ready to run',
  empty: 'no scenario',
};

export class RunLifecycle {
  constructor(
    private readonly page: Page,
    private readonly drawing: DrawLoop,
    /** Lay the map out for the window and the grid. */
    private readonly layoutMap: () => void,
  ) {}

  // ---- engine events ----
  onFrame(f: Frame): void {
    const { state, info, library, hov, probes, totals, history } = this.page;
    // The first frame of a scenario may come before load() answers: hold it until the run is set up.
    if (state.loading) {
      state.early.push(f);
      return;
    }
    info.framesReceived++;
    info.lastDay = f.day;
    for (const s of f.samples) {
      library.sample(s);
      hov.add(s.day, s.hovmoller);
      probes.addSample(s.day, s.probeValues);
      // Page probes from every sample that carries its maps, so they miss no output interval.
      if (s.fields) probes.addFrame(s.day, s.fields);
    }
    probes.addFrame(f.day, f.fields);
    totals.add(
      f.samples.map((s) => s.integrals),
      f.integrals,
    );
    this.page.coupledPanel.addSamples(f.samples);
    if (state.run?.derived.answering) this.page.panel.setCoupledMode(this.page.coupledPanel.shortMode());
    history.push({ day: f.day, step: f.step, fields: f.fields });
    this.drawing.queue(false);
  }

  onStatus(s: EngineStatus): void {
    const { state, info } = this.page;
    state.status = s;
    info.status = s;
    const st = $('status');
    st.textContent = STATUS_TEXT[s];
    st.classList.toggle('failed', s === 'failed');
    const has = state.run !== null && s !== 'empty';
    $<HTMLButtonElement>('btn-run').disabled = !has || s === 'running' || s === 'finished' || s === 'failed';
    $<HTMLButtonElement>('btn-pause').disabled = s !== 'running';
    $<HTMLButtonElement>('btn-step').disabled = !has || s === 'finished' || s === 'failed';
    $<HTMLButtonElement>('btn-reset').disabled = state.run === null;
  }

  onEngineError(e: EngineError): void {
    // The engine's own text, word for word as the command line prints it.
    this.page.notices.message(e.message);
  }

  /** The worker is gone: say so, keep everything on screen (it can still be saved), offer a new engine. */
  onEngineLost(): void {
    const { state, info, engine, panel } = this.page;
    const day = state.run ? info.lastDay : null;
    this.onStatus('failed');
    $('status').textContent = 'engine stopped';
    $<HTMLButtonElement>('btn-reset').disabled = true;
    showEngineLost($('messages'), {
      day,
      restart: async () => {
        engine.restart();
        const again = state.run;
        const ok = again
          ? await this.load(again.scenarioJson, panel.fileName)
          : await this.load(panel.text(), panel.fileName);
        if (!ok) throw new Error('the scenario did not load in the new engine (see the message above)');
      },
    });
  }

  // ---- loading ----
  /** Validate-and-run a scenario text in the engine; true when the engine took it. */
  async load(text: string, fileName: string): Promise<boolean> {
    const { state, engine, notices } = this.page;
    state.loading = true;
    state.early.length = 0;
    try {
      const r = await engine.load(text, fileName);
      // The speed picker's choice holds for every run, the first included.
      const speed = $<HTMLSelectElement>('speed').value;
      await engine.setSpeed(speed === 'max' ? 'max' : Number(speed));
      state.loading = false;
      this.start(r);
      this.takeEarlyFrames();
      return true;
    } catch (e) {
      state.loading = false;
      state.early.length = 0;
      const err = e as EngineError;
      // A lost worker has its own notice, with the restart button.
      if (!(e instanceof EngineLostError)) notices.message(err.message ?? String(e));
      // The engine holds no run now; the map keeps the last picture but the controls wait for a
      // scenario. Nothing ran, so the status says the scenario was not loaded, not that a run stopped.
      state.run = null;
      this.onStatus('empty');
      $('status').textContent = 'scenario not loaded (see the message)';
      return false;
    }
  }

  /** Stop the run and show it again from its start (the engine sends its day-0 frame). */
  async reset(): Promise<void> {
    const { state, engine, notices } = this.page;
    if (!state.run) return;
    notices.clear();
    const same = state.run;
    state.loading = true;
    state.early.length = 0;
    try {
      await engine.stop();
    } finally {
      state.loading = false;
    }
    this.start(same);
    this.takeEarlyFrames();
  }

  private takeEarlyFrames(): void {
    for (const f of this.page.state.early.splice(0)) this.onFrame(f);
  }

  /** Set the page up for a run the engine has loaded. */
  private start(r: LoadedScenario): void {
    const { state, info, library, probePanel, history, hov, probes, map, hovPanel, totals } = this.page;
    state.run = r;
    library.runStarted(r);
    probePanel.layerThickness = r.physics.layerThickness;
    history.clear();
    this.drawing.forget();
    hov.reset(r.hovmollerLats);
    probes.reset(r.fields, r.probes);
    state.viewIndex = null;
    this.drawing.rescanRange();
    state.cursor = null;
    map.setGrid(r.grid);
    this.layoutMap();
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
    state.fieldKey = pick.value as DisplayKey;
    probePanel.key = probePick.value as DisplayKey;
    $<HTMLSelectElement>('hov-lat').replaceChildren(
      ...r.hovmollerLats.map((lat, n) => new Option(latLabel(lat), String(n))),
    );
    hovPanel.setRun(
      { lonWest: r.grid.lonWest, lonEast: r.grid.lonEast, days: r.days, nx: r.grid.nx },
      r.physics.waveSpeed,
      r.physics.earthRadius,
      pulseStart(r.scenarioJson),
    );
    $('hov-start').textContent = hovPanel.start
      ? `from ${lonLabel(hovPanel.start.lon)}, day ${hovPanel.start.day.toFixed(1)}`
      : '';
    probePanel.renderList();
    const d = r.derived;
    this.page.coupledPanel.setRun(r.grid, r.fields, d.answering !== null);
    this.page.panel.setCoupledMode(this.page.coupledPanel.shortMode());
    totals.setRun(
      [
        ['dt', `${formatValue(r.dt)} s`],
        ['c', `${formatValue(r.physics.waveSpeed)} m/s`],
        ['Kelvin crossing', `${formatValue(d.kelvinCrossingDays)} days`],
      ],
      r.physics.dynamics,
    );
    info.ready = true;
    this.onStatus(state.status);
    this.drawing.queue(true);
  }
}
