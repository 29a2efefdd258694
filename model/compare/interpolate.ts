// Bilinear interpolation between the regular lon/lat grids of two runs, with ocean-only weights:
// the four surrounding cell centres are weighted as usual, land (and missing) corners get no
// weight, and the rest are renormalised. A target cell with no ocean corner has no value (NaN).
// The weights are computed once per pair of grids and applied to every field and time.

export interface LonLatGrid {
  nx: number;
  ny: number;
  lon: ArrayLike<number>;
  lat: ArrayLike<number>;
  ocean: ArrayLike<number>;
}

export class InterpolationError extends Error {
  override name = 'InterpolationError';
}

/** Spacing of a regular axis (one cell: spacing 1, it never divides anything). */
export function spacing(axis: ArrayLike<number>): number {
  return axis.length > 1 ? (axis[axis.length - 1] - axis[0]) / (axis.length - 1) : 1;
}

// Fractional positions this close to a whole cell are snapped to it, so a point on a cell centre
// takes that centre's value exactly (round-off would otherwise mix in a neighbour at 1e-15).
const SNAP = 1e-9;

/** Where x falls on a regular axis: left index and fraction in [0, 1]; null if outside. */
function locate(axis: ArrayLike<number>, x: number): [number, number] | null {
  const n = axis.length;
  if (n === 1) return Math.abs(x - axis[0]) <= SNAP ? [0, 0] : null;
  const f = (x - axis[0]) / spacing(axis);
  if (f < -SNAP || f > n - 1 + SNAP) return null;
  let i = Math.floor(f);
  let t = f - i;
  if (t > 1 - SNAP) {
    i += 1;
    t = 0;
  } else if (t < SNAP) t = 0;
  if (i >= n - 1) {
    i = n - 1;
    t = 0;
  }
  if (i < 0) {
    i = 0;
    t = 0;
  }
  return [i, t];
}

/** Four corner indices and weights per target cell (weight 0 for land corners). */
export class Interpolator {
  private constructor(
    readonly targetCells: number,
    private readonly index: Int32Array,
    private readonly weight: Float64Array,
  ) {}

  /** From `src` onto the points lon[i] x lat[j] (row-major from the south-west). */
  static bilinear(src: LonLatGrid, lon: ArrayLike<number>, lat: ArrayLike<number>): Interpolator {
    const n = lon.length * lat.length;
    const index = new Int32Array(4 * n).fill(-1);
    const weight = new Float64Array(4 * n);
    for (let j = 0; j < lat.length; j++) {
      const y = locate(src.lat, lat[j]);
      for (let i = 0; i < lon.length; i++) {
        const x = locate(src.lon, lon[i]);
        if (!x || !y) continue;
        const [i0, tx] = x;
        const [j0, ty] = y;
        const i1 = Math.min(i0 + 1, src.nx - 1);
        const j1 = Math.min(j0 + 1, src.ny - 1);
        const corners: Array<[number, number]> = [
          [j0 * src.nx + i0, (1 - tx) * (1 - ty)],
          [j0 * src.nx + i1, tx * (1 - ty)],
          [j1 * src.nx + i0, (1 - tx) * ty],
          [j1 * src.nx + i1, tx * ty],
        ];
        const o = 4 * (j * lon.length + i);
        corners.forEach(([k, w], q) => {
          if (w > 0 && src.ocean[k]) {
            index[o + q] = k;
            weight[o + q] = w;
          }
        });
      }
    }
    return new Interpolator(n, index, weight);
  }

  /** The target is a sub-rectangle of the source grid: values are copied, not mixed. */
  static crop(src: LonLatGrid, i0: number, j0: number, nx: number, ny: number): Interpolator {
    const n = nx * ny;
    const index = new Int32Array(4 * n).fill(-1);
    const weight = new Float64Array(4 * n);
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++) {
        const k = (j0 + j) * src.nx + i0 + i;
        if (!src.ocean[k]) continue;
        index[4 * (j * nx + i)] = k;
        weight[4 * (j * nx + i)] = 1;
      }
    return new Interpolator(n, index, weight);
  }

  /** True where the target cell has at least one ocean corner. */
  covered(): Uint8Array {
    const out = new Uint8Array(this.targetCells);
    for (let c = 0; c < this.targetCells; c++) for (let q = 0; q < 4; q++) if (this.index[4 * c + q] >= 0) out[c] = 1;
    return out;
  }

  /** Interpolate one field; NaN values among the corners are left out like land. */
  apply(values: ArrayLike<number>, out = new Float32Array(this.targetCells)): Float32Array {
    const { index, weight } = this;
    for (let c = 0; c < this.targetCells; c++) {
      let s = 0;
      let w = 0;
      for (let q = 4 * c; q < 4 * c + 4; q++) {
        const k = index[q];
        if (k < 0) continue;
        const v = values[k];
        if (Number.isNaN(v)) continue;
        s += weight[q] * v;
        w += weight[q];
      }
      out[c] = w > 0 ? s / w : NaN;
    }
    return out;
  }
}
