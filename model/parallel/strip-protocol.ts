// What the leader of a strip team tells its workers: one init message (the shared fields and the
// step's constants), then only words in shared memory. After the barrier's two words: the command
// of the round and which of the two buffers of each field holds the current state, each in one of
// two slots by the round's parity, and likewise the step's scalars. Two slots, because a round
// may end at its "go" barrier (sync, stop, and the one-phase nonlinear step for the leader): the
// leader may write the next round's words before a slow worker has read this one's. It cannot
// write them twice before every worker has been through the next "go".

import { BARRIER_WORDS } from './barrier.ts';
import type { StripRows } from '../dynamics/step-schedule.ts';
import type { StripSetup } from './strip-kernel.ts';

/** The command of round n is in word CMD + (n % 2); rounds are counted by each thread from 0. */
export const CMD = BARRIER_WORDS;
export const CURRENT = BARRIER_WORDS + 2;
export const CONTROL_WORDS = BARRIER_WORDS + 4;

/** Round commands, read by the workers right after the "go" barrier. */
export const SYNC = 0;
export const STEP = 1;
export const STOP = 2;

export interface StripInit {
  kind: 'strip-init';
  /** This worker's strip number (the leader works strip 0 itself) and every strip of the team. */
  strip: number;
  strips: StripRows[];
  parties: number;
  spins: number;
  /** The mode, kernel, shared fields and constants the rows are built from. */
  setup: StripSetup;
  /** Int32Array of CONTROL_WORDS over a SharedArrayBuffer. */
  control: Int32Array;
  /** Float64Array of 2 x STEP_PARAMS over a SharedArrayBuffer: the step's scalars, slot by round parity, written before each "go". */
  params: Float64Array;
}

export type StripReply = { kind: 'strip-ready' } | { kind: 'strip-failed'; message: string };
