// The leader's side of a strip team: the thread that owns the Model works strip 0 itself and
// drives the others through a barrier in shared memory. Setup is asynchronous (a blocked parent
// can keep a browser from starting its child workers); each step is synchronous, so Model.advance
// keeps its shape. The workers are started by a host-supplied spawner: the model itself never
// touches a Worker API (Node: worker/strips-node.ts, page: worker/strips-browser.ts).

import type { Grid } from '../grid.ts';
import type { StepCoefficients } from '../dynamics/coefficients.ts';
import type { RowCoefficients } from '../dynamics/linear.ts';
import type { State } from '../state.ts';
import { Barrier } from './barrier.ts';
import { CMD, CONTROL_WORDS, CURRENT, STEP, STOP, SYNC, type SharedFields, type StripInit, type StripReply } from './strip-protocol.ts';
import type { LinearRows } from '../dynamics/linear-rows.ts';
import { needsEdgeSponge, stripBack, stripBounds, stripBulk, stripEdge, stripFront, type StripRows } from '../dynamics/step-schedule.ts';
import { stripRows, type StripKernelName } from './strip-kernel.ts';
import { createWasmStripMemory, type WasmStripMemory } from './wasm-strips.ts';

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
}

export class StripTeamError extends Error {
  override name = 'StripTeamError';
}

function sharedField(size: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(size * 8));
}

export class StripTeam {
  readonly fields: SharedFields;
  readonly strips: readonly StripRows[];
  private current = 0;
  /** Rounds begun with a "go" (steps, syncs); selects the command slot. */
  private round = 0;
  /** A step was taken since the last sync: the workers may still be in their last phase. */
  private pending = false;
  private broken = false;
  private closed = false;

  private constructor(
    readonly kernelName: StripKernelName,
    private readonly rows: LinearRows,
    fields: SharedFields,
    strips: StripRows[],
    private readonly workers: StripWorkerPort[],
    private readonly control: Int32Array,
    private readonly params: Float64Array,
    private readonly barrier: Barrier,
    private readonly edgePhase: boolean,
    private readonly timeoutMs: number,
  ) {
    this.fields = fields;
    this.strips = strips;
  }

  get size(): number {
    return this.strips.length;
  }

