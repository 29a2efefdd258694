// How a mode's step fields meet the State (the interface; the bindings are in linear-rows.ts and
// nonlinear-rows.ts): the same for the one-thread step (stepper.ts) and for a strip team
// (model/parallel/team.ts), so both carry the state, the stress and the multistep history alike.

import type { State } from '../state.ts';

export interface FieldBinding {
  /** Copy a state's fields in (as buffer 0); from then on the state's arrays are these fields. */
  adopt(state: State): void;
  /** Point the state's arrays at the buffers that hold the state when `cur` is current. */
  bind(state: State, cur: number): void;
  /** The wind stress on u and v faces (N m-2) for the steps that follow. */
  setStress(taux: Float64Array, tauy: Float64Array): void;
  /** The scalars of the next step (what StripStep.params takes) into out. */
  stepParams(state: State, friction: number, viscosity: number, out: Float64Array): void;
  /** After a step: what the state carries besides its fields (the multistep history count). */
  stepped(state: State): void;
  /** The sum of h' the sponges took out in the step that began with `cur` current (m; 0 for linear). */
  spongeTaken(cur: number): number;
}

/** Most scalars a step takes (the nonlinear step's r, A, a0, a1, a2). */
export const STEP_PARAMS = 5;
