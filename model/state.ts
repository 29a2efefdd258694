// The prognostic fields on the C grid (see model/grid.ts for the layout) and the model clock.

import type { ClockSpec } from './clock.ts';
import type { Grid } from './grid.ts';
import type { FieldArray } from './precision.ts';

export type { FieldArray } from './precision.ts';

export class State {
  /** Layer-mean zonal velocity on u faces, m s-1. */
  u: FieldArray;
  /** Layer-mean meridional velocity on v faces, m s-1. */
  v: FieldArray;
  /** Thickness anomaly h' = h - H at cell centres, m; positive = deeper thermocline. */
  h: FieldArray;
  /**
   * Model time, s since the start of the experiment, and the number of steps taken. The Model
   * sets both after each step from its clock (model/clock.ts); the step kernels leave them alone.
   */
  time = 0;
  steps = 0;
  /**
   * The clock that read this time, so that a restart continues it exactly; null for a state that
   * no model has run (a fresh start, or one read without a clock).
   */
  clock: ClockSpec | null = null;
  /**
   * The volume budget since the start of the experiment (model/diagnostics/integrals.ts): sum(h')
   * then, and in the nonlinear mode the sum of h' the sponges have added since. Carried by
   * restarts so that a stitched series of sponge volumes is one series; null until a model runs it.
   */
  volumeBudget: { anomalyAtStart: number; spongeMeasured: number } | null = null;
  /**
   * Multistep history of the nonlinear scheme: the tendencies of the two previous steps
   * (index 0 = one step back). historyCount says how many are valid. Part of the state so that
   * a restart continues bit for bit.
   */
  readonly history: { du: FieldArray[]; dv: FieldArray[]; dh: FieldArray[] };
  historyCount = 0;
  /**
   * The sea-surface temperature anomaly of a coupled run (K, cell centres; model/coupling/), or
   * null in a run without an answering wind. Part of the state so that a restart continues it.
   */
  sst: Float64Array | null = null;

  constructor(readonly grid: Grid) {
    this.u = grid.field();
    this.v = grid.field();
    this.h = grid.field();
    this.history = {
      du: [grid.field(), grid.field()],
      dv: [grid.field(), grid.field()],
      dh: [grid.field(), grid.field()],
    };
  }

  /** Day 0 of a new experiment from this state (a spin-up's end): a fresh clock, no multistep history. */
  startNewRun(): void {
    this.time = 0;
    this.steps = 0;
    this.clock = null;
    this.volumeBudget = null;
    this.historyCount = 0;
  }

  /** A deep copy, for snapshots and tests (in double: a copy of a float32 state holds the same values). */
  clone(): State {
    const s = new State(this.grid);
    s.copyFrom(this);
    return s;
  }

  copyFrom(o: State): void {
    this.u.set(o.u);
    this.v.set(o.v);
    this.h.set(o.h);
    this.time = o.time;
    this.steps = o.steps;
    this.clock = o.clock ? { ...o.clock } : null;
    this.volumeBudget = o.volumeBudget ? { ...o.volumeBudget } : null;
    this.historyCount = o.historyCount;
    if (o.sst) {
      this.sst ??= this.grid.field();
      this.sst.set(o.sst);
    } else this.sst = null;
    for (const key of ['du', 'dv', 'dh'] as const) {
      for (let n = 0; n < 2; n++) this.history[key][n].set(o.history[key][n]);
    }
  }
}
