// A checksum of the model state's exact bits: SHA-256 over the Float64 bytes of u, then v, then h
// (the padded arrays of model/grid.ts, halo included), so that a run in the page's worker and one
// in Node or the command line can be compared bit for bit without moving the arrays.

import { sha256Hex } from '../model/io/sha256.ts';
import type { State } from '../model/state.ts';

export interface StateChecksum {
  /** Steps taken and model time (s) of the state summed up. */
  step: number;
  time: number;
  /** Float64 values covered (u, v and h together). */
  values: number;
  sha256: string;
}

export function stateChecksum(state: State): StateChecksum {
  const parts = [state.u, state.v, state.h];
  const bytes = new Uint8Array(parts.reduce((n, a) => n + a.byteLength, 0));
  let at = 0;
  for (const a of parts) {
    // Copy the bytes as they lie in memory (little-endian on every host that runs the model).
    bytes.set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength), at);
    at += a.byteLength;
  }
  return { step: state.steps, time: state.time, values: at / 8, sha256: sha256Hex(bytes) };
}
