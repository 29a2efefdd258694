// The two numbers a coupled run is watched by: the SST anomaly of the upwelling region (the
// eastern index, weighted by the region's S) and the equatorial warm-water volume, here the mean
// h' over the ocean between 5S and 5N (Jin 1997; the 5S-5N band is common practice for the
// observed warm-water volume, Meinen & McPhaden 2000, from memory). The model computes them on its
// padded fields, the report on a run file's centred ones: one function, two layouts.

import type { CoupledIndices } from '../forcing/stress.ts';

export type { CoupledIndices } from '../forcing/stress.ts';

/** The latitude band of the warm-water volume, degrees either side of the equator. */
export const WARM_WATER_LAT = 5;

/** Where cell (i, j) lives in the arrays given, and which cells are ocean. */
export interface IndexLayout {
  nx: number;
  ny: number;
  /** Cell-centre latitudes, degrees. */
  lat: ArrayLike<number>;
  index(i: number, j: number): number;
  ocean: ArrayLike<number>;
}

export function coupledIndices(
  layout: IndexLayout,
  region: ArrayLike<number>,
  sst: ArrayLike<number>,
  h: ArrayLike<number>,
): CoupledIndices {
  let sw = 0;
  let st = 0;
  let n = 0;
  let sh = 0;
  for (let j = 0; j < layout.ny; j++) {
    const band = Math.abs(layout.lat[j]) <= WARM_WATER_LAT;
    for (let i = 0; i < layout.nx; i++) {
      const k = layout.index(i, j);
      if (!layout.ocean[k]) continue;
      const s = region[k];
      if (s !== 0) {
        sw += s;
        st += s * sst[k];
      }
      if (band) {
        n++;
        sh += h[k];
      }
    }
  }
  return { eastSst: sw > 0 ? st / sw : NaN, warmWater: n > 0 ? sh / n : NaN };
}
