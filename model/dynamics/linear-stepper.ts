// The one-thread linear step: the step schedule over one set of fields and one row kernel
// (TypeScript, or WebAssembly SIMD in the module's own memory). The state's u, v and h become views
// of the stepper's fields (adopt), so a step copies nothing: it writes the new velocities into the
// other buffer of each pair and flips which one is current.

import type { State } from '../state.ts';
import type { LinearRows, StepFields } from './linear-rows.ts';
import { wholeStep, type StripRows } from './step-schedule.ts';

export class LinearStepper {
  private cur = 0;
  private readonly whole: StripRows;

  constructor(
    readonly rows: LinearRows,
    readonly fields: StepFields,
  ) {
    this.whole = { j0: 0, j1: rows.ny };
  }

  /** Copy a state's fields in; from then on state.u, v, h are the stepper's. */
  adopt(state: State): void {
    this.cur = 0;
    this.fields.u[0].set(state.u);
    this.fields.v[0].set(state.v);
    this.fields.h.set(state.h);
    this.bind(state);
  }

  /** One step of the adopted state; friction and viscosity as the step should use them. */
  step(state: State, friction: number, viscosity: number): void {
    this.rows.params(friction, viscosity);
    wholeStep(this.rows, this.cur, this.whole);
    this.cur = 1 - this.cur;
    this.bind(state);
  }

  private bind(state: State): void {
    state.u = this.fields.u[this.cur];
    state.v = this.fields.v[this.cur];
    state.h = this.fields.h;
  }
}
