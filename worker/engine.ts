// The engine: one class that loads a scenario, runs the model in slices, takes an output sample
// every output interval and publishes frames at a bounded rate. Both hosts use it: the browser
// worker (browser-entry.ts) and Node (node-entry.ts, the command line). It has no DOM and no
// Worker API; the clock and the yield between slices come from an EngineHost.

import { DAY } from '../model/config.ts';
import { centredField, type FieldName } from '../model/diagnostics/fields.ts';
import { BlowUpError, InputError } from '../model/errors.ts';
import type { Model } from '../model/model.ts';
import type { StripHost } from '../model/parallel/team.ts';
import type { ThreadsOption } from '../model/parallel/threads.ts';
import type { OutputRecord } from '../model/io/run-output.ts';
import { NetcdfReadError } from '../model/io/netcdf-read.ts';
import type { State } from '../model/state.ts';
import type { DrawnBurst } from '../model/forcing/bursts.ts';
import { derivedNumbers } from '../model/scenario/derived.ts';
import {
  buildPrepared,
  loadInputs,
  mapReader,
  parseScenario,
  type InputReader,
  type ParsedScenario,
  type PreparedInputs,
} from '../model/scenario/load-inputs.ts';
import { realHost, SlicePlanner, type EngineHost } from './pacing.ts';
import type { EngineError, EngineReport, EngineStatus, Frame, GridInfo, LoadedScenario, LoadResult, OutputSample } from './protocol.ts';

export type FrameListener = (frame: Frame, transfer: ArrayBuffer[]) => void;
export type StatusListener = (report: EngineReport) => void;

/** Receives every output interval in full (the command line writes it to NetCDF); awaited. */
export type OutputRecorder = (record: OutputRecord) => void | Promise<void>;

export interface EngineOptions {
  host?: EngineHost;
  /** Upper bound on frames per wall-clock second (default 30). */
  maxFramesPerSecond?: number;
  /** Target duration of one slice of steps, ms (default 15). */
  sliceMs?: number;
  /**
   * Strip workers for the linear step (model/parallel/): the host that starts them, or null where
   * there is none (a page that is not cross-origin isolated), and the default thread count.
   */
  strips?: { host: StripHost | null; threads: ThreadsOption; hostMissing?: string };
}

export interface LoadOptions {
  /** --set style overrides, "path=value". */
  sets?: readonly string[];
  /** Files the host already holds, keyed by path resolved against the scenario file name. */
  files?: ReadonlyMap<string, Uint8Array | string>;
  /** A ready starting state (skips reading the restart or running the spin-up). */
  startState?: State;
  /** Reads files by resolved path (Node: the file system); used when `files` lacks one. */
  reader?: InputReader;
  onSpinup?: (file: string, day: number, endDay: number) => void;
  /** Threads for the linear step of this run (overrides the engine's default). */
  threads?: ThreadsOption;
}

/** The text a user sees for any failure, the same in the page and the command line. */
export function toEngineError(e: unknown): EngineError {
  if (e instanceof BlowUpError) return { kind: 'blow-up', message: e.message };
  if (e instanceof InputError || e instanceof NetcdfReadError) return { kind: 'input', message: e.message };
  const msg = e instanceof Error ? e.message : String(e);
  return { kind: 'internal', message: `internal error: ${msg}` };
}

interface Loaded {
  parsed: ParsedScenario;
  inputs: PreparedInputs;
  info: LoadedScenario;
  model: Model;
  bursts: DrawnBurst[];
  fields: FieldName[];
  /** model.state.steps when the run started, and when it ends. */
  firstStep: number;
  endStep: number;
  hovRows: number[];
  probeCells: Array<{ i: number; j: number }>;
}

/** Frames are spaced at least this many times their own cost apart (at most a fifth of the time). */
const FRAME_SHARE = 5;

