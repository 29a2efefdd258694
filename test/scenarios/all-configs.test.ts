// Every scenario file in configs/ validates, resolves, and gives derived numbers that follow from
// its own values: c = sqrt(g'H), L = sqrt(c/beta), the Kelvin crossing time, a step within the limit.

import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Grid } from '../../model/grid.ts';
import { derivedNumbers, resolveScenario, validateScenarioText } from '../../model/scenario/index.ts';
import { CONFIGS, DAY } from '../support/shipped-scenarios.ts';

const files = readdirSync(CONFIGS).filter((f) => f.endsWith('.json') && f !== 'scenario.schema.json');

/** The scenarios this suite ships; each must be present (a missing one is a failure, not a skip). */
const SHIPPED = [
  'kelvin-pulse.json',
  'westerly-burst.json',
  'trade-spinup.json',
  'trade-relaxation.json',
  'monsoon-reversal.json',
  'counter-current.json',
  'random-bursts.json',
  'coupled-oscillation.json',
];

describe('configs/*.json', () => {
  it('holds the shipped scenarios', () => {
    for (const f of SHIPPED) expect(files, f).toContain(f);
  });

  for (const f of files) {
    it(`${f}: validates, and its derived numbers follow from its values`, () => {
      const path = join(CONFIGS, f);
      const v = validateScenarioText(readFileSync(path, 'utf8'), path);
      expect(v.ok ? [] : v.errors).toEqual([]);
      if (!v.ok) return;
      const r = resolveScenario(v.scenario);
      const grid = new Grid(r.model.basin, r.model.physics.earthRadius);
      const d = derivedNumbers(r, grid);
      const p = r.model.physics;
      // c = sqrt(g'H), L = sqrt(c/beta) (Matsuno 1966; Gill 1982 ch. 11).
      expect(d.c).toBeCloseTo(Math.sqrt(p.reducedGravity * p.layerThickness), 12);
      expect(d.equatorialRadiusKm).toBeCloseTo(Math.sqrt(d.c / d.beta) / 1000, 9);
      // First baroclinic speeds of 1.5-2.9 m/s and radii of 250-400 km (check-values §0-2).
      expect(d.c).toBeGreaterThan(1.5);
      expect(d.c).toBeLessThan(3);
      expect(d.equatorialRadiusKm).toBeGreaterThan(250);
      expect(d.equatorialRadiusKm).toBeLessThan(400);
      // Crossing time = ocean width along the equator / c.
      expect(d.kelvinCrossingDays).toBeCloseTo((d.crossingWidthKm * 1000) / d.c / DAY, 9);
      expect(d.rossbyCrossingDays).toBeCloseTo(3 * d.kelvinCrossingDays, 9);
      expect(d.crossingWidthKm).toBeLessThanOrEqual(
        (r.model.basin.lonEast - r.model.basin.lonWest) * (d.dxKm / r.model.basin.dLon) + 1e-6,
      );
      // The step is the automatic one and within the stability limit.
      expect(d.dt).toBeGreaterThan(0);
      expect(d.dt).toBeLessThanOrEqual(d.stability.dtMax);
      expect(d.nx * d.ny).toBe(d.cells);
      expect(d.oceanCells).toBe(grid.oceanCells);
      expect(d.steps).toBe(Math.ceil(r.runSeconds / d.dt - 1e-9));
      // Sized to run in seconds: at most 5e8 cell updates (the kernel does ~5e7-1e8 a second).
      expect(d.cells * d.steps).toBeLessThan(5e8);
      // The shipped ones say what they show and what to look at.
      if (SHIPPED.includes(f)) {
        expect(r.description.length).toBeGreaterThan(150);
        expect(r.description).toMatch(/[Ll]ook at/);
      }
      // A spin-up start names a scenario that exists, validates, and has the same grid.
      if (r.initial.kind === 'spinup') {
        const sp = join(dirname(path), r.initial.scenario);
        expect(existsSync(sp), sp).toBe(true);
        const sv = validateScenarioText(readFileSync(sp, 'utf8'), sp);
        expect(sv.ok).toBe(true);
        if (sv.ok) expect(resolveScenario(sv.scenario).model.basin).toEqual(r.model.basin);
      }
    });
  }
});
