// Sampling output fields along a latitude (Hovmoller sections) and at probe points.

import type { Grid } from '../grid.ts';
import { centredField, type FieldContext, type FieldName } from './fields.ts';

/** One field along the row of cell centres nearest to a latitude (nx values, NaN on land). */
export function sectionAlong(
  ctx: FieldContext,
  name: FieldName,
  lat: number,
  out: Float32Array | Float64Array,
): number {
  const j = ctx.grid.nearestRow(lat);
  centredField(name, ctx, out, { from: j, to: j + 1 });
  return ctx.grid.latCentre[j];
}

/**
 * Bilinear weights of a point among the four surrounding cell centres; land centres get no weight
 * and the others are renormalised, so a probe next to a coast reads the ocean beside it.
 */
export interface ProbeStencil {
  /** Indices into a centred field (nx * ny) and their weights. */
  index: Int32Array;
  weight: Float64Array;
}

export function probeStencil(grid: Grid, lon: number, lat: number): ProbeStencil | null {
  const { nx, ny } = grid;
  const x = (lon - grid.basin.lonWest) / grid.dLon - 0.5;
  const y = (lat - grid.basin.latSouth) / grid.dLat - 0.5;
  if (x < -0.5 || y < -0.5 || x > nx - 0.5 || y > ny - 0.5) return null;
  const i0 = Math.min(Math.max(Math.floor(x), 0), Math.max(nx - 2, 0));
  const j0 = Math.min(Math.max(Math.floor(y), 0), Math.max(ny - 2, 0));
  const fx = nx > 1 ? Math.min(Math.max(x - i0, 0), 1) : 0;
  const fy = ny > 1 ? Math.min(Math.max(y - j0, 0), 1) : 0;
  const index: number[] = [];
  const weight: number[] = [];
  for (const [di, dj, w] of [
    [0, 0, (1 - fx) * (1 - fy)],
    [1, 0, fx * (1 - fy)],
    [0, 1, (1 - fx) * fy],
    [1, 1, fx * fy],
  ] as const) {
    const i = Math.min(i0 + di, nx - 1);
    const j = Math.min(j0 + dj, ny - 1);
    if (w > 0 && grid.ocean[grid.idx(i, j)]) {
      index.push(j * nx + i);
      weight.push(w);
    }
  }
  const total = weight.reduce((s, w) => s + w, 0);
  if (total === 0) return null;
  return { index: Int32Array.from(index), weight: Float64Array.from(weight, (w) => w / total) };
}

export function sampleAt(stencil: ProbeStencil, field: ArrayLike<number>): number {
  let s = 0;
  for (let n = 0; n < stencil.index.length; n++) s += stencil.weight[n] * field[stencil.index[n]];
  return s;
}