export class Engine {
  private readonly host: EngineHost;
  private readonly frameIntervalMs: number;
  private readonly planner: SlicePlanner;
  private readonly frameListeners = new Set<FrameListener>();
  private readonly statusListeners = new Set<StatusListener>();
  private recorder: OutputRecorder | null = null;
  /** Samples number k with k % sampleFieldsEvery === 0 carry the full fields; 0: none. */
  private sampleFieldsEvery = 0;
  private run: Loaded | null = null;
  /** Hovmoller latitudes added while a scenario is loaded; kept across stop-and-reset, cleared by load. */
  private extraLats: number[] = [];
  private state: EngineStatus = 'empty';
  private error: EngineError | null = null;
  private speed: number | 'max' = 'max';
  /** Output samples taken; the next one is number `samplesTaken`. */
  private samplesTaken = 0;
  private pending: OutputSample[] = [];
  private lastFrameAt = -Infinity;
  /** Wall-clock cost of building and posting a frame, smoothed (ms). */
  private frameCostMs = 0;
  private pauseAtSample = false;
  /** Each run of the loop has a token; a newer start or a load retires the old loop. */
  private loopToken = 0;
  private loopDone: Promise<void> = Promise.resolve();
  private anchorWall = 0;
  private anchorDay = 0;
  private readonly strips: NonNullable<EngineOptions['strips']> | null;
  /** The thread count asked for the loaded run (kept for stop-and-reset). */
  private threadsAsked: ThreadsOption = 1;

  constructor(options: EngineOptions = {}) {
    this.strips = options.strips ?? null;
    this.host = options.host ?? realHost();
    this.frameIntervalMs = 1000 / (options.maxFramesPerSecond ?? 30);
    this.planner = new SlicePlanner(options.sliceMs ?? 15);
  }

  // --- listeners ------------------------------------------------------------------------------

  /** Frames as they are published; returns an unsubscribe function. */
  onFrame(listener: FrameListener): () => void {
    this.frameListeners.add(listener);
    return () => this.frameListeners.delete(listener);
  }

  onStatus(listener: StatusListener): () => void {
    this.statusListeners.add(listener);
    return () => this.statusListeners.delete(listener);
  }

  setRecorder(recorder: OutputRecorder | null): void {
    this.recorder = recorder;
  }

  /**
   * Put the full fields into every `every`-th output sample (counted from the run's first sample,
   * which is included); 0 stops it. A listener that keeps the run (the page's run library) needs
   * fields at exact output records, which frames do not promise. Kept across loads and resets.
   */
  setSampleFields(every: number): void {
    if (!Number.isInteger(every) || every < 0) throw new InputError(`'every' must be a whole number >= 0 (got ${every})`, 'setSampleFields');
    this.sampleFieldsEvery = every;
  }

  // --- loading --------------------------------------------------------------------------------

  /** Validate and build a scenario. A running loop is stopped first. Never throws. */
  async load(text: string, fileName: string, options: LoadOptions = {}): Promise<LoadResult> {
    await this.halt();
    await this.run?.model.close();
    this.run = null;
    this.extraLats = [];
    this.samplesTaken = 0;
    this.pending = [];
    this.error = null;
    try {
      const parsed = parseScenario(text, fileName, options.sets ?? []);
      let inputs: PreparedInputs;
      if (options.startState) {
        inputs = { files: new Map(), startState: options.startState, notes: ['start from a given state'] };
        const files = await loadInputs({ ...parsed, resolved: { ...parsed.resolved, initial: { kind: 'rest' } } }, this.readerFor(options));
        inputs.files = files.files;
      } else {
        inputs = await loadInputs(parsed, this.readerFor(options), { onSpinup: options.onSpinup });
      }
      this.run = this.prepare(parsed, inputs);
      this.threadsAsked = options.threads ?? this.strips?.threads ?? 1;
      await this.startThreads(this.run);
      this.state = 'ready';
      this.report();
      return { ok: true, scenario: this.run.info };
    } catch (e) {
      this.state = 'empty';
      this.error = toEngineError(e);
      this.report();
      return { ok: false, error: this.error };
    }
  }

