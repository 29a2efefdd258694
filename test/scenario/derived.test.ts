import { describe, expect, test } from 'vitest';
import { Grid } from '../../model/grid.ts';
import {
  derivedNumbers,
  resolveScenario,
  stabilityLimit,
  validateScenario,
  type ResolvedScenario,
} from '../../model/scenario/index.ts';
import { example } from '../support/scenario-example.ts';

function resolved(edit: (j: any) => void = () => {}): ResolvedScenario {
  const j = example();
  edit(j);
  const r = validateScenario(j);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return resolveScenario(r.scenario);
}

/** A Pacific-wide equatorial basin, 130E to 80W (150 degrees), with the given g' and H. */
function pacific(gPrime: number, H: number): ResolvedScenario {
  return resolved((j) => {
    j.basin = { lonWest: 130, lonEast: 280, latSouth: -20, latNorth: 20, resolution: 1 };
    j.physics = { reducedGravity: gPrime, layerThickness: H };
    j.probes = [];
  });
}

describe("derived numbers against check-values.md section 0 (D: derived from c = sqrt(g'H), L = sqrt(c/beta), beta = 2 Omega / R)", () => {
  test("c = sqrt(g'H)", () => {
    expect(derivedNumbers(pacific(0.03, 150)).c).toBeCloseTo(2.121, 3);
    expect(derivedNumbers(pacific(0.02, 150)).c).toBeCloseTo(1.732, 3);
    expect(derivedNumbers(pacific(0.05, 150)).c).toBeCloseTo(2.739, 3);
    expect(derivedNumbers(pacific(0.04, 200)).c).toBeCloseTo(2.828, 3);
  });

  test('equatorial radius L = sqrt(c / beta): c = 2.5 gives about 330 km, c = 2.8 about 350 km', () => {
    const d25 = derivedNumbers(pacific(0.025, 250)); // c = 2.5 m/s
    expect(d25.c).toBeCloseTo(2.5, 12);
    expect(d25.beta).toBeCloseTo(2.28916e-11, 15);
    expect(Math.abs(d25.equatorialRadiusKm - 330)).toBeLessThan(1);
    const d28 = derivedNumbers(pacific(0.04, 196)); // c = 2.8 m/s
    expect(Math.abs(d28.equatorialRadiusKm - 350)).toBeLessThan(1);
  });

  test('Kelvin crossing of 130E-80W: c = 2.5 about 77 d, c = 2.8 about 69 d; long Rossby (c/3) c = 2.8 about 207 d', () => {
    const d25 = derivedNumbers(pacific(0.025, 250));
    expect(d25.crossingWidthKm).toBeCloseTo(16680, -1); // 150 degrees along the equator = 16,680 km (R1)
    expect(Math.abs(d25.kelvinCrossingDays - 77)).toBeLessThan(0.5);
    const d28 = derivedNumbers(pacific(0.04, 196));
    expect(Math.abs(d28.kelvinCrossingDays - 69)).toBeLessThan(0.5);
    expect(d28.rossbySpeed).toBeCloseTo(2.8 / 3, 12);
    expect(Math.abs(d28.rossbyCrossingDays - 207)).toBeLessThan(0.5);
  });

  test('with a grid, the crossing width is the ocean along the equator', () => {
    const r = resolved((j) => {
      j.basin.land = [{ kind: 'rectangle', lonWest: 240, lonEast: 260, latSouth: -20, latNorth: 20 }];
      j.probes = [];
    });
    const grid = new Grid(r.model.basin, r.model.physics.earthRadius);
    const d = derivedNumbers(r, grid);
    // 120 cells of 1 degree, 20 of them land (centres 240.5..259.5): 100 ocean cells.
    expect(d.crossingWidthKm).toBeCloseTo((100 * 6371008.7714 * Math.PI) / 180 / 1000, 6);
    expect(d.oceanCells).toBe(grid.oceanCells);
  });

  test('grid numbers and sizes', () => {
    const r = resolved();
    const d = derivedNumbers(r);
    expect([d.nx, d.ny, d.cells]).toEqual([120, 40, 4800]);
    expect(d.dxKm).toBeCloseTo(111.195, 3); // 1 degree of R1 = 111.195 km
    expect(d.outputs).toBe(31); // days 0, 2, ..., 60
    expect(d.outputBytes).toBe(120 * 40 * 4 * 10 * 31 + (120 + 40) * 8 + 31 * 8);
    expect(d.memoryBytes).toBeGreaterThan(123 * 43 * 8 * 12);
    expect(d.dtIsAuto).toBe(true);
    // 0.8 of the limit, shortened to the next whole number of steps per output interval.
    const perOutput = (r.outputEveryDays * 86400) / d.dt;
    expect(perOutput).toBeCloseTo(Math.round(perOutput), 9);
    expect(d.dt).toBeLessThanOrEqual(0.8 * d.stability.dtMax);
    expect(d.dt).toBeGreaterThan(((perOutput - 1) / perOutput) * 0.8 * d.stability.dtMax);
    expect(d.steps).toBe(Math.ceil((60 * 86400) / d.dt));
  });
});

