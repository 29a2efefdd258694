// What computes the rows of a strip, in either mode (the schedules are in
// model/dynamics/step-schedule.ts, the barriers in team.ts): the TypeScript rows over
// SharedArrayBuffers, or the WebAssembly rows over one shared WebAssembly.Memory (wasm-strips.ts).
// The leader builds a StripSetup once and posts it to every worker; each thread then builds its
// own rows from it (stripStep). All give the bits of the plain step of the mode.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { StepCoefficients } from '../dynamics/coefficients.ts';
import type { FieldBinding } from '../dynamics/field-binding.ts';
import { linearBinding, TsRows, type StepFields } from '../dynamics/linear-rows.ts';
import type { RowCoefficients } from '../dynamics/linear.ts';
import { roundRowCoefficients, TsRows32 } from '../dynamics/linear-rows32.ts';
import { roundNonlinearCoefficients, TsNonlinearRows32 } from '../dynamics/nonlinear-rows32.ts';
import { bytesOf, type Precision } from '../precision.ts';
import type { FieldArray } from '../state.ts';
import {
  nonlinearBinding,
  nonlinearRowCoefficients,
  nonlinearRowGrid,
  TsNonlinearRows,
  type NonlinearFields,
  type NonlinearRowCoefficients,
  type NonlinearRowGrid,
} from '../dynamics/nonlinear-rows.ts';
import { linearStripStep, nonlinearStripStep, type StripStep } from '../dynamics/step-schedule.ts';
import {
  createWasmNonlinearStripMemory,
  createWasmStripMemory,
  wasmNonlinearStripRows,
  wasmStripRows,
  type WasmNonlinearStripMemory,
  type WasmStripMemory,
} from './wasm-strips.ts';

export type StripKernelName = 'ts' | 'wasm';

/** Everything a thread of a team needs to build its rows (posted to each worker once). */
export type StripSetup =
  | {
      mode: 'linear';
      kernel: StripKernelName;
      grid: { nx: number; ny: number; W: number; maskU: Float64Array; maskV: Float64Array };
      precision: Precision;
      coefficients: RowCoefficients;
      fields: StepFields<FieldArray>;
      wasm?: WasmStripMemory;
    }
  | {
      mode: 'nonlinear';
      kernel: StripKernelName;
      grid: NonlinearRowGrid;
      precision: Precision;
      coefficients: NonlinearRowCoefficients;
      fields: NonlinearFields<FieldArray>;
      wasm?: WasmNonlinearStripMemory;
    };

/** A copy of an array in a SharedArrayBuffer (posted to workers without a copy each). */
function shared(a: Float64Array): Float64Array {
  const s = new Float64Array(new SharedArrayBuffer(a.length * 8));
  s.set(a);
  return s;
}

/** A zeroed field of a precision in a SharedArrayBuffer. */
function sharedField(size: number, precision: Precision): FieldArray {
  const buf = new SharedArrayBuffer(size * bytesOf(precision));
  return precision === 'float32' ? new Float32Array(buf) : new Float64Array(buf);
}
const sharedPair = (size: number, p: Precision): [FieldArray, FieldArray] => [
  sharedField(size, p),
  sharedField(size, p),
];

/** The linear step's row constants (without the dense coast fields of the nonlinear step). */
function rowCoefficients(c: StepCoefficients): RowCoefficients {
  const {
    dt,
    gpdx,
    gpdy,
    idx2,
    idy2,
    dtHdx,
    dtHdy,
    coriolisSouth,
    coriolisNorth,
    fV,
    spongeH,
    spongeV,
    coastU,
    coastV,
  } = c;
  return {
    dt,
    gpdx,
    gpdy,
    idx2,
    idy2,
    dtHdx,
    dtHdy,
    coriolisSouth,
    coriolisNorth,
    fV,
    spongeH,
    spongeV,
    coastU,
    coastV,
  };
}

