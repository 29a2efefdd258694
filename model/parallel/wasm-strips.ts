// The WebAssembly strips: the shared build of the row module (wasm/rows.as.ts) over one shared
// WebAssembly.Memory that holds the whole state (both velocity buffers, h, the stress
// accelerations, masks, row tables and coast lists). The leader lays the memory out and fills it;
// the leader and every worker instantiate the module against that same memory (WasmRows), and
// the step schedule drives the rows of each one's strip. Needs WebAssembly SIMD and threads
// (shared memory): in a page, cross-origin isolation.

import { fieldViews, fillTables, heapBaseOf, layOut, rowsWasmModule, sharedMemory, WasmRows, type WasmLayout } from '../dynamics/linear-wasm.ts';
import type { RowCoefficients } from '../dynamics/linear.ts';
import type { StepFields } from '../dynamics/linear-rows.ts';

/** What a worker is sent to run the WebAssembly strips (a shared Memory posts as itself). */
export interface WasmStripMemory {
  memory: WebAssembly.Memory;
  layout: WasmLayout;
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

/** Lay out and fill the shared memory of a team; the returned fields are views into it. */
export function createWasmStripMemory(grid: { ny: number; size: number; maskU: Float64Array; maskV: Float64Array }, c: RowCoefficients): { shared: WasmStripMemory; fields: StepFields } {
  const module = rowsWasmModule(true);
  const { layout, bytes } = layOut(heapBaseOf(module, sharedMemory(1)), grid, c);
  const memory = sharedMemory(Math.ceil(bytes / 65536));
  fillTables(memory.buffer, grid, c, layout);
  return { shared: { memory, layout }, fields: fieldViews(memory.buffer, layout, grid.size) };
}

/** This thread's rows on the team's memory. */
export function wasmStripRows(shared: WasmStripMemory, g: { nx: number; ny: number; W: number }, c: RowCoefficients): WasmRows {
  return new WasmRows(rowsWasmModule(true), shared.memory, shared.layout, g, c);
}
