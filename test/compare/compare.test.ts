// Run comparison: differences, interpolation between grids, matching times, the scenario table.

import { describe, expect, it } from 'vitest';
import { compareRuns, matchTimes } from '../../model/compare/compare.ts';
import { Interpolator } from '../../model/compare/interpolate.ts';
import { diffScenarios } from '../../model/compare/scenario-diff.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { tinyRun } from '../support/run-fixture.ts';

const linear = (lon: number, lat: number) => 2 + 0.3 * (lon - 170) - 0.7 * lat;

/** The run with every snapshot field (and Hovmoller row) replaced by the linear function. */
function linearised(run: RunData, scale = 1): RunData {
  const r = structuredClone(run);
  const { nx, ny, lon, lat, ocean } = r.grid;
  for (const s of r.snapshots)
    for (const f of r.fields) {
      const v = s.fields[f]!;
      for (let j = 0; j < ny; j++)
        for (let i = 0; i < nx; i++) v[j * nx + i] = ocean[j * nx + i] ? scale * linear(lon[i], lat[j]) : NaN;
    }
  for (const h of r.hovmoller)
    for (let n = 0; n < r.days.length; n++)
      for (let i = 0; i < nx; i++) h.values[n * nx + i] = scale * linear(lon[i], 0);
  return r;
}

describe('interpolation', () => {
  const fine = {
    nx: 41,
    ny: 21,
    lon: Float64Array.from({ length: 41 }, (_, i) => 150.25 + 0.5 * i),
    lat: Float64Array.from({ length: 21 }, (_, j) => -9.75 + 0.5 * j),
    ocean: new Uint8Array(41 * 21).fill(1),
  };
  const values = new Float64Array(41 * 21);
  for (let j = 0; j < 21; j++) for (let i = 0; i < 41; i++) values[j * 41 + i] = linear(fine.lon[i], fine.lat[j]);

  it('a linear field comes out exactly (to float32) at points between the centres', () => {
    const lon = [150.3, 155.5, 160.123, 169.9, 170.25];
    const lat = [-9.7, -3.3, -0.01, 0.25, 0.2];
    const out = Interpolator.bilinear(fine, lon, lat).apply(values);
    lat.forEach((y, j) =>
      lon.forEach((x, i) => expect(out[j * lon.length + i]).toBeCloseTo(Math.fround(linear(x, y)), 5)),
    );
  });

  it('land corners get no weight, and points outside have no value', () => {
    const ocean = fine.ocean.slice();
    const v = values.slice();
    ocean[10 * 41 + 20] = 0; // the cell at (160.25, -4.75)
    v[10 * 41 + 20] = 1e6; // a land value that must not leak
    const g = { ...fine, ocean };
    const [out] = Interpolator.bilinear(g, [160.5], [-4.5]).apply(v);
    // The other three corners, weights 1/4 each, renormalised to 1/3.
    const expected = (linear(160.75, -4.75) + linear(160.25, -4.25) + linear(160.75, -4.25)) / 3;
    expect(out).toBeCloseTo(Math.fround(expected), 5);
    // On the land centre itself, and outside the span of the centres: no value.
    expect(Interpolator.bilinear(g, [160.25], [-4.75]).apply(v)[0]).toBeNaN();
    expect(Array.from(Interpolator.bilinear(g, [149, 171], [0]).apply(v))).toEqual([NaN, NaN]);
    expect(Array.from(Interpolator.bilinear(g, [160], [-10, 10]).apply(v))).toEqual([NaN, NaN]);
  });
});

