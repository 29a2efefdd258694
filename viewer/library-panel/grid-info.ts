// A saved run's grid (cell centres) in the shape the map takes (edges and spacing too).

import type { GridInfo } from '../../worker/protocol.ts';

export function gridInfoOf(g: {
  nx: number;
  ny: number;
  lon: ArrayLike<number>;
  lat: ArrayLike<number>;
  ocean: ArrayLike<number>;
}): GridInfo {
  // One-cell axes have no spacing of their own: a degree is as good as any for drawing.
  const dLon = g.nx > 1 ? (g.lon[g.nx - 1] - g.lon[0]) / (g.nx - 1) : 1;
  const dLat = g.ny > 1 ? (g.lat[g.ny - 1] - g.lat[0]) / (g.ny - 1) : 1;
  return {
    nx: g.nx,
    ny: g.ny,
    lonWest: g.lon[0] - dLon / 2,
    lonEast: g.lon[g.nx - 1] + dLon / 2,
    latSouth: g.lat[0] - dLat / 2,
    latNorth: g.lat[g.ny - 1] + dLat / 2,
    dLon,
    dLat,
    lon: Float64Array.from(g.lon),
    lat: Float64Array.from(g.lat),
    ocean: Uint8Array.from(g.ocean),
  };
}
