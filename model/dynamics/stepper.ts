// The one-thread step of either mode, and the factory that chooses its kernel and precision: a
// StripStep (the mode's schedule over its rows, TypeScript or WebAssembly SIMD, in double or
// float32) on the one strip [0, ny), and the
// binding of the mode's fields to the State. The state's arrays become views of the step's fields
// (adopt), so a step copies nothing: it writes into the other buffer of each pair and flips which
// one is current. A strip team (model/parallel/team.ts) uses the same bindings over shared fields.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import { STEP_PARAMS, type FieldBinding } from './field-binding.ts';
import type { Precision } from '../precision.ts';
import type { FieldArray } from '../state.ts';
import type { RowCoefficients } from './linear.ts';
import { linearBinding, stepFields, stepFields32, TsRows, type StepFields } from './linear-rows.ts';
import { roundRowCoefficients, TsRows32 } from './linear-rows32.ts';
import { wasmLinearParts } from './linear-wasm.ts';
import {
  nonlinearBinding,
  nonlinearFields,
  nonlinearFields32,
  nonlinearRowCoefficients,
  nonlinearRowGrid,
  TsNonlinearRows,
} from './nonlinear-rows.ts';
import { roundNonlinearCoefficients, TsNonlinearRows32 } from './nonlinear-rows32.ts';
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
    readonly accelerations?: Pick<StepFields<FieldArray>, 'accelX' | 'accelY'>,
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

/** The one-thread step of a run's mode on the kernel asked for, in the run's precision. */
export function createStepper(
  grid: Grid,
  c: StepCoefficients,
  physics: PhysicsConfig,
  kernel: KernelName,
  precision: Precision = 'float64',
): Stepper {
  const f32 = precision === 'float32';
  if (physics.mode === 'linear') {
    // The linear mode applies the stress over the resting depth H.
    const rhoH = physics.density * physics.layerThickness;
    const rc: RowCoefficients = f32 ? roundRowCoefficients(c) : c;
    if (kernel === 'wasm') {
      const { rows, fields } = wasmLinearParts(grid, rc, precision);
      return new Stepper('wasm', linearStripStep(rows, rc), linearBinding(grid, fields, rhoH), fields);
    }
    if (f32) {
      const fields = stepFields32(grid);
      return new Stepper(
        'ts',
        linearStripStep(new TsRows32(grid, rc, fields), rc),
        linearBinding(grid, fields, rhoH),
        fields,
      );
    }
    const fields = stepFields(grid);
    return new Stepper(
      'ts',
      linearStripStep(new TsRows(grid, c, fields), c),
      linearBinding(grid, fields, rhoH),
      fields,
    );
  }
  const g = nonlinearRowGrid(grid);
  const exact = nonlinearRowCoefficients(grid, c, physics);
  const nc = f32 ? roundNonlinearCoefficients(exact) : exact;
  if (kernel === 'wasm') {
    const { rows, fields } = wasmNonlinearParts(g, nc, precision);
    return new Stepper('wasm', nonlinearStripStep(rows), nonlinearBinding(fields, nc.spongeH, c.spongeRowsH));
  }
  if (f32) {
    const fields = nonlinearFields32(grid);
    return new Stepper(
      'ts',
      nonlinearStripStep(new TsNonlinearRows32(g, nc, fields)),
      nonlinearBinding(fields, nc.spongeH, c.spongeRowsH),
    );
  }
  const fields = nonlinearFields(grid);
  return new Stepper(
    'ts',
    nonlinearStripStep(new TsNonlinearRows(g, nc, fields)),
    nonlinearBinding(fields, nc.spongeH, c.spongeRowsH),
  );
}