/** The shared fields of a team of `threads` and the leader's binding of them to the State. */
export function createStripSetup(
  grid: Grid,
  c: StepCoefficients,
  physics: PhysicsConfig,
  kernel: StripKernelName,
  threads: number,
  precision: Precision = 'float64',
): { setup: StripSetup; binding: FieldBinding } {
  const { size } = grid;
  const f32 = precision === 'float32';
  const p = precision;
  if (physics.mode === 'linear') {
    const coefficients = f32 ? roundRowCoefficients(rowCoefficients(c)) : rowCoefficients(c);
    const g = { nx: grid.nx, ny: grid.ny, W: grid.W, maskU: shared(grid.maskU), maskV: shared(grid.maskV) };
    let fields: StepFields<FieldArray>;
    let wasm: WasmStripMemory | undefined;
    if (kernel === 'wasm') {
      const made = createWasmStripMemory(grid, coefficients, precision);
      fields = made.fields;
      wasm = made.shared;
    } else {
      fields = {
        u: sharedPair(size, p),
        v: sharedPair(size, p),
        h: sharedField(size, p),
        accelX: sharedField(size, p),
        accelY: sharedField(size, p),
      };
    }
    const setup: StripSetup = {
      mode: 'linear',
      kernel,
      precision,
      grid: g,
      coefficients,
      fields,
      ...(wasm ? { wasm } : {}),
    };
    return { setup, binding: linearBinding(grid, fields, physics.density * physics.layerThickness) };
  }
  const base = nonlinearRowGrid(grid);
  const exact = nonlinearRowCoefficients(grid, c, physics);
  const nc = f32 ? roundNonlinearCoefficients(exact) : exact;
  const g: NonlinearRowGrid = {
    ...base,
    maskU: shared(base.maskU),
    maskV: shared(base.maskV),
    oceanF: shared(base.oceanF),
  };
  const coefficients: NonlinearRowCoefficients = { ...nc, coastU: shared(nc.coastU), coastV: shared(nc.coastV) };
  let fields: NonlinearFields<FieldArray>;
  let wasm: WasmNonlinearStripMemory | undefined;
  if (kernel === 'wasm') {
    const made = createWasmNonlinearStripMemory(g, coefficients, threads, precision);
    fields = made.fields;
    wasm = made.shared;
  } else {
    const sums = () => new Float64Array(new SharedArrayBuffer((grid.ny + 1) * 8));
    fields = {
      u: sharedPair(size, p),
      v: sharedPair(size, p),
      h: sharedPair(size, p),
      du: sharedPair(size, p),
      dv: sharedPair(size, p),
      dh: sharedPair(size, p),
      taux: sharedField(size, p),
      tauy: sharedField(size, p),
      spongeSums: [sums(), sums()],
    };
  }
  const setup: StripSetup = {
    mode: 'nonlinear',
    kernel,
    precision,
    grid: g,
    coefficients,
    fields,
    ...(wasm ? { wasm } : {}),
  };
  return { setup, binding: nonlinearBinding(fields, nc.spongeH, c.spongeRowsH) };
}

/** This thread's rows as a StripStep; `strip` is the thread's strip number (its ring in shared memory). */
export function stripStep(s: StripSetup, strip: number): StripStep {
  const f32 = s.precision === 'float32';
  if (s.mode === 'linear') {
    const rows = s.wasm
      ? wasmStripRows(s.wasm, s.grid, s.coefficients, s.precision)
      : f32
        ? new TsRows32(s.grid, s.coefficients, s.fields as StepFields<Float32Array>)
        : new TsRows(s.grid, s.coefficients, s.fields as StepFields<Float64Array>);
    return linearStripStep(rows, s.coefficients);
  }
  const rows = s.wasm
    ? wasmNonlinearStripRows(s.wasm, strip, s.grid, s.coefficients, s.precision)
    : f32
      ? new TsNonlinearRows32(s.grid, s.coefficients, s.fields as NonlinearFields<Float32Array>)
      : new TsNonlinearRows(s.grid, s.coefficients, s.fields as NonlinearFields<Float64Array>);
  return nonlinearStripStep(rows);
}
