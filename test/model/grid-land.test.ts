// The land mask from rectangles and polygons: the bounding-box shortcut marks exactly the cells a
// test of every cell against every shape marks (centre inside, even-odd rule for polygons).

import { describe, expect, it } from 'vitest';
import { Grid } from '../../model/grid.ts';
import { insideShape, type LandShape } from '../../model/land.ts';
import { EARTH } from '../../model/config.ts';

describe('land mask', () => {
  it('equals the brute-force mask for rectangles, a concave polygon and shapes over the edges', () => {
    const land: LandShape[] = [
      { kind: 'rectangle', lonWest: 12.2, lonEast: 15.9, latSouth: -3.1, latNorth: 2.4 },
      {
        kind: 'polygon',
        points: [
          [20, -8],
          [28, -8],
          [28, 6],
          [24, 0],
          [20, 6],
        ],
      },
      { kind: 'rectangle', lonWest: -5, lonEast: 1.3, latSouth: 7, latNorth: 30 },
      {
        kind: 'polygon',
        points: [
          [35, -20],
          [45, -20],
          [45, -6],
        ],
      },
    ];
    const g = new Grid(
      { lonWest: 0, lonEast: 40, latSouth: -10, latNorth: 10, dLon: 0.5, dLat: 0.25, land },
      EARTH.radius,
    );
    let land0 = 0;
    for (let j = 0; j < g.ny; j++) {
      for (let i = 0; i < g.nx; i++) {
        const dry = land.some((s) => insideShape(s, g.lonCentre[i], g.latCentre[j]));
        expect(g.ocean[g.idx(i, j)]).toBe(dry ? 0 : 1);
        if (dry) land0++;
      }
    }
    expect(land0).toBeGreaterThan(200);
    expect(g.oceanCells).toBe(g.nx * g.ny - land0);
  });
});
