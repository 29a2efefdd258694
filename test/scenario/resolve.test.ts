import { describe, expect, test } from 'vitest';
import { DAY, defaultPhysics } from '../../model/config.ts';
import { resolveScenario, validateScenario, type Scenario } from '../../model/scenario/index.ts';
import { example } from '../support/scenario-example.ts';

function scenario(json: unknown): Scenario {
  const r = validateScenario(json);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.scenario;
}

describe('resolveScenario gives SI units', () => {
  test('rates from days, seconds from days', () => {
    const j = example();
    j.physics.frictionDays = 365;
    j.physics.surfaceLayer = { depth: 40, dampingDays: 3 };
    j.physics.entrainment = { minThickness: 30, timeDays: 2 };
    j.basin.sponge = { widthDeg: 4, dampingDays: 5 };
    j.time.dtSeconds = 1800;
    const r = resolveScenario(scenario(j));
    expect(r.model.physics.friction).toBeCloseTo(1 / (365 * 86400), 20); // 3.1710e-8 s-1
    expect(r.model.physics.friction).toBeCloseTo(3.171e-8, 11);
    expect(r.model.physics.surfaceLayer).toEqual({ depth: 40, damping: 1 / (3 * 86400) });
    expect(r.model.physics.entrainment).toEqual({ minThickness: 30, time: 2 * 86400 });
    expect(r.model.physics.sponge).toEqual({ widthDeg: 4, rateAtWall: 1 / (5 * 86400), conserveVolume: false });
    expect(r.model.time).toEqual({ dt: 1800, safety: 0.8, alignTo: r.outputEverySeconds });
    expect(r.runSeconds).toBe(60 * 86400);
    expect(r.outputEverySeconds).toBe(2 * 86400);
    expect(r.days).toBe(60);
  });

  test('beta defaults to 2 Omega / R = 2.28916e-11 m-1 s-1 (check-values.md section 0, derived from GRS80 Omega and IUGG R1)', () => {
    const r = resolveScenario(scenario(example()));
    expect(r.model.physics.beta).toBeCloseTo(2.28916e-11, 15);
    const j = example();
    j.physics.coriolis = { kind: 'beta-plane', beta: 2e-11 };
    expect(resolveScenario(scenario(j)).model.physics.beta).toBe(2e-11);
    j.physics.coriolis = { kind: 'spherical' };
    expect(resolveScenario(scenario(j)).model.physics.coriolis).toBe('spherical');
  });

  test('no friction when frictionDays is null or absent; auto dt is null', () => {
    const j = example();
    delete j.physics.frictionDays;
    expect(resolveScenario(scenario(j)).model.physics.friction).toBe(0);
    j.physics.frictionDays = null;
    const r = resolveScenario(scenario(j));
    expect(r.model.physics.friction).toBe(0);
    expect(r.model.time.dt).toBeNull();
  });

  test('the file defaults are the model defaults of model/config.ts', () => {
    const j = example();
    delete j.physics;
    delete j.basin.sponge;
    expect(resolveScenario(scenario(j)).model.physics).toEqual(defaultPhysics());
  });

  test('resolution as one number or as {lon, lat}; basin, probes, sections, seed pass through', () => {
    const j = example();
    j.basin.resolution = { lon: 1, lat: 0.5 };
    const r = resolveScenario(scenario(j));
    expect(r.model.basin).toMatchObject({
      lonWest: 140,
      lonEast: 260,
      latSouth: -20,
      latNorth: 20,
      dLon: 1,
      dLat: 0.5,
    });
    expect(r.model.basin.land).toEqual(j.basin.land);
    expect(r.probes).toEqual(j.probes);
    expect(r.hovmollerLats).toEqual([0, 5]);
    expect(r.seed).toBe(7);
    expect(r.wind.parts).toHaveLength(1);
    expect(r.outputFields).toEqual([
      'h_anom',
      'ssh',
      'u',
      'v',
      'u_surf',
      'v_surf',
      'u_below',
      'v_below',
      'taux',
      'tauy',
    ]);
    expect(r.model.physics.earthRadius).toBe(6371008.7714);
    expect(DAY).toBe(86400);
  });
});