  /**
   * Start the run's strip workers as asked, and say in the run's notes how the step runs. A host
   * without strips, or workers that fail to start, leave the run on this one thread.
   */
  private async startThreads(run: Loaded): Promise<void> {
    const asked = this.threadsAsked;
    const model = run.model;
    let note: string;
    if (asked === 1) return;
    if (!this.strips?.host) {
      note = `threads ${asked}: ${this.strips?.hostMissing ?? 'this host cannot start strip workers'}; the step runs on one thread`;
    } else {
      try {
        const choice = await model.startThreads(this.strips.host, { threads: asked });
        const rows = model.stripKernel === 'wasm' ? 'WebAssembly SIMD' : 'TypeScript';
        const on = `${model.physics.mode} step on ${model.threads} threads (latitude strips), ${rows}`;
        note = choice.notice ?? on;
        if (choice.notice && model.threads > 1) note += `; ${on}`;
      } catch (e) {
        note = `threads ${asked}: the strip workers did not start (${e instanceof Error ? e.message : String(e)}); the step runs on one thread`;
      }
    }
    run.info.notes = [...(run.info.notes ?? []), note];
  }

  private readerFor(options: LoadOptions): InputReader {
    const fromMap = options.files ? mapReader(options.files) : null;
    const reader = options.reader;
    return async (path) => {
      if (fromMap && options.files!.has(path)) return fromMap(path);
      if (reader) return reader(path);
      throw new Error('the file was not provided (give its contents with the scenario)');
    };
  }

