// Sponge bands next to the south and north walls: h' and v relax toward rest so that waves
// leave the domain instead of reflecting (Newtonian relaxation; the rate profile is set in
// coefficients.ts). Relaxing h' toward zero takes volume out of the layer (or puts it in); the
// volume-keeping variant relaxes h' toward its own mean over each band instead.

import type { Grid } from '../grid.ts';
import type { FieldArray, State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';

/**
 * Relax h' and v toward rest in the sponge rows (multiplicative factor per row). Returns the
 * sum of h' the relaxation took out, sum (1 - s) h' over the sponge cells (m; times the cell
 * area it is a volume), so that the nonlinear mode can keep its volume budget.
 */
export function applySponge(grid: Grid, c: StepCoefficients, state: State): number {
  let removed = 0;
  const { nx, W } = grid;
  const h = state.h;
  for (let n = 0; n < c.spongeRowsH.length; n++) {
    const j = c.spongeRowsH[n];
    const s = c.spongeH[j];
    const row = (j + 1) * W + 1;
    let sum = 0;
    for (let k = row; k < row + nx; k++) {
      sum += h[k];
      h[k] *= s;
    }
    removed += (1 - s) * sum; // land cells hold h' = 0 and add nothing
  }
  relaxRows(c.spongeRowsV, c.spongeV, state.v, nx, W);
  return removed;
}

export function relaxRows(rows: Int32Array, factor: Float64Array, x: FieldArray, nx: number, W: number): void {
  for (let n = 0; n < rows.length; n++) {
    const j = rows[n];
    const s = factor[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) x[k] *= s;
  }
}

/** One sponge band (the southern or the northern one): its rows and their weights. */
interface Band {
  rows: Int32Array;
  /** (1 - s) / s per row: what the step's factor s took out, as a share of what it left. */
  takenShare: Float64Array;
  /** 1 - s per row: how strongly the row relaxes. */
  pull: Float64Array;
  /** sum over the band's ocean cells of (1 - s). */
  pullTotal: number;
}

/**
 * The volume-keeping sponge. The step has relaxed h' toward 0 (h' = s h'_before in each sponge
 * row); this pass adds (1 - s) M back, with M the pull-weighted mean of h'_before over the band,
 * so that in effect h' = s h'_before + (1 - s) M: relaxation toward the band's own mean, which
 * still absorbs waves but changes the band's volume by nothing (to round-off). It runs after every
 * step of every kernel on the same arrays, so all kernels keep giving the same bits.
 */
export class VolumeKeepingSponge {
  private readonly bands: Band[];

  constructor(
    private readonly grid: Grid,
    c: StepCoefficients,
  ) {
    const south: number[] = [];
    const north: number[] = [];
    for (const j of c.spongeRowsH) (2 * j < grid.ny ? south : north).push(j);
    this.bands = [south, north]
      .filter((rows) => rows.length > 0)
      .map((rows) => {
        let pullTotal = 0;
        for (const j of rows) {
          let wet = 0;
          for (let i = 0; i < grid.nx; i++) wet += grid.ocean[grid.idx(i, j)];
          pullTotal += (1 - c.spongeH[j]) * wet;
        }
        return {
          rows: Int32Array.from(rows),
          takenShare: Float64Array.from(rows, (j) => (1 - c.spongeH[j]) / c.spongeH[j]),
          pull: Float64Array.from(rows, (j) => 1 - c.spongeH[j]),
          pullTotal,
        };
      });
  }

  /** Put back what the step's relaxation took from each band, as (1 - s) M. Returns the sum of h' added (m). */
  restore(h: FieldArray): number {
    const { nx, W, ocean } = this.grid;
    let added = 0;
    for (const b of this.bands) {
      if (!(b.pullTotal > 0)) continue;
      let taken = 0;
      for (let n = 0; n < b.rows.length; n++) {
        const row = (b.rows[n] + 1) * W + 1;
        let sum = 0;
        for (let k = row; k < row + nx; k++) sum += h[k];
        taken += b.takenShare[n] * sum;
      }
      const mean = taken / b.pullTotal;
      for (let n = 0; n < b.rows.length; n++) {
        const row = (b.rows[n] + 1) * W + 1;
        const add = b.pull[n] * mean;
        for (let k = row; k < row + nx; k++) h[k] += ocean[k] * add;
      }
      added += taken;
    }
    return added;
  }
}
