// The step schedules: which rows are computed in which order, for the one-thread step and for each
// latitude strip of the parallel step (model/parallel/), over any row kernel (TypeScript or
// WebAssembly). A step is a few phases (StripStep); a strip team runs them with a barrier between
// consecutive phases, one thread runs them in turn on the one strip [0, ny). Every value goes
// through the same row function with the same inputs as in the plain step (linearStepPlain in
// linear.ts, nonlinearStep in nonlinear.ts), so every path gives its bits; only the order of rows
// differs.
//
// The linear step (four phases, the last only with an edge sponge):
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
import type { NonlinearRows } from './nonlinear-rows.ts';

export interface StripRows {
  j0: number;
  j1: number;
}

/** Contiguous strips of rows, as even as whole rows allow (the lower strips get the extra rows). */
export function stripBounds(ny: number, strips: number): StripRows[] {
  if (!Number.isInteger(strips) || strips < 1 || strips > ny)
    throw new RangeError(`cannot cut ${ny} rows into ${strips} strips`);
  return Array.from({ length: strips }, (_, s) => ({
    j0: Math.round((s * ny) / strips),
    j1: Math.round(((s + 1) * ny) / strips),
  }));
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

/** A step as phases over strips: what one thread and each thread of a strip team run. */
export interface StripStep {
  readonly ny: number;
  /** The scalars of the steps that follow, as the leader posts them (stepParams of the binding). */
  params(p: ArrayLike<number>): void;
  /** Phases of a step when the grid is cut into these strips (barriers between them in a team). */
  phases(strips: readonly StripRows[]): number;
  /** Phase n (0 <= n < phases) of the step for strip s. */
  phase(n: number, cur: number, s: StripRows): void;
}

/** The linear rows as a StripStep: front, bulk, back and (where a strip needs it) edge; params [r, A]. */
export function linearStripStep(k: LinearRows, c: Pick<RowCoefficients, 'spongeV'>): StripStep {
  return {
    ny: k.ny,
    params: (p) => k.params(p[0], p[1]),
    phases: (strips) => (strips.some((s) => needsEdgeSponge(c, s)) ? 4 : 3),
    phase(n, cur, s) {
      if (n === 0) stripFront(k, cur, s);
      else if (n === 1) stripBulk(k, cur, s);
      else if (n === 2) stripBack(k, cur, s);
      else stripEdge(k, cur, s);
    },
  };
}

/** The nonlinear step of strip s: diagnosed rows from j0 - 1 up, each new row once its neighbours are there. */
export function nonlinearSweep(k: NonlinearRows, cur: number, s: StripRows): void {
  const { j0, j1 } = s;
  if (j0 > 0) k.pre(cur, j0 - 1);
  k.pre(cur, j0);
  for (let j = j0; j < j1; j++) {
    k.pre(cur, j + 1);
    k.out(cur, j);
  }
  if (j1 === k.ny) k.out(cur, k.ny);
}

/** The nonlinear rows as a StripStep: one phase; params [r, A, a0, a1, a2]. */
export function nonlinearStripStep(k: NonlinearRows): StripStep {
  return {
    ny: k.ny,
    params: (p) => k.params(p[0], p[1], p[2], p[3], p[4]),
    phases: () => 1,
    phase: (_n, cur, s) => nonlinearSweep(k, cur, s),
  };
}

/** One whole step on one thread: every phase of the single strip [0, ny). */
export function runWholeStep(k: StripStep, cur: number, whole: StripRows): void {
  const n = k.phases([whole]);
  for (let p = 0; p < n; p++) k.phase(p, cur, whole);
}

/** The strips one after another on one thread, phase by phase, as a team runs them between barriers. */
export function runStripsInTurn(kernels: (s: number) => StripStep, cur: number, bounds: readonly StripRows[]): void {
  const n = kernels(0).phases(bounds);
  for (let p = 0; p < n; p++) bounds.forEach((s, i) => kernels(i).phase(p, cur, s));
}
