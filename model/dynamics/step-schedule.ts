// The one schedule of the linear step: which rows are computed in which order, for the one-thread
// step and for each latitude strip of the parallel step (model/parallel/), over either row kernel
// (linear-rows.ts: TypeScript or WebAssembly). Every value goes through the same row function with
// the same inputs as in linearStepPlain (linear.ts), so every path gives its bits; only the order
// of rows differs.
//
// Strip [j0, j1) owns u and h rows j0..j1-1 and v rows j0..j1-1 (the top strip also v row ny).
// A team of strips runs the phases between barriers, and the phases keep every read on the value
// the plain loop would read:
//   front  u row j1-1 (the upper neighbour's v row j1 needs it)
//   ------ barrier
//   bulk   the rest of u, all own v rows, h rows j0..j1-2 (fused sweep inside the strip); v row j0
//          reads the lower neighbour's new u row j0-1 and old h row j0-1
//   ------ barrier (the upper neighbour's v row j1 has read old h row j1-1; new v row j1 exists)
//   back   h row j1-1, then the v sponge of rows whose two h rows are both done here
//   ------ barrier, only when a strip's bottom v row lies in a sponge band
//   edge   the sponge of v row j0 (its lower h row belongs to the neighbour)
// The next step's front reads only old rows (u, v of this step, own h rows), so no barrier is
// needed between back and the next front beyond the leader's "go". One thread is the one strip
// [0, ny): front, bulk and back in turn (its edge phase has nothing to do).

import type { LinearRows } from './linear-rows.ts';
import type { RowCoefficients } from './linear.ts';

export interface StripRows {
  j0: number;
  j1: number;
}

/** Contiguous strips of rows, as even as whole rows allow (the lower strips get the extra rows). */
export function stripBounds(ny: number, strips: number): StripRows[] {
  if (!Number.isInteger(strips) || strips < 1 || strips > ny) throw new RangeError(`cannot cut ${ny} rows into ${strips} strips`);
  return Array.from({ length: strips }, (_, s) => ({ j0: Math.round((s * ny) / strips), j1: Math.round(((s + 1) * ny) / strips) }));
}

export function stripFront(k: LinearRows, cur: number, s: StripRows): void {
  k.u(cur, s.j1 - 1);
}

export function stripBulk(k: LinearRows, cur: number, s: StripRows): void {
  const { j0, j1 } = s;
  const top = j1 - 1;
  if (j0 < top) {
    k.u(cur, j0);
    k.v(cur, j0);
    for (let j = j0 + 1; j < top; j++) {
      k.fused(cur, j); // u row j, v row j, h row j-1
      if (j - 1 > j0) k.sponge(cur, j - 1);
    }
    k.v(cur, top);
    k.h(cur, top - 1);
    if (top - 1 > j0) k.sponge(cur, top - 1);
  } else {
    k.v(cur, j0);
  }
  if (j1 === k.ny) k.v(cur, k.ny);
}

export function stripBack(k: LinearRows, cur: number, s: StripRows): void {
  const { j0, j1 } = s;
  const top = j1 - 1;
  k.h(cur, top);
  if (top > j0) k.sponge(cur, top);
  if (j0 === 0) k.sponge(cur, 0); // v row 0 has only h row 0 above it
  if (j1 === k.ny) k.sponge(cur, k.ny);
}

/** True when this strip's bottom v row needs the extra barrier and edge phase. */
export function needsEdgeSponge(c: Pick<RowCoefficients, 'spongeV'>, s: StripRows): boolean {
  return s.j0 > 0 && c.spongeV[s.j0] !== 1;
}

export function stripEdge(k: LinearRows, cur: number, s: StripRows): void {
  if (s.j0 > 0) k.sponge(cur, s.j0);
}

/** One whole step on one thread: the single strip [0, ny). */
export function wholeStep(k: LinearRows, cur: number, whole: StripRows): void {
  stripFront(k, cur, whole);
  stripBulk(k, cur, whole);
  stripBack(k, cur, whole);
}

/**
 * The strips one after another on one thread, phase by phase, as a team runs them between its
 * barriers (every front, then every bulk, back and edge). `kernels` gives each strip's rows (one
 * shared kernel, or one per strip as a team's threads have). For checking the schedule.
 */
export function stepInStrips(kernels: (s: number) => LinearRows, cur: number, bounds: readonly StripRows[]): void {
  bounds.forEach((s, n) => stripFront(kernels(n), cur, s));
  bounds.forEach((s, n) => stripBulk(kernels(n), cur, s));
  bounds.forEach((s, n) => stripBack(kernels(n), cur, s));
  bounds.forEach((s, n) => stripEdge(kernels(n), cur, s));
}
