// AssemblyScript source of the one-thread WebAssembly linear step (built by `npm run build:wasm` into
// linear-wasm.ts); the row functions are in rows.as.ts.

import { fusedRow, hRow, ny, spongeRow, uRow, vRow } from './rows.as';

export { heapBase, setCoast, setGrid, setScalars, setTables } from './rows.as';

/** One whole step, h in place; u, v, h, un, vn are the byte addresses of the fields. */
export function step(u: usize, v: usize, h: usize, un: usize, vn: usize): void {
  uRow(u, v, h, un, 0);
  vRow(v, h, un, vn, 0);
  for (let j = 1; j < ny; j++) {
    fusedRow(u, v, h, un, vn, j);
    spongeRow(vn, j - 1);
  }
  vRow(v, h, un, vn, ny);
  hRow(h, un, vn, ny - 1);
  spongeRow(vn, ny - 1);
  spongeRow(vn, ny);
}
