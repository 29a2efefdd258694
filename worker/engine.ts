// The engine: one class that loads a scenario, runs the model in slices, takes an output sample
// every output interval and publishes frames at a bounded rate. Both hosts use it: the browser
// worker (browser-entry.ts) and Node (node-entry.ts, the command line). It has no DOM and no
// Worker API; the clock and the yield between slices come from an EngineHost.
// The parts: run-plan.ts (what a loaded run is), paced-loop.ts (stepping it), sampling.ts (its
// samples and records), frames.ts (publishing); this file holds the controls and the status.

import { BlowUpError, InputError } from '../model/errors.ts';
import type { Model } from '../model/model.ts';
import type { StripHost } from '../model/parallel/team.ts';
import type { ThreadsOption } from '../model/parallel/threads.ts';
import type { OutputRecord } from '../model/io/run-output.ts';
import { NetcdfReadError } from '../model/io/netcdf-read.ts';
import { parseScenario } from '../model/scenario/load-inputs.ts';
import { FramePublisher, makeFrame, type FrameListener } from './frames.ts';
import { PacedLoop } from './paced-loop.ts';
import { realHost, SlicePlanner, type EngineHost } from './pacing.ts';
import type { EngineError, EngineReport, EngineStatus, Frame, LoadedScenario, LoadResult } from './protocol.ts';
import { planRun, prepareInputs, type LoadOptions, type RunPlan } from './run-plan.ts';
import { fullFields, outputRecord, takeSample } from './sampling.ts';

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

/** The text a user sees for any failure, the same in the page and the command line. */
export function toEngineError(e: unknown): EngineError {
  if (e instanceof BlowUpError) return { kind: 'blow-up', message: e.message };
  if (e instanceof InputError || e instanceof NetcdfReadError) return { kind: 'input', message: e.message };
  const msg = e instanceof Error ? e.message : String(e);
  return { kind: 'internal', message: `internal error: ${msg}` };
}

export class Engine {
  private readonly host: EngineHost;
  private readonly frames: FramePublisher;
  private readonly pace: PacedLoop;
  private readonly statusListeners = new Set<StatusListener>();
  private recorder: OutputRecorder | null = null;
  /** Samples number k with k % sampleFieldsEvery === 0 carry the full fields; 0: none. */
  private sampleFieldsEvery = 0;
  private run: RunPlan | null = null;
  /** Hovmoller latitudes added while a scenario is loaded; kept across stop-and-reset, cleared by load. */
  private extraLats: number[] = [];
  private state: EngineStatus = 'empty';
  private error: EngineError | null = null;
  /** Output samples taken; the next one is number `samplesTaken`. */
  private samplesTaken = 0;
  /** Each run of the loop has a token; a newer start or a load retires the old loop. */
  private loopToken = 0;
  private loopDone: Promise<void> = Promise.resolve();
  private readonly strips: NonNullable<EngineOptions['strips']> | null;
  /** The thread count asked for the loaded run (kept for stop-and-reset). */
  private threadsAsked: ThreadsOption = 1;

  constructor(options: EngineOptions = {}) {
    this.strips = options.strips ?? null;
    this.host = options.host ?? realHost();
    this.frames = new FramePublisher(this.host, 1000 / (options.maxFramesPerSecond ?? 30));
    this.pace = new PacedLoop(this.host, new SlicePlanner(options.sliceMs ?? 15));
  }

  // --- listeners ------------------------------------------------------------------------------

  /** Frames as they are published; returns an unsubscribe function. */
  onFrame(listener: FrameListener): () => void {
    return this.frames.add(listener);
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
    if (!Number.isInteger(every) || every < 0)
      throw new InputError(`'every' must be a whole number >= 0 (got ${every})`, 'setSampleFields');
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
    this.frames.drop();
    this.error = null;
    try {
      const parsed = parseScenario(text, fileName, options.sets ?? [], { allow: options.allow });
      const inputs = await prepareInputs(parsed, options);
      this.run = planRun(parsed, inputs, this.extraLats);
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
  private async startThreads(run: RunPlan): Promise<void> {
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

  // --- controls -------------------------------------------------------------------------------

  /** Run (or resume) until the end, a pause, a stop or a blow-up. Returns at once. */
  start(): void {
    if (!this.run || !(this.state === 'ready' || this.state === 'paused')) return;
    this.pace.pauseAtSample = false;
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
      this.pace.pauseAtSample = true;
      await this.loopDone;
      return this.status();
    }
    if (this.state !== 'ready' && this.state !== 'paused') return this.status();
    this.pace.pauseAtSample = true;
    this.launch();
    await this.loopDone;
    return this.status();
  }

  /** Cap the speed at `daysPerSecond` model days per wall-clock second, or run flat out. */
  setSpeed(daysPerSecond: number | 'max'): void {
    if (daysPerSecond !== 'max' && !(daysPerSecond > 0 && Number.isFinite(daysPerSecond))) return;
    this.pace.speed = daysPerSecond;
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
      return {
        ok: false,
        message: `latitude ${lat} lies outside the basin (${g.basin.latSouth} to ${g.basin.latNorth})`,
      };
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
        this.run = planRun(run.parsed, run.inputs, this.extraLats);
        await this.startThreads(this.run);
        this.samplesTaken = 0;
        this.frames.drop();
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
      speed: this.pace.speed,
      error: this.error,
      samples: this.samplesTaken,
    };
  }

  /** A frame of the current state, fresh buffers, no samples (they go out with published frames). */
  currentFrame(): Frame | null {
    if (!this.run) return null;
    return makeFrame(this.run, [], this.state === 'finished');
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
    const run = this.run!;
    this.loopDone = this.pace
      .run(run, {
        live: () => token === this.loopToken && this.state === 'running',
        needsFirstSample: () => this.samplesTaken === 0,
        sample: () => this.sample(),
        maybePublish: () => this.frames.maybePublish(run),
        stopped: (how) => {
          this.state = how;
          this.frames.publish(run, how === 'finished');
          this.report();
        },
        failed: (e) => this.fail(e),
        // Paused or retired: the listener gets the state it stopped at.
        left: () => {
          if (token === this.loopToken && this.state === 'paused') this.frames.publish(run, false);
        },
      })
      .catch((e) => {
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
    this.pace.anchor(this.run ? this.run.model.day : 0);
  }

  private fail(e: unknown): void {
    this.state = 'failed';
    this.error = toEngineError(e);
    if (this.frames.hasPending) this.frames.publish(this.run!, false);
    this.report();
  }

  /** Take output sample number samplesTaken: integrals, Hovmoller rows, probes; and the full record. */
  private async sample(): Promise<void> {
    const run = this.run!;
    const sample = takeSample(run);
    const withFields =
      this.sampleFieldsEvery > 0 && this.samplesTaken % this.sampleFieldsEvery === 0 && this.frames.listening;
    this.samplesTaken++;
    if (this.recorder) await this.recorder(outputRecord(sample, fullFields(run)));
    // Own arrays for the sample: the recorder may keep its record's.
    if (withFields) sample.fields = fullFields(run);
    this.frames.queue(sample);
  }

  private report(): void {
    const r = this.status();
    for (const l of this.statusListeners) l(r);
  }
}
