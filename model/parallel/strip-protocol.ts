// What the leader of a strip team tells its workers: one init message (the shared fields and the
// step's constants), then only words in shared memory. Control words after the barrier's two:
// the command of the round, in one of two slots by the round's parity, and which of the two
// velocity buffers holds the current state. Two slots, because a round that ends at its "go"
// barrier (sync, stop) is followed by no other barrier: the leader may write the next round's
// command before a slow worker has read this one.

import type { RowCoefficients } from '../dynamics/linear.ts';
import { BARRIER_WORDS } from './barrier.ts';
import type { StepFields } from '../dynamics/linear-rows.ts';
import type { StripRows } from '../dynamics/step-schedule.ts';
import type { WasmStripMemory } from './wasm-strips.ts';

/** The command of round n is in word CMD + (n % 2); rounds are counted by each thread from 0. */
export const CMD = BARRIER_WORDS;
export const CURRENT = BARRIER_WORDS + 2;
export const CONTROL_WORDS = BARRIER_WORDS + 3;

/** Round commands, read by the workers right after the "go" barrier. */
export const SYNC = 0;
export const STEP = 1;
export const STOP = 2;

/** The step's fields in shared memory (views of SharedArrayBuffers or of a shared WebAssembly.Memory). */
export type SharedFields = StepFields;

export interface StripInit {
  kind: 'strip-init';
  /** This worker's strip (the leader works strip 0 itself). */
  rows: StripRows;
  /** Whether any strip's bottom v row needs the edge-sponge phase (then every thread runs its barrier). */
  edgePhase: boolean;
  parties: number;
  spins: number;
  grid: { nx: number; ny: number; W: number; maskU: Float64Array; maskV: Float64Array };
  coefficients: RowCoefficients;
  fields: SharedFields;
  /** Int32Array of CONTROL_WORDS over a SharedArrayBuffer. */
  control: Int32Array;
  /** Float64Array [friction, viscosity] over a SharedArrayBuffer, written before each "go". */
  params: Float64Array;
  /** Present when the strips run the WebAssembly kernel: the shared memory the fields live in. */
  wasm?: WasmStripMemory;
}

export type StripReply = { kind: 'strip-ready' } | { kind: 'strip-failed'; message: string };
