// Sponge bands next to the south and north walls: h' and v relax toward rest so that waves
// leave the domain instead of reflecting (Newtonian relaxation; the rate profile is set in
// coefficients.ts).

import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';

/** Relax h' and v toward rest in the sponge rows (multiplicative factor per row). */
export function applySponge(grid: Grid, c: StepCoefficients, state: State): void {
  relaxRows(c.spongeRowsH, c.spongeH, state.h, grid.nx, grid.W);
  relaxRows(c.spongeRowsV, c.spongeV, state.v, grid.nx, grid.W);
}

export function relaxRows(rows: Int32Array, factor: Float64Array, x: Float64Array, nx: number, W: number): void {
  for (let n = 0; n < rows.length; n++) {
    const j = rows[n];
    const s = factor[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) x[k] *= s;
  }
}