describe('compareRuns', () => {
  it('a run against itself: zero difference everywhere, nothing in the scenario table', async () => {
    const run = await tinyRun();
    const c = compareRuns(run, run);
    expect(c.status).toBe('ok');
    expect(c.grid!.from).toBe('same');
    expect(c.grid!.interpolated).toBe('none');
    expect(c.commonTimes).toHaveLength(7);
    expect(c.scenario).toEqual([]);
    for (const f of run.fields) expect(c.maxAbsDifference[f]).toBe(0);
    for (const h of c.hovmoller) expect(h.diff.every((x) => x === 0 || Number.isNaN(x))).toBe(true);
    expect(c.probes.map((p) => p.name)).toEqual(['west', 'east-coast']);
    expect(c.probes[0].series.h_anom!.diff.every((x) => x === 0)).toBe(true);
    expect(c.integrals.energy!.diff.every((x) => x === 0)).toBe(true);
  });

  it('two frictions: the table lists exactly the changed keys, the difference is measured', async () => {
    const a = await tinyRun();
    const b = await tinyRun(['physics.frictionDays=5', 'wind.parts[0].envelope.duration=3']);
    const c = compareRuns(a, b);
    expect(c.scenario).toEqual([
      { path: 'physics.frictionDays', a: 365, b: 5 },
      { path: 'wind.parts[0].envelope.duration', a: 4, b: 3, part: "wind part 1 (fixed 'westerly patch')" },
    ]);
    expect(c.maxAbsDifference.h_anom).toBeGreaterThan(0.01);
    // Day 0 (rest) is identical; differences grow later.
    expect(Math.max(...Array.from(c.difference(0, 'h_anom')!).filter(Number.isFinite).map(Math.abs))).toBe(0);
    const d6 = c.difference(6, 'h_anom')!;
    const a6 = c.fieldA(6, 'h_anom')!;
    const b6 = c.fieldB(6, 'h_anom')!;
    const k = a.grid.ocean.indexOf(1);
    expect(d6[k]).toBe(Math.fround(b6[k] - a6[k]));
  });

  it('different grids go to the coarser one, whichever is A', async () => {
    const fine = await tinyRun(['basin.resolution=0.5', 'time.dtSeconds=auto']);
    const coarse = await tinyRun();
    for (const [a, b, whose] of [
      [fine, coarse, 'B'],
      [coarse, fine, 'A'],
    ] as const) {
      const c = compareRuns(a, b);
      expect(c.status).toBe('ok');
      expect(c.grid!.from).toBe(whose);
      expect(c.grid!.interpolated).toBe(whose === 'A' ? 'B' : 'A');
      expect(c.grid!.nx).toBe(40);
      expect(c.grid!.ny).toBe(20);
      expect(c.grid!.note).toMatch(/interpolated bilinearly onto (A|B)'s coarser 1° grid/);
      expect(c.scenario.map((s) => s.path)).toEqual(['basin.resolution']);
    }
    // The same linear field on both grids: no difference where all four corners are ocean.
    const c = compareRuns(linearised(fine), linearised(coarse));
    const d = c.difference(3, 'u')!;
    const finite = Array.from(d).filter(Number.isFinite);
    expect(finite.length).toBeGreaterThan(600);
    expect(Math.max(...finite.map(Math.abs))).toBeLessThan(1e-5);
    for (const h of c.hovmoller)
      expect(Math.max(...Array.from(h.diff).filter(Number.isFinite).map(Math.abs))).toBeLessThan(1e-5);
    // And a known difference is found as such: B = 2 x the field, so B - A = the field.
    const c2 = compareRuns(linearised(fine), linearised(coarse, 2));
    const g = c2.grid!;
    const d2 = c2.difference(3, 'h_anom')!;
    const j = 7;
    const i = 12;
    expect(d2[j * g.nx + i]).toBeCloseTo(linear(g.lon[i], g.lat[j]), 4);
  });

  it('times match within half an output interval; none is said so', async () => {
    const a = await tinyRun();
    const shifted = structuredClone(a);
    shifted.days = a.days.map((d) => d + 0.3);
    expect(matchTimes(a, shifted).times.map((t) => t.dayB)).toEqual(Array.from(a.days, (d) => d + 0.3));
    const sparse = await tinyRun(['time.outputEveryDays=2']);
    expect(matchTimes(a, sparse).times.map((t) => [t.dayA, t.dayB])).toEqual([
      [0, 0],
      [2, 2],
      [4, 4],
      [6, 6],
    ]);
    const later = structuredClone(a);
    later.days = a.days.map((d) => d + 100);
    const c = compareRuns(a, later);
    expect(c.status).toBe('no-common-times');
    expect(c.message).toBe('no common times: A has days 0..6, B has days 100..106 (times match within 0.5 days)');
    expect(c.commonTimes).toEqual([]);
  });

  it('no common area is said so', async () => {
    const a = await tinyRun();
    const away = structuredClone(a);
    away.grid.lon = a.grid.lon.map((x) => x + 60);
    const c = compareRuns(a, away);
    expect(c.status).toBe('no-common-area');
    expect(c.message).toMatch(/^no common area: A covers 150.5..189.5°E, -9.5..9.5°N, B covers 210.5..249.5°E/);
    expect(c.grid).toBeNull();
  });

  it('only snapshot times get difference fields', async () => {
    const a = await tinyRun([], 2);
    const c = compareRuns(a, await tinyRun([], 3));
    expect(c.fieldTimes).toEqual([0, 6]);
    expect(c.difference(2, 'h_anom')).toBeNull();
  });
});

describe('diffScenarios', () => {
  it('wind parts by index and kind, added and removed keys', () => {
    const a = {
      $schema: 'x',
      physics: { reducedGravity: 0.05 },
      wind: { parts: [{ kind: 'fixed', name: 'w', envelope: { kind: 'pulse', start: 10 } }] },
    };
    const b = {
      $schema: 'y',
      physics: { reducedGravity: 0.03, slip: 'free' },
      wind: { parts: [{ kind: 'bursts', ratePerYear: 4 }, { kind: 'fixed' }] },
    };
    expect(diffScenarios(a, b)).toEqual([
      { path: 'physics.reducedGravity', a: 0.05, b: 0.03 },
      { path: 'physics.slip', a: undefined, b: 'free' },
      { path: 'wind.parts[0].kind', a: 'fixed', b: 'bursts', part: "wind part 1 (fixed 'w' / bursts)" },
      { path: 'wind.parts[0].name', a: 'w', b: undefined, part: "wind part 1 (fixed 'w' / bursts)" },
      {
        path: 'wind.parts[0].envelope',
        a: { kind: 'pulse', start: 10 },
        b: undefined,
        part: "wind part 1 (fixed 'w' / bursts)",
      },
      { path: 'wind.parts[0].ratePerYear', a: undefined, b: 4, part: "wind part 1 (fixed 'w' / bursts)" },
      { path: 'wind.parts[1]', a: undefined, b: { kind: 'fixed' }, part: 'wind part 2 (none / fixed)' },
    ]);
  });
});
