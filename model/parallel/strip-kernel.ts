// What computes the rows of a strip (the schedule itself is model/dynamics/step-schedule.ts, and
// the team's barriers): the TypeScript rows over SharedArrayBuffers, or the WebAssembly rows over
// one shared WebAssembly.Memory (wasm-strips.ts). Both give the bits of linearStepPlain.

import { TsRows, type LinearRows, type StepFields } from '../dynamics/linear-rows.ts';
import type { RowCoefficients, RowGrid } from '../dynamics/linear.ts';
import { wasmStripRows, type WasmStripMemory } from './wasm-strips.ts';

export type StripKernelName = 'ts' | 'wasm';

/** This thread's rows: WebAssembly on the team's memory when it has one, else TypeScript over the shared fields. */
export function stripRows(g: RowGrid, c: RowCoefficients, fields: StepFields, wasm?: WasmStripMemory): LinearRows {
  return wasm ? wasmStripRows(wasm, g, c) : new TsRows(g, c, fields);
}