  private prepare(parsed: ParsedScenario, inputs: PreparedInputs): Loaded {
    const built = buildPrepared(parsed, inputs);
    const { model } = built;
    const r = parsed.resolved;
    const grid = model.grid;
    const fields = [...r.outputFields] as FieldName[];
    const firstStep = model.state.steps;
    const endStep = firstStep + model.clock.stepsFor(r.runSeconds);
    const lats = [...r.hovmollerLats, ...this.extraLats];
    const hovRows = lats.map((lat) => grid.nearestRow(lat));
    const probeCells = r.probes.map((p) => {
      const c = grid.cellAt(p.lon, p.lat);
      if (!c) throw new InputError(`probe '${p.name}' at ${p.lon}, ${p.lat} lies outside the basin`, `${parsed.fileName}: probes`);
      return c;
    });
    const ocean = new Uint8Array(grid.nx * grid.ny);
    for (let j = 0; j < grid.ny; j++) for (let i = 0; i < grid.nx; i++) ocean[j * grid.nx + i] = grid.ocean[grid.idx(i, j)];
    const gridInfo: GridInfo = {
      nx: grid.nx,
      ny: grid.ny,
      lonWest: grid.basin.lonWest,
      lonEast: grid.basin.lonEast,
      latSouth: grid.basin.latSouth,
      latNorth: grid.basin.latNorth,
      dLon: grid.dLon,
      dLat: grid.dLat,
      lon: Float64Array.from(grid.lonCentre),
      lat: Float64Array.from(grid.latCentre),
      ocean,
    };
    const info: LoadedScenario = {
      name: r.name,
      description: r.description,
      scenarioJson: parsed.scenarioJson,
      grid: gridInfo,
      derived: derivedNumbers(r, grid),
      dynamics: model.physics.mode,
      dt: model.dt,
      days: r.days,
      outputEveryDays: r.outputEveryDays,
      fields,
      hovmollerLats: lats,
      probes: r.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat })),
      bursts: built.bursts,
      hovmollerRowLats: hovRows.map((j) => grid.latCentre[j]),
      startDay: model.day,
      notes: [...inputs.notes],
    };
    return { parsed, inputs, info, model, bursts: built.bursts, fields, firstStep, endStep, hovRows, probeCells };
  }

  // --- controls -------------------------------------------------------------------------------

  /** Run (or resume) until the end, a pause, a stop or a blow-up. Returns at once. */
  start(): void {
    if (!this.run || !(this.state === 'ready' || this.state === 'paused')) return;
    this.pauseAtSample = false;
    this.launch();
  }

  /** Stop stepping after the current slice; the latest frame is published. */
  pause(): void {
    if (this.state !== 'running') return;
    this.state = 'paused';
    this.report();
  }

  /** Run exactly to the next output sample, then pause. Resolves when paused (or ended). */
  async stepOutput(): Promise<EngineReport> {
    if (!this.run) return this.status();
    if (this.state === 'running') {
      this.pauseAtSample = true;
      await this.loopDone;
      return this.status();
    }
    if (this.state !== 'ready' && this.state !== 'paused') return this.status();
    this.pauseAtSample = true;
    this.launch();
    await this.loopDone;
    return this.status();
  }

  /** Cap the speed at `daysPerSecond` model days per wall-clock second, or run flat out. */
  setSpeed(daysPerSecond: number | 'max'): void {
    if (daysPerSecond !== 'max' && !(daysPerSecond > 0 && Number.isFinite(daysPerSecond))) return;
    this.speed = daysPerSecond;
    this.anchor();
    this.report();
  }

  /**
   * Sample one more Hovmoller latitude from the next output on (the page fills the earlier days
   * from the frames it kept). Returns its index in the samples' hovmoller rows, and the latitude
   * of the grid row actually sampled; a latitude already sampled returns its existing index.
   */
  addSection(lat: number): { ok: true; index: number; rowLat: number } | { ok: false; message: string } {
    const run = this.run;
    if (!run) return { ok: false, message: 'no scenario is loaded' };
    const g = run.model.grid;
    if (!Number.isFinite(lat) || lat < g.basin.latSouth || lat > g.basin.latNorth) {
      return { ok: false, message: `latitude ${lat} lies outside the basin (${g.basin.latSouth} to ${g.basin.latNorth})` };
    }
    const j = g.nearestRow(lat);
    const existing = run.hovRows.indexOf(j);
    if (existing >= 0) return { ok: true, index: existing, rowLat: g.latCentre[j] };
    this.extraLats.push(lat);
    run.hovRows.push(j);
    run.info.hovmollerLats.push(lat);
    run.info.hovmollerRowLats?.push(g.latCentre[j]);
    return { ok: true, index: run.hovRows.length - 1, rowLat: g.latCentre[j] };
  }

  /** End the run and go back to the loaded scenario's starting state (status 'ready'). */
  async stop(): Promise<EngineReport> {
    await this.halt();
    const run = this.run;
    if (run) {
      try {
        await run.model.close();
        this.run = this.prepare(run.parsed, run.inputs);
        await this.startThreads(this.run);
        this.samplesTaken = 0;
        this.pending = [];
        this.error = null;
        this.state = 'ready';
      } catch (e) {
        this.state = 'failed';
        this.error = toEngineError(e);
      }
    }
    this.report();
    return this.status();
  }

  /** Resolves when the loop is not running (after pause, end, stop or blow-up). */
  async idle(): Promise<EngineReport> {
    await this.loopDone;
    return this.status();
  }

  status(): EngineReport {
    const m = this.run?.model;
    return {
      status: this.state,
      day: m ? m.day : 0,
      step: m ? m.state.steps : 0,
      endDay: this.run ? this.run.info.startDay! + this.run.info.days : 0,
      speed: this.speed,
      error: this.error,
      samples: this.samplesTaken,
    };
  }

  /** A frame of the current state, fresh buffers, no samples (they go out with published frames). */
  currentFrame(): Frame | null {
    if (!this.run) return null;
    return this.makeFrame([], this.state === 'finished');
  }

  get loaded(): LoadedScenario | null {
    return this.run?.info ?? null;
  }

  /** The model of the loaded run (hosts read it for restarts and summaries; do not step it). */
  get model(): Model | null {
    return this.run?.model ?? null;
  }

  // --- the loop -------------------------------------------------------------------------------

  private launch(): void {
    this.state = 'running';
    this.error = null;
    this.anchor();
    const token = ++this.loopToken;
    this.report();
    this.loopDone = this.loop(token).catch((e) => {
      // A recorder or listener that throws ends the run as an internal failure.
      this.fail(e);
    });
  }

  private async halt(): Promise<void> {
    this.loopToken++;
    if (this.state === 'running') this.state = 'paused';
    await this.loopDone;
  }

  private anchor(): void {
    this.anchorWall = this.host.now();
    this.anchorDay = this.run ? this.run.model.day : 0;
  }

  /**
   * The step of the next record after step n: the end of the next whole output interval, counted
   * on the model's clock from day 0 (or from where a restart with another time step began), or the
   * run's end when that comes first, so the last interval may be shorter.
   */
  private nextRecordStep(n: number): number {
    const run = this.run!;
    return Math.min(run.model.clock.nextWholeInterval(n), run.endStep);
  }

  private async loop(token: number): Promise<void> {
    const run = this.run!;
    const { model, endStep } = run;
    const live = () => token === this.loopToken && this.state === 'running';
    if (this.samplesTaken === 0) {
      await this.sample();
      if (this.pauseAtSample) {
        // The initial sample is a step of its own when stepping from the start.
        this.pauseAtSample = false;
        this.state = 'paused';
        this.publish(false);
        this.report();
        return;
      }
    }
    while (live()) {
      const steps = model.state.steps;
      if (steps >= endStep) {
        this.state = 'finished';
        this.publish(true);
        this.report();
        return;
      }
      const nextSample = this.nextRecordStep(steps);
      let n = Math.min(this.planner.next(), endStep - steps, nextSample - steps);
      if (this.speed !== 'max') {
        const allowedDay = this.anchorDay + (this.speed * (this.host.now() - this.anchorWall)) / 1000;
        const ahead = Math.floor(((allowedDay - model.day) * DAY) / model.dt);
        if (ahead < 1) {
          // Ahead of the speed cap: wait (a frame may still be due) instead of spinning.
          this.maybePublish();
          const waitMs = Math.min(50, ((model.day - allowedDay) / this.speed) * 1000 + (model.dt / DAY / this.speed) * 1000);
          await this.host.sleep(Math.max(1, waitMs));
          continue;
        }
        n = Math.min(n, ahead);
      }
      const t0 = this.host.now();
      try {
        model.advance(n);
      } catch (e) {
        this.fail(e);
        return;
      }
      this.planner.measured(n, this.host.now() - t0);
      if (model.state.steps === nextSample) {
        await this.sample();
        if (this.pauseAtSample) {
          this.pauseAtSample = false;
          if (model.state.steps < endStep) {
            this.state = 'paused';
            this.publish(false);
            this.report();
            return;
          }
        }
      }
      if (model.state.steps >= endStep) continue;
      this.maybePublish();
      await this.host.sleep(0);
    }
    // Paused or retired: the listener gets the state it stopped at.
    if (token === this.loopToken && this.state === 'paused') this.publish(false);
  }

  private fail(e: unknown): void {
    this.state = 'failed';
    this.error = toEngineError(e);
    if (this.pending.length) this.publish(false);
    this.report();
  }

  private maybePublish(): void {
    // Frames may take at most 1/FRAME_SHARE of the time: on a big grid building the fields for the
    // page costs as much as stepping, and the run must not slow down to feed the display.
    const interval = Math.max(this.frameIntervalMs, FRAME_SHARE * this.frameCostMs);
    if (this.host.now() - this.lastFrameAt >= interval) this.publish(false);
  }

  /** Take output sample number samplesTaken: integrals, Hovmoller rows, probes; and the full record. */
  private async sample(): Promise<void> {
    const run = this.run!;
    const { model, fields } = run;
    // The model checks itself every few steps; a record (the last one included) is never written
    // from a state that has gone bad in between: the run fails here with the blow-up instead.
    model.checkHealth();
    const ctx = model.fieldContext();
    const nx = model.grid.nx;
    const rowCache = new Map<string, Float64Array>();
    const row = (f: FieldName, j: number) => {
      const key = `${f}:${j}`;
      let r = rowCache.get(key);
      if (!r) {
        r = new Float64Array(nx);
        centredField(f, ctx, r, { from: j, to: j + 1 });
        rowCache.set(key, r);
      }
      return r;
    };
    const hovmoller = run.hovRows.map((j) => Float32Array.from(row('h_anom', j)));
    const probeValues = run.probeCells.map(({ i, j }) => Float32Array.from(fields, (f) => row(f, j)[i]));
    const integrals = model.integrals();
    const sample: OutputSample = { day: model.day, step: model.state.steps, integrals, hovmoller, probeValues };
    const withFields = this.sampleFieldsEvery > 0 && this.samplesTaken % this.sampleFieldsEvery === 0 && this.frameListeners.size > 0;
    this.samplesTaken++;
    const full = (): Partial<Record<FieldName, Float32Array>> => {
      const out: Partial<Record<FieldName, Float32Array>> = {};
      for (const f of fields) out[f] = model.field(f, new Float32Array(nx * model.grid.ny)) as Float32Array;
      return out;
    };
    if (this.recorder) await this.recorder({ day: model.day, step: model.state.steps, fields: full(), integrals, hovmoller, probeValues });
    // Own arrays for the sample: the recorder may keep its record's.
    if (withFields) sample.fields = full();
    // Samples wait for the next frame only when someone listens.
    if (this.frameListeners.size > 0) this.pending.push(sample);
  }

  private makeFrame(samples: OutputSample[], finished: boolean): Frame {
    const { model, fields } = this.run!;
    const n = model.grid.nx * model.grid.ny;
    const out: Partial<Record<FieldName, Float32Array>> = {};
    for (const f of fields) out[f] = model.field(f, new Float32Array(n)) as Float32Array;
    return { day: model.day, step: model.state.steps, fields: out, integrals: model.integrals(), samples, finished };
  }

  private publish(finished: boolean): void {
    const start = this.host.now();
    this.lastFrameAt = start;
    if (this.frameListeners.size === 0) {
      this.pending = [];
      return;
    }
    const frame = this.makeFrame(this.pending, finished);
    this.pending = [];
    const listeners = [...this.frameListeners];
    listeners.forEach((l, k) => {
      // Each listener gets its own buffers when there are several: a transfer detaches them.
      const f = k === 0 ? frame : cloneFrame(frame);
      l(f, transferList(f));
    });
    const cost = this.host.now() - start;
    this.frameCostMs = this.frameCostMs === 0 ? cost : 0.8 * this.frameCostMs + 0.2 * cost;
  }

  private report(): void {
    const r = this.status();
    for (const l of this.statusListeners) l(r);
  }
}

/** The ArrayBuffers of a frame's typed arrays, for postMessage / Comlink.transfer. */
export function transferList(frame: Frame): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  for (const a of Object.values(frame.fields)) if (a) out.push(a.buffer as ArrayBuffer);
  for (const s of frame.samples) {
    for (const a of s.hovmoller) out.push(a.buffer as ArrayBuffer);
    for (const a of s.probeValues) out.push(a.buffer as ArrayBuffer);
    if (s.fields) for (const a of Object.values(s.fields)) if (a) out.push(a.buffer as ArrayBuffer);
  }
  return out;
}

function cloneFrame(f: Frame): Frame {
  const fields: Frame['fields'] = {};
  for (const [k, a] of Object.entries(f.fields)) fields[k as FieldName] = a!.slice();
  return {
    ...f,
    fields,
    integrals: { ...f.integrals },
    samples: f.samples.map((s) => ({
      ...s,
      integrals: { ...s.integrals },
      hovmoller: s.hovmoller.map((a) => a.slice()),
      probeValues: s.probeValues.map((a) => a.slice()),
      ...(s.fields ? { fields: Object.fromEntries(Object.entries(s.fields).map(([k, a]) => [k, a!.slice()])) as Frame['fields'] } : {}),
    })),
  };
}
