// The leader's side of a strip team: the thread that owns the Model works strip 0 itself and
// drives the others through a barrier in shared memory. Setup is asynchronous (a blocked parent
// can keep a browser from starting its child workers); each step is synchronous, so Model.advance
// keeps its shape. The workers are started by a host-supplied spawner: the model itself never
// touches a Worker API (Node: worker/strips-node.ts, page: worker/strips-browser.ts).

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { StepCoefficients } from '../dynamics/coefficients.ts';
import { STEP_PARAMS, type FieldBinding } from '../dynamics/field-binding.ts';
import type { State } from '../state.ts';
import type { Precision } from '../precision.ts';
import { Barrier } from './barrier.ts';
import { CMD, CONTROL_WORDS, CURRENT, STEP, STOP, SYNC, type StripInit, type StripReply } from './strip-protocol.ts';
import { stripBounds, type StripRows, type StripStep } from '../dynamics/step-schedule.ts';
import { createStripSetup, stripStep, type StripKernelName } from './strip-kernel.ts';

/** One worker as the team sees it; hosts wrap worker_threads or Web Workers in this. */
export interface StripWorkerPort {
  postMessage(message: unknown): void;
  onMessage(listener: (message: unknown) => void): void;
  onError(listener: (error: unknown) => void): void;
  terminate(): unknown;
  /** Node: let the process exit although the worker lives (it is idle between steps). */
  unref?(): void;
}

export type StripSpawner = () => StripWorkerPort;

/** What a host offers a model for strips: a way to start a worker, and the cores strips may take. */
export interface StripHost {
  spawn: StripSpawner;
  cores: number;
}

export interface TeamOptions {
  /** Polls of the barrier word before sleeping (default 4000, about 10-40 microseconds). */
  spins?: number;
  /** How long the leader waits at a barrier before it declares a worker lost (default 20 s). */
  timeoutMs?: number;
  /** How long the workers may take to start (default 30 s). */
  startMs?: number;
  /** What computes the rows: the TypeScript row functions (default) or the WebAssembly kernel. */
  kernel?: StripKernelName;
  /** The working precision of the state and the step (default float64). */
  precision?: Precision;
}

export class StripTeamError extends Error {
  override name = 'StripTeamError';
}

export class StripTeam {
  readonly strips: readonly StripRows[];
  private current = 0;
  /** Rounds begun with a "go" (steps, syncs); selects the command slot. */
  private round = 0;
  /** A step was taken since the last sync: the workers may still be in their last phase. */
  private pending = false;
  /** The `cur` of the last step whose sponge sums have not been read (null: none). */
  private unread: number | null = null;
  /** Sponge volumes of finished steps, in step order, until the Model takes them. */
  private taken: number[] = [];
  private readonly phases: number;
  private broken = false;
  private closed = false;

  private constructor(
    readonly kernelName: StripKernelName,
    private readonly rows: StripStep,
    private readonly binding: FieldBinding,
    strips: StripRows[],
    private readonly workers: StripWorkerPort[],
    private readonly control: Int32Array,
    private readonly params: Float64Array,
    private readonly barrier: Barrier,
    private readonly timeoutMs: number,
  ) {
    this.strips = strips;
    this.phases = rows.phases(strips);
  }

  get size(): number {
    return this.strips.length;
  }

  /** Start threads - 1 workers (the caller is the last thread); resolves when all are ready. */
  static async start(
    grid: Grid,
    c: StepCoefficients,
    physics: PhysicsConfig,
    threads: number,
    spawn: StripSpawner,
    options: TeamOptions = {},
  ): Promise<StripTeam> {
    if (typeof SharedArrayBuffer === 'undefined') {
      throw new StripTeamError(
        'strip workers need SharedArrayBuffer, which a page has only when it is cross-origin isolated',
      );
    }
    const strips = stripBounds(grid.ny, threads);
    const kernelName = options.kernel ?? 'ts';
    const control = new Int32Array(new SharedArrayBuffer(4 * CONTROL_WORDS));
    const params = new Float64Array(new SharedArrayBuffer(16 * STEP_PARAMS));
    const spins = options.spins ?? 4000;
    // The TypeScript strips keep each field in a SharedArrayBuffer of its own; the WebAssembly
    // strips keep them all in one shared WebAssembly.Memory (with masks and tables).
    const { setup, binding } = createStripSetup(
      grid,
      c,
      physics,
      kernelName,
      strips.length,
      options.precision ?? 'float64',
    );
    const workers: StripWorkerPort[] = [];
    const terminateAll = () => {
      for (const w of workers) w.terminate();
    };
    try {
      const ready = strips.slice(1).map((rows, n) => {
        const w = spawn();
        workers.push(w);
        return new Promise<void>((resolve, reject) => {
          w.onMessage((m) => {
            const r = m as StripReply;
            if (r.kind === 'strip-ready') resolve();
            else if (r.kind === 'strip-failed')
              reject(new StripTeamError(`strip worker for rows ${rows.j0}..${rows.j1 - 1} failed: ${r.message}`));
          });
          w.onError((e) =>
            reject(
              new StripTeamError(
                `strip worker for rows ${rows.j0}..${rows.j1 - 1} failed to start: ${e instanceof Error ? e.message : String(e)}`,
              ),
            ),
          );
          const init: StripInit = {
            kind: 'strip-init',
            strip: n + 1,
            strips,
            parties: strips.length,
            spins,
            setup,
            control,
            params,
          };
          w.postMessage(init);
        });
      });
      const startMs = options.startMs ?? 30_000;
      let timer: ReturnType<typeof setTimeout> | undefined;
      const timeout = new Promise<never>((_, reject) => {
        timer = setTimeout(
          () => reject(new StripTeamError(`the strip workers did not start within ${startMs / 1000} s`)),
          startMs,
        );
      });
      try {
        await Promise.race([Promise.all(ready), timeout]);
      } finally {
        clearTimeout(timer);
      }
    } catch (e) {
      terminateAll();
      throw e;
    }
    for (const w of workers) w.unref?.();
    const rows = stripStep(setup, 0);
    return new StripTeam(
      kernelName,
      rows,
      binding,
      strips,
      workers,
      control,
      params,
      new Barrier(control, 0, strips.length, spins),
      options.timeoutMs ?? 20_000,
    );
  }

