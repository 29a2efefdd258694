// AssemblyScript source of the phases of one latitude strip of the linear step (built by
// `npm run build:wasm` into strips-wasm.ts): model/parallel/strip-schedule.ts row for row, with the
// row functions of rows.as.ts. Compiled against a shared, imported memory that the leader and
// every strip worker instantiate the module on; each instance sets its own copy of the scalars
// and tables (the same addresses), and the strip phases are called between the team's barriers.

import { fusedRow, hRow, ny, spongeRow, uRow, vRow } from './rows.as';

export { heapBase, setCoast, setGrid, setScalars, setTables } from './rows.as';

/** u row j1 - 1 (the upper neighbour's v row j1 needs it). */
export function stripFront(u: usize, v: usize, h: usize, un: usize, j1: i32): void {
  uRow(u, v, h, un, j1 - 1);
}

/** The rest of u, all own v rows, h rows j0..j1-2 (see stripBulk in strip-schedule.ts). */
export function stripBulk(u: usize, v: usize, h: usize, un: usize, vn: usize, j0: i32, j1: i32): void {
  const top = j1 - 1;
  if (j0 < top) {
    uRow(u, v, h, un, j0);
    vRow(v, h, un, vn, j0);
    for (let j = j0 + 1; j < top; j++) {
      fusedRow(u, v, h, un, vn, j); // u row j, v row j, h row j-1
      if (j - 1 > j0) spongeRow(vn, j - 1);
    }
    vRow(v, h, un, vn, top);
    hRow(h, un, vn, top - 1);
    if (top - 1 > j0) spongeRow(vn, top - 1);
  } else {
    vRow(v, h, un, vn, j0);
  }
  if (j1 == ny) vRow(v, h, un, vn, ny);
}

/** h row j1 - 1, then the v sponge of rows whose two h rows are both done here. */
export function stripBack(h: usize, un: usize, vn: usize, j0: i32, j1: i32): void {
  const top = j1 - 1;
  hRow(h, un, vn, top);
  if (top > j0) spongeRow(vn, top);
  if (j0 == 0) spongeRow(vn, 0);
  if (j1 == ny) spongeRow(vn, ny);
}

/** The sponge of v row j0 (its lower h row belongs to the neighbour strip). */
export function stripEdge(vn: usize, j0: i32): void {
  if (j0 > 0) spongeRow(vn, j0);
}