  /** Start threads - 1 workers (the caller is the last thread); resolves when all are ready. */
  static async start(grid: Grid, c: StepCoefficients, threads: number, spawn: StripSpawner, options: TeamOptions = {}): Promise<StripTeam> {
    if (typeof SharedArrayBuffer === 'undefined') {
      throw new StripTeamError('strip workers need SharedArrayBuffer, which a page has only when it is cross-origin isolated');
    }
    const strips = stripBounds(grid.ny, threads);
    const { size } = grid;
    const kernelName = options.kernel ?? 'ts';
    const control = new Int32Array(new SharedArrayBuffer(4 * CONTROL_WORDS));
    const params = new Float64Array(new SharedArrayBuffer(16));
    const spins = options.spins ?? 4000;
    const edgePhase = strips.some((s) => needsEdgeSponge(c, s));
    const coefficients: RowCoefficients = {
      dt: c.dt,
      gpdx: c.gpdx,
      gpdy: c.gpdy,
      idx2: c.idx2,
      idy2: c.idy2,
      dtHdx: c.dtHdx,
      dtHdy: c.dtHdy,
      coriolisSouth: c.coriolisSouth,
      coriolisNorth: c.coriolisNorth,
      fV: c.fV,
      spongeH: c.spongeH,
      spongeV: c.spongeV,
      coastU: c.coastU,
      coastV: c.coastV,
    };
    // The TypeScript strips keep each field in a SharedArrayBuffer of its own; the WebAssembly
    // strips keep them all in one shared WebAssembly.Memory (with masks and tables).
    let fields: SharedFields;
    let wasm: WasmStripMemory | undefined;
    const maskU = sharedField(size);
    const maskV = sharedField(size);
    maskU.set(grid.maskU);
    maskV.set(grid.maskV);
    if (kernelName === 'wasm') {
      const made = createWasmStripMemory(grid, coefficients);
      fields = made.fields;
      wasm = made.shared;
    } else {
      fields = {
        u: [sharedField(size), sharedField(size)],
        v: [sharedField(size), sharedField(size)],
        h: sharedField(size),
        accelX: sharedField(size),
        accelY: sharedField(size),
      };
    }
    const workers: StripWorkerPort[] = [];
    const terminateAll = () => {
      for (const w of workers) w.terminate();
    };
    try {
      const ready = strips.slice(1).map((rows) => {
        const w = spawn();
        workers.push(w);
        return new Promise<void>((resolve, reject) => {
          w.onMessage((m) => {
            const r = m as StripReply;
            if (r.kind === 'strip-ready') resolve();
            else if (r.kind === 'strip-failed') reject(new StripTeamError(`strip worker for rows ${rows.j0}..${rows.j1 - 1} failed: ${r.message}`));
          });
          w.onError((e) => reject(new StripTeamError(`strip worker for rows ${rows.j0}..${rows.j1 - 1} failed to start: ${e instanceof Error ? e.message : String(e)}`)));
          const init: StripInit = {
            kind: 'strip-init',
            rows,
            edgePhase,
            parties: strips.length,
            spins,
            grid: { nx: grid.nx, ny: grid.ny, W: grid.W, maskU, maskV },
            coefficients,
            fields,
            control,
            params,
            ...(wasm ? { wasm } : {}),
          };
          w.postMessage(init);
        });
      });
      const startMs = options.startMs ?? 30_000;
      let timer: ReturnType<typeof setTimeout> | undefined;
      const timeout = new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new StripTeamError(`the strip workers did not start within ${startMs / 1000} s`)), startMs);
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
    const leaderGrid = { nx: grid.nx, ny: grid.ny, W: grid.W, maskU, maskV };
    const rows = stripRows(leaderGrid, coefficients, fields, wasm);
    return new StripTeam(kernelName, rows, fields, strips, workers, control, params, new Barrier(control, 0, strips.length, spins), edgePhase, options.timeoutMs ?? 20_000);
  }

  /** Copy a state's fields into the shared buffers; from then on state.u/v/h are the shared views. */
  adopt(state: State, accelX: Float64Array, accelY: Float64Array): void {
    this.sync();
    this.current = 0;
    this.fields.u[0].set(state.u);
    this.fields.v[0].set(state.v);
    this.fields.h.set(state.h);
    this.fields.accelX.set(accelX);
    this.fields.accelY.set(accelY);
    state.u = this.fields.u[0];
    state.v = this.fields.v[0];
    state.h = this.fields.h;
  }

  /** Post the command of the next round and arrive at its "go" barrier. */
  private go(cmd: number): void {
    Atomics.store(this.control, CMD + (this.round % 2), cmd);
    this.round++;
    this.arrive();
  }

  private arrive(): void {
    try {
      this.barrier.arrive(this.timeoutMs);
    } catch (e) {
      this.broken = true;
      throw new StripTeamError(`a strip worker stopped answering (${e instanceof Error ? e.message : String(e)}); the run cannot go on in parallel`);
    }
  }

  private check(): void {
    if (this.closed) throw new StripTeamError('the strip team was closed');
    if (this.broken) throw new StripTeamError('the strip team lost a worker earlier in this run');
  }

  /**
   * One linear step of the adopted state, the same bits as linearStepPlain. The workers may still
   * be finishing their last phase when this returns: call sync() before reading the state.
   */
  step(state: State, friction: number, viscosity: number): void {
    this.check();
    const cur = this.current;
    if (state.u !== this.fields.u[cur] || state.v !== this.fields.v[cur] || state.h !== this.fields.h) {
      throw new StripTeamError('the state stepped by a strip team must be the one it adopted');
    }
    const k = this.rows;
    const own = this.strips[0];
    this.params[0] = friction;
    this.params[1] = viscosity;
    Atomics.store(this.control, CURRENT, cur);
    this.go(STEP);
    k.params(friction, viscosity);
    stripFront(k, cur, own);
    this.arrive();
    stripBulk(k, cur, own);
    this.arrive();
    stripBack(k, cur, own);
    if (this.edgePhase) {
      this.arrive();
      stripEdge(k, cur, own);
    }
    this.pending = true;
    this.current = 1 - cur;
    state.u = this.fields.u[1 - cur];
    state.v = this.fields.v[1 - cur];
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
