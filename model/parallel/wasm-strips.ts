// The WebAssembly strips: the shared build of the row module (wasm/rows.as.ts) over one shared
// WebAssembly.Memory that holds the whole state of either mode (the double-buffered fields, the
// stress, masks, row tables, coast terms, and for the nonlinear step its history and one ring of
// diagnosed rows per thread). The leader lays the memory out and fills it; the leader and every
// worker instantiate the module against that same memory, and the step schedule drives the rows
// of each one's strip. Needs WebAssembly SIMD and threads (shared memory): in a page, cross-origin
// isolation.

import {
  fieldViews,
  fillTables,
  heapBaseOf,
  layOut,
  rowsWasmModule,
  sharedMemory,
  WasmRows,
  type WasmLayout,
} from '../dynamics/linear-wasm.ts';
import type { RowCoefficients } from '../dynamics/linear.ts';
import type { StepFields } from '../dynamics/linear-rows.ts';
import { bytesOf, type Precision } from '../precision.ts';
import type { FieldArray } from '../state.ts';
import {
  fillNonlinearTables,
  layOutNonlinear,
  nonlinearFieldViews,
  WasmNonlinearRows,
  type NonlinearWasmLayout,
} from '../dynamics/nonlinear-wasm.ts';
import type { NonlinearFields, NonlinearRowCoefficients, NonlinearRowGrid } from '../dynamics/nonlinear-rows.ts';

/** What a worker is sent to run the linear WebAssembly strips (a shared Memory posts as itself). */
export interface WasmStripMemory {
  memory: WebAssembly.Memory;
  layout: WasmLayout;
}

/** The same for the nonlinear strips: the layout has one ring per thread. */
export interface WasmNonlinearStripMemory {
  memory: WebAssembly.Memory;
  layout: NonlinearWasmLayout;
}

/** True where the shared module compiles and instantiates on a shared memory (SIMD and threads). */
export function wasmStripsAvailable(): boolean {
  try {
    new WebAssembly.Instance(rowsWasmModule(true), { env: { memory: sharedMemory(1) } });
    return true;
  } catch {
    return false;
  }
}

/** Lay out and fill the shared memory of a linear team; the returned fields are views into it. */
export function createWasmStripMemory(
  grid: { ny: number; size: number; maskU: Float64Array; maskV: Float64Array },
  c: RowCoefficients,
  precision: Precision = 'float64',
): { shared: WasmStripMemory; fields: StepFields<FieldArray> } {
  const module = rowsWasmModule(true, precision);
  const { layout, bytes } = layOut(heapBaseOf(module, sharedMemory(1)), grid, c, bytesOf(precision));
  const memory = sharedMemory(Math.ceil(bytes / 65536));
  fillTables(memory.buffer, grid, c, layout, precision);
  return { shared: { memory, layout }, fields: fieldViews(memory.buffer, layout, grid.size, precision) };
}

/** Lay out and fill the shared memory of a nonlinear team of `threads`; the fields are views into it. */
export function createWasmNonlinearStripMemory(
  g: NonlinearRowGrid,
  c: NonlinearRowCoefficients,
  threads: number,
  precision: Precision = 'float64',
): { shared: WasmNonlinearStripMemory; fields: NonlinearFields<FieldArray> } {
  const module = rowsWasmModule(true, precision);
  const size = g.maskU.length;
  const { layout, bytes } = layOutNonlinear(
    heapBaseOf(module, sharedMemory(1)),
    { ny: g.ny, W: g.W, size },
    threads,
    bytesOf(precision),
  );
  const memory = sharedMemory(Math.ceil(bytes / 65536));
  fillNonlinearTables(memory.buffer, g, c, layout, precision);
  return { shared: { memory, layout }, fields: nonlinearFieldViews(memory.buffer, layout, size, g.ny, precision) };
}

/** This thread's linear rows on the team's memory. */
export function wasmStripRows(
  shared: WasmStripMemory,
  g: { nx: number; ny: number; W: number },
  c: RowCoefficients,
  precision: Precision = 'float64',
): WasmRows {
  return new WasmRows(rowsWasmModule(true, precision), shared.memory, shared.layout, g, c);
}

/** This thread's nonlinear rows on the team's memory, with ring number `ring` (its strip's). */
export function wasmNonlinearStripRows(
  shared: WasmNonlinearStripMemory,
  ring: number,
  g: { nx: number; ny: number; W: number },
  c: NonlinearRowCoefficients,
  precision: Precision = 'float64',
): WasmNonlinearRows {
  return new WasmNonlinearRows(rowsWasmModule(true, precision), shared.memory, shared.layout, ring, g, c);
}
