// Plain geometry of the map: where a lon/lat falls on the plot, which cell is under a pixel,
// graticule steps and their labels.

export interface Extent {
  lonWest: number;
  lonEast: number;
  latSouth: number;
  latNorth: number;
}

// One formatter for places everywhere (the page, the comparison, the report).
export { latLabel, lonLabel, placeLabel } from '../../model/display/coordinates.ts';

const STEPS = [0.5, 1, 2, 5, 10, 15, 20, 30, 45, 60, 90];

/** A graticule step giving at most `most` lines over a span of degrees. */
export function graticuleStep(spanDeg: number, most: number): number {
  for (const s of STEPS) if (spanDeg / s <= most) return s;
  return 90;
}

/** Multiples of step inside [a, b]. */
export function graticuleLines(a: number, b: number, step: number): number[] {
  const out: number[] = [];
  for (let v = Math.ceil(a / step - 1e-9) * step; v <= b + 1e-9; v += step) out.push(Math.round(v * 1e6) / 1e6);
  return out;
}

/** The cell (i, j) under a point given as fractions of the plot (fx right, fy down), or null outside. */
export function cellAt(fx: number, fy: number, nx: number, ny: number): { i: number; j: number } | null {
  if (!(fx >= 0 && fx < 1 && fy >= 0 && fy < 1)) return null;
  return { i: Math.min(nx - 1, Math.floor(fx * nx)), j: Math.min(ny - 1, Math.floor((1 - fy) * ny)) };
}

/** Nearest cell to a lon/lat, or null outside the basin. */
export function cellOf(lon: number, lat: number, e: Extent, nx: number, ny: number): { i: number; j: number } | null {
  const fx = (lon - e.lonWest) / (e.lonEast - e.lonWest);
  const fy = (e.latNorth - lat) / (e.latNorth - e.latSouth);
  return cellAt(fx, fy, nx, ny);
}

/** Every `stride`-th cell centre, starting half a stride in, for arrows. */
export function arrowCells(nx: number, ny: number, stride: number): number[] {
  const out: number[] = [];
  const s = Math.max(1, Math.round(stride));
  for (let j = Math.floor(s / 2); j < ny; j += s) for (let i = Math.floor(s / 2); i < nx; i += s) out.push(j * nx + i);
  return out;
}
