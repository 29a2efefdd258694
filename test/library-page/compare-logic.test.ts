// Pure helpers of the library and comparison panels: colour ranges, the Hovmoller pixels, the
// scenario table rows, the wave rows beside theory, the grid of a saved run, the default start
// of the characteristic lines.

import { describe, expect, it } from 'vitest';
import { diffScenarios } from '../../model/compare/scenario-diff.ts';
import type { WaveMeasures } from '../../model/report/measure.ts';
import { hovPixels } from '../../viewer/compare/hov-image.ts';
import { differenceRange, sharedRange } from '../../viewer/compare/ranges.ts';
import { differenceRows } from '../../viewer/compare/scenario-table.ts';
import { gridInfoOf } from '../../viewer/library-panel/grid-info.ts';
import { pulseStart } from '../../viewer/state/characteristics.ts';
import { waveRows } from '../../viewer/library-panel/waves.ts';
import { lookupTable } from '../../viewer/render/colour-maps.ts';

describe('comparison helpers', () => {
  it('gives A and B one symmetric range and the difference its own, land left out', () => {
    expect(sharedRange([0.3, -1.2, NaN], [0.8, 0.1])).toEqual({ min: -2, max: 2 });
    expect(differenceRange([0.004, -0.03, NaN])).toEqual({ min: -0.05, max: 0.05 });
    // No difference at all: white on a one-unit range, not a range of zero.
    expect(differenceRange([0, 0, NaN])).toEqual({ min: -1, max: 1 });
  });

  it('colours a Hovmoller row by row, latest on top, zero white-ish, land grey', () => {
    const px = hovPixels([0, 1, -1, NaN, 0, 0, 0, 0], 4, 2, 1);
    const lut = lookupTable('anomaly');
    const at = (x: number, y: number) => Array.from(px.subarray((y * 4 + x) * 4, (y * 4 + x) * 4 + 3));
    // Time 0 is the bottom row (y = 1).
    expect(at(0, 1)).toEqual(Array.from(lut.subarray(128 * 4, 128 * 4 + 3)));
    expect(at(1, 1)).toEqual(Array.from(lut.subarray(255 * 4, 255 * 4 + 3)));
    expect(at(2, 1)).toEqual(Array.from(lut.subarray(0, 3)));
    expect(at(3, 1)).toEqual([150, 150, 150]);
    expect(at(1, 0)).toEqual(at(0, 1));
  });

  it('lists the scenario differences without the name and description', () => {
    const a = {
      name: 'A',
      description: 'x',
      physics: { frictionDays: 730 },
      wind: { parts: [{ kind: 'fixed', name: 'w', envelope: { duration: 14 } }] },
    };
    const b = {
      name: 'B',
      description: 'y',
      physics: { frictionDays: 20 },
      wind: { parts: [{ kind: 'fixed', name: 'w', envelope: { duration: 20 } }] },
    };
    expect(differenceRows(diffScenarios(a, b))).toEqual([
      { path: 'physics.frictionDays', part: '', a: '730', b: '20' },
      { path: 'wind.parts[0].envelope.duration', part: "wind part 1 (fixed 'w')", a: '14', b: '20' },
    ]);
  });

  it('sets the measured speeds beside c and c/3, and says why one was not measured', () => {
    const w: WaveMeasures = {
      c: 2.7386,
      rossbyTheory: 0.9129,
      kelvin: {
        lat: 0.25,
        direction: 'east',
        sign: 1,
        speed: 2.7394,
        standardError: 0.0038,
        theory: 2.7386,
        points: [
          [1, 2],
          [2, 3],
          [3, 4],
          [4, 5],
        ],
        dayRange: [0, 40],
        lonRange: [5, 135],
      },
      rossby: { reason: 'no westward front on the section at 4.25°' },
      arrivals: [],
    };
    const [k, r] = waveRows(w);
    expect(k).toMatchObject({ wave: 'Kelvin', theory: 'c = 2.74 m/s', ratio: '1.00', speed: 2.7394 });
    expect(k.measured).toBe('2.74 ± 0.0038 m/s east at 0.25°N (downwelling, 4 times)');
    expect(r).toMatchObject({ wave: 'long Rossby', theory: 'c/3 = 0.913 m/s', ratio: '', speed: null });
    expect(r.measured).toBe('not measured: no westward front on the section at 4.25°');
    expect(waveRows({ ...w, rossby: null })[1].measured).toMatch(/no off-equatorial Hovmoller section/);
  });

  it('turns a saved grid of cell centres into the map grid with edges', () => {
    const g = gridInfoOf({ nx: 3, ny: 2, lon: [0.25, 0.75, 1.25], lat: [-0.25, 0.25], ocean: [1, 1, 0, 1, 1, 1] });
    expect(g).toMatchObject({ lonWest: 0, lonEast: 1.5, latSouth: -0.5, latNorth: 0.5, dLon: 0.5, dLat: 0.5 });
    expect(Array.from(g.ocean)).toEqual([1, 1, 0, 1, 1, 1]);
  });

  it('starts the characteristic lines at a pulsed patch, mid-pulse', () => {
    const sc = {
      wind: {
        parts: [
          { source: { shape: { kind: 'patch', lon: 30 } }, envelope: { kind: 'pulse', start: 10, duration: 14 } },
        ],
      },
    };
    expect(pulseStart(JSON.stringify(sc))).toEqual({ lon: 30, day: 17 });
    expect(pulseStart('{"wind":{"parts":[]}}')).toBeNull();
    expect(pulseStart('not json')).toBeNull();
  });
});