describe('stabilityLimit', () => {
  const d = 25_000;

  test('linear forward-backward on a square C grid: c dt / d <= 1/sqrt(2) (check-values.md section 7, from Mesinger & Arakawa 1976)', () => {
    const s = stabilityLimit({ c: 2.5, dx: d, dy: d, fMax: 0, viscosity: 0, mode: 'linear' });
    expect(s.limitingTerm).toBe('gravity-wave');
    expect((2.5 * s.dtMax) / d).toBeCloseTo(1 / Math.SQRT2, 12);
    expect(s.terms.coriolis).toBe(Infinity);
    expect(s.explanation).toMatch(/^dt <= 7071 s, set by gravity waves: c dt sqrt\(1\/dx\^2 \+ 1\/dy\^2\) <= 1/);
  });

  test('unequal spacing uses sqrt(1/dx^2 + 1/dy^2)', () => {
    const s = stabilityLimit({ c: 3, dx: 40_000, dy: 30_000, fMax: 0, viscosity: 0, mode: 'linear' });
    // 1/sqrt(1/40^2 + 1/30^2) km = 24 km, so dt = 24000 / 3 = 8000 s.
    expect(s.dtMax).toBeCloseTo(8000, 9);
  });

  test('Coriolis f_max dt <= 1.5 limits a coarse grid (forward-backward ordering is neutral below 2)', () => {
    const s = stabilityLimit({ c: 2, dx: 200_000, dy: 200_000, fMax: 1e-4, viscosity: 0, mode: 'linear' });
    expect(s.limitingTerm).toBe('coriolis');
    expect(s.dtMax).toBeCloseTo(1.5e4, 9);
  });

  test('viscosity A dt (4/dx^2 + 4/dy^2) <= 1 limits a viscous fine grid', () => {
    const s = stabilityLimit({ c: 2, dx: 10_000, dy: 10_000, fMax: 0, viscosity: 5e4, mode: 'linear' });
    expect(s.limitingTerm).toBe('viscosity');
    expect(s.dtMax).toBeCloseTo(1 / (5e4 * (8 / 1e8)), 9); // 250 s
  });

  test("nonlinear third-order Adams-Bashforth: 0.72 over 2 c' sqrt(1/dx^2 + 1/dy^2), c' = c sqrt(1.5) + 2 m/s", () => {
    const c = 2.5;
    const s = stabilityLimit({ c, dx: d, dy: d, fMax: 0, viscosity: 0, mode: 'nonlinear' });
    const cEff = c * Math.sqrt(1.5) + 2;
    expect(s.dtMax).toBeCloseTo(0.72 / (2 * cEff * (Math.SQRT2 / d)), 9);
    // Well below the linear limit for the same grid.
    expect(s.dtMax).toBeLessThan(
      0.4 * stabilityLimit({ c, dx: d, dy: d, fMax: 0, viscosity: 0, mode: 'linear' }).dtMax,
    );
  });

  test('the scenario limit uses f at the farthest wall: beta y at 20 degrees', () => {
    const r = resolved();
    const dn = derivedNumbers(r);
    const y = (20 * Math.PI * 6371008.7714) / 180;
    expect(Math.abs(dn.fMax / (2.28916e-11 * y) - 1)).toBeLessThan(1e-5);
    expect(dn.stability.terms.coriolis).toBeCloseTo(1.5 / dn.fMax, 6);
  });
});