  /** Copy a state's fields into the shared buffers; from then on the state's arrays are the shared views. */
  adopt(state: State): void {
    this.sync();
    this.current = 0;
    this.binding.adopt(state);
    this.remember(state);
  }

  /** The wind stress (N m-2) for the steps that follow; waits for the workers' last step first. */
  setStress(taux: Float64Array, tauy: Float64Array): void {
    this.sync();
    this.binding.setStress(taux, tauy);
  }

  /** Post the command of the next round and arrive at its "go" barrier (every worker has then finished the last step). */
  private go(cmd: number): void {
    Atomics.store(this.control, CMD + (this.round % 2), cmd);
    this.round++;
    this.arrive();
    if (this.unread !== null) {
      this.taken.push(this.binding.spongeTaken(this.unread));
      this.unread = null;
    }
  }

  /** The sponge volumes (sum of h', m) of the steps finished since the last call, in step order. */
  takeSpongeTaken(): number[] {
    const t = this.taken;
    this.taken = [];
    return t;
  }

  private arrive(): void {
    try {
      this.barrier.arrive(this.timeoutMs);
    } catch (e) {
      this.broken = true;
      throw new StripTeamError(
        `a strip worker stopped answering (${e instanceof Error ? e.message : String(e)}); the run cannot go on in parallel`,
      );
    }
  }

  private check(): void {
    if (this.closed) throw new StripTeamError('the strip team was closed');
    if (this.broken) throw new StripTeamError('the strip team lost a worker earlier in this run');
  }

  /**
   * One step of the adopted state, the same bits as the plain step of the mode. The workers may
   * still be finishing their last phase when this returns: call sync() before reading the state.
   */
  step(state: State, friction: number, viscosity: number): void {
    this.check();
    const cur = this.current;
    const k = this.rows;
    const own = this.strips[0];
    const b = this.binding;
    if (state.u !== this.bound.u || state.v !== this.bound.v || state.h !== this.bound.h) {
      throw new StripTeamError('the state stepped by a strip team must be the one it adopted');
    }
    // The round's slot of the scalars and of `cur` (see strip-protocol.ts).
    const slot = this.round % 2;
    const p = this.params.subarray(slot * STEP_PARAMS, (slot + 1) * STEP_PARAMS);
    b.stepParams(state, friction, viscosity, p);
    Atomics.store(this.control, CURRENT + slot, cur);
    this.go(STEP);
    k.params(p);
    for (let p = 0; p < this.phases; p++) {
      if (p > 0) this.arrive();
      k.phase(p, cur, own);
    }
    this.pending = true;
    this.unread = cur;
    this.current = 1 - cur;
    b.bind(state, this.current);
    b.stepped(state);
    this.remember(state);
  }

  /** The arrays the adopted state should be showing (checked before each step). */
  private bound: { u: unknown; v: unknown; h: unknown } = { u: null, v: null, h: null };

  private remember(state: State): void {
    this.bound = { u: state.u, v: state.v, h: state.h };
  }

  /** Wait until every worker has finished the last step (a no-op when none is pending). */
  sync(): void {
    if (!this.pending || this.broken || this.closed) return;
    this.go(SYNC);
    this.pending = false;
  }

  /** Stop and terminate the workers. The shared state stays readable. */
  async close(): Promise<void> {
    if (this.closed) return;
    try {
      if (!this.broken) {
        this.sync();
        this.go(STOP);
      }
    } catch {
      // a lost worker is terminated below all the same
    } finally {
      this.closed = true;
      await Promise.all(this.workers.map((w) => w.terminate()));
    }
  }
}
