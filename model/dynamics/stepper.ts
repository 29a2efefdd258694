// The one-thread step of either mode, and the factory that chooses its kernel: a StripStep (the
// mode's schedule over its rows, TypeScript or WebAssembly SIMD) on the one strip [0, ny), and the
// binding of the mode's fields to the State. The state's arrays become views of the step's fields
// (adopt), so a step copies nothing: it writes into the other buffer of each pair and flips which
// one is current. A strip team (model/parallel/team.ts) uses the same bindings over shared fields.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import { STEP_PARAMS, type FieldBinding } from './field-binding.ts';
import { linearBinding, stepFields, TsRows, type StepFields } from './linear-rows.ts';
import { wasmLinearParts } from './linear-wasm.ts';
import { nonlinearBinding, nonlinearFields, nonlinearRowCoefficients, nonlinearRowGrid, TsNonlinearRows, type NonlinearFields } from './nonlinear-rows.ts';
import { wasmNonlinearParts } from './nonlinear-wasm.ts';
import { linearStripStep, nonlinearStripStep, runWholeStep, type StripRows, type StripStep } from './step-schedule.ts';

export type KernelName = 'ts' | 'wasm';

export class Stepper {
  private cur = 0;
  private readonly whole: StripRows;
  private readonly p = new Float64Array(STEP_PARAMS);

  constructor(
    readonly kernel: KernelName,
    readonly rows: StripStep,
    readonly binding: FieldBinding,
    /** The linear step's stress accelerations (for tests that step the plain loops beside it). */
    readonly accelerations?: Pick<StepFields, 'accelX' | 'accelY'>,
  ) {
    this.whole = { j0: 0, j1: rows.ny };
  }

  adopt(state: State): void {
    this.cur = 0;
    this.binding.adopt(state);
  }

  setStress(taux: Float64Array, tauy: Float64Array): void {
    this.binding.setStress(taux, tauy);
  }

  /** One step of the adopted state; returns the h' the sponges took out (nonlinear; 0 for linear). */
  step(state: State, friction: number, viscosity: number): number {
    const b = this.binding;
    b.stepParams(state, friction, viscosity, this.p);
    this.rows.params(this.p);
    runWholeStep(this.rows, this.cur, this.whole);
    const taken = b.spongeTaken(this.cur);
    this.cur = 1 - this.cur;
    b.bind(state, this.cur);
    b.stepped(state);
    return taken;
  }
}

/** The one-thread step of a run's mode on the kernel asked for. */
export function createStepper(grid: Grid, c: StepCoefficients, physics: PhysicsConfig, kernel: KernelName): Stepper {
  if (physics.mode === 'linear') {
    // The linear mode applies the stress over the resting depth H.
    const rhoH = physics.density * physics.layerThickness;
    if (kernel === 'wasm') {
      const { rows, fields } = wasmLinearParts(grid, c);
      return new Stepper('wasm', linearStripStep(rows, c), linearBinding(grid, fields, rhoH), fields);
    }
    const fields: StepFields = stepFields(grid);
    return new Stepper('ts', linearStripStep(new TsRows(grid, c, fields), c), linearBinding(grid, fields, rhoH), fields);
  }
  const g = nonlinearRowGrid(grid);
  const nc = nonlinearRowCoefficients(grid, c, physics);
  if (kernel === 'wasm') {
    const { rows, fields } = wasmNonlinearParts(g, nc);
    return new Stepper('wasm', nonlinearStripStep(rows), nonlinearBinding(fields, nc.spongeH, c.spongeRowsH));
  }
  const fields: NonlinearFields = nonlinearFields(grid);
  return new Stepper('ts', nonlinearStripStep(new TsNonlinearRows(g, nc, fields)), nonlinearBinding(fields, nc.spongeH, c.spongeRowsH));
}
