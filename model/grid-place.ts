// Where an index of a padded field array lies, in words a user can find on a map: the cell (or
// face) and its longitude and latitude, or "the padding outside the grid" for the halo, which
// holds no grid point. Messages about a start state name the place this way, never a logical
// index such as i=-1, j=-1 that points outside the grid.

import { formatLat, formatLon } from './errors.ts';
import type { Grid } from './grid.ts';

/** h at cell centres, u on west faces, v on south faces (model/grid.ts). */
export type Staggering = 'centre' | 'west-face' | 'south-face';

/** The staggering of a prognostic variable by its name (u, v, and h or anything at the centres). */
export function staggeringOf(name: string): Staggering {
  if (name === 'u' || name === 'du') return 'west-face';
  if (name === 'v' || name === 'dv') return 'south-face';
  return 'centre';
}

/** "cell (12, 3) at 162.50°E, 6.50°S", "the u face (0, 3) at 150.00°E, 6.50°S" (west faces; v: south faces), or the padding. */
export function placeOfIndex(grid: Grid, k: number, at: Staggering): string {
  const row = Math.floor(k / grid.W);
  const col = k % grid.W;
  const i = col - 1;
  const j = row - 1;
  const iMax = at === 'west-face' ? grid.nx : grid.nx - 1;
  const jMax = at === 'south-face' ? grid.ny : grid.ny - 1;
  if (k < 0 || k >= grid.size || i < 0 || j < 0 || i > iMax || j > jMax) {
    return `the padding outside the grid (padded row ${row}, column ${col}), which holds no grid point`;
  }
  if (at === 'west-face') {
    const lat = grid.latCentre[j];
    return `the u face (${i}, ${j}) at ${formatLon(grid.lonFace[i])}, ${formatLat(lat)}`;
  }
  if (at === 'south-face') {
    return `the v face (${i}, ${j}) at ${formatLon(grid.lonCentre[i])}, ${formatLat(grid.latFace[j])}`;
  }
  return `cell (${i}, ${j}) at ${formatLon(grid.lonCentre[i])}, ${formatLat(grid.latCentre[j])}`;
}
