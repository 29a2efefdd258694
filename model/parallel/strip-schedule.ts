// The linear step of one latitude strip, cut into the phases that a team of strips runs between
// barriers. Strip [j0, j1) owns u and h rows j0..j1-1 and v rows j0..j1-1 (the top strip also v row
// ny). Every value is computed by the row functions of linear.ts, so each cell sees the same
// operations in the same order as linearStepPlain; only the order of rows across strips differs,
// and the phases keep every read on the value the plain loop would read:
//   front  u row j1-1 (the upper neighbour's v row j1 needs it)
//   ------ barrier
//   bulk   the rest of u, all own v rows, h rows j0..j1-2 (fused sweep inside the strip); v row j0
//          reads the lower neighbour's new u row j0-1 and old h row j0-1
//   ------ barrier (the upper neighbour's v row j1 has read old h row j1-1; new v row j1 exists)
//   back   h row j1-1, then the v sponge of rows whose two h rows are both done here
//   ------ barrier, only when a strip's bottom v row lies in a sponge band
//   edge   the sponge of v row j0 (its lower h row belongs to the neighbour)
// The next step's front reads only old rows (u, v of this step, own h rows), so no barrier is
// needed between back and the next front beyond the leader's "go".

import { fusedRow, hRow, spongeRow, uRow, vRow, type RowCoefficients, type RowGrid } from '../dynamics/linear.ts';

export interface StripFields {
  accelX: Float64Array;
  accelY: Float64Array;
  u: Float64Array;
  v: Float64Array;
  h: Float64Array;
  un: Float64Array;
  vn: Float64Array;
}

export interface StripRows {
  j0: number;
  j1: number;
}

/** Contiguous strips of rows, as even as whole rows allow (the lower strips get the extra rows). */
export function stripBounds(ny: number, strips: number): StripRows[] {
  if (!Number.isInteger(strips) || strips < 1 || strips > ny) throw new RangeError(`cannot cut ${ny} rows into ${strips} strips`);
  return Array.from({ length: strips }, (_, s) => ({ j0: Math.round((s * ny) / strips), j1: Math.round(((s + 1) * ny) / strips) }));
}

export function stripFront(g: RowGrid, c: RowCoefficients, r: number, A: number, f: StripFields, s: StripRows): void {
  uRow(g, c, r, A, f.accelX, f.u, f.v, f.h, f.un, s.j1 - 1);
}

export function stripBulk(g: RowGrid, c: RowCoefficients, r: number, A: number, f: StripFields, s: StripRows): void {
  const { j0, j1 } = s;
  const top = j1 - 1;
  const { accelX, accelY, u, v, h, un, vn } = f;
  if (j0 < top) {
    uRow(g, c, r, A, accelX, u, v, h, un, j0);
    vRow(g, c, r, A, accelY, v, h, un, vn, j0);
    for (let j = j0 + 1; j < top; j++) {
      fusedRow(g, c, r, A, accelX, accelY, u, v, h, un, vn, j); // u row j, v row j, h row j-1
      if (j - 1 > j0) spongeRow(g, c, vn, j - 1);
    }
    vRow(g, c, r, A, accelY, v, h, un, vn, top);
    hRow(g, c, h, un, vn, top - 1);
    if (top - 1 > j0) spongeRow(g, c, vn, top - 1);
  } else {
    vRow(g, c, r, A, accelY, v, h, un, vn, j0);
  }
  if (j1 === g.ny) vRow(g, c, r, A, accelY, v, h, un, vn, g.ny);
}

export function stripBack(g: RowGrid, c: RowCoefficients, f: StripFields, s: StripRows): void {
  const { j0, j1 } = s;
  const top = j1 - 1;
  hRow(g, c, f.h, f.un, f.vn, top);
  if (top > j0) spongeRow(g, c, f.vn, top);
  if (j0 === 0) spongeRow(g, c, f.vn, 0); // v row 0 has only h row 0 above it
  if (j1 === g.ny) spongeRow(g, c, f.vn, g.ny);
}

/** True when this strip's bottom v row needs the extra barrier and edge phase. */
export function needsEdgeSponge(c: RowCoefficients, s: StripRows): boolean {
  return s.j0 > 0 && c.spongeV[s.j0] !== 1;
}

export function stripEdge(g: RowGrid, c: RowCoefficients, f: StripFields, s: StripRows): void {
  if (s.j0 > 0) spongeRow(g, c, f.vn, s.j0);
}

/**
 * All strips of one step on this thread, phase after phase: the order a team's barriers allow,
 * serialised. The readable statement of the schedule (and a test of it without threads).
 */
export function linearStepStrips(
  g: RowGrid,
  c: RowCoefficients,
  r: number,
  A: number,
  f: StripFields,
  strips: readonly StripRows[],
): void {
  for (const s of strips) stripFront(g, c, r, A, f, s);
  for (const s of strips) stripBulk(g, c, r, A, f, s);
  for (const s of strips) stripBack(g, c, f, s);
  for (const s of strips) stripEdge(g, c, f, s);
}
