// The answering wind's parts one by one: the subsurface relation, the SST update, the drag laws,
// the indices and the mode fit, and the scenario format (schema, checks, --set, derived numbers).

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { EARTH } from '../../model/config.ts';
import { defaultPhysics } from '../../model/config.ts';
import { coupledIndices } from '../../model/coupling/indices.ts';
import { fitOscillation, phaseLead, coupledMode, coupledModeLine } from '../../model/coupling/mode-fit.ts';
import { SstAnomaly, subsurfaceTemperature } from '../../model/coupling/sst.ts';
import { makeBulkFormula } from '../../model/forcing/bulk.ts';
import type { AnsweringPart, WindSpec } from '../../model/forcing/spec.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { Grid } from '../../model/grid.ts';
import { applyOverrides, derivedNumbers, resolveScenario, validateScenario } from '../../model/scenario/index.ts';
import { State } from '../../model/state.ts';
import { issueAt, issuesOf } from '../support/scenario-example.ts';

const SHIPPED = JSON.parse(readFileSync('configs/coupled-oscillation.json', 'utf8'));
const BETA = (2 * EARTH.omega) / EARTH.radius;

function scenario(): any {
  return structuredClone(SHIPPED);
}

function answeringOf(sc: any): AnsweringPart {
  const r = validateScenario(sc);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.scenario.wind.parts[1] as AnsweringPart;
}

const SUB = { warm: 2, warmDepth: 25, cold: 4, coldDepth: 50 };

describe('the subsurface temperature relation', () => {
  it('is bounded by its two amplitudes, continuous through 0, with the slopes warm/warmDepth and cold/coldDepth there', () => {
    expect(subsurfaceTemperature(0, SUB)).toBe(0);
    expect(subsurfaceTemperature(1e4, SUB)).toBeCloseTo(2, 12);
    expect(subsurfaceTemperature(-1e4, SUB)).toBeCloseTo(-4, 12);
    expect(subsurfaceTemperature(0.01, SUB) / 0.01).toBeCloseTo(2 / 25, 6);
    expect(subsurfaceTemperature(-0.01, SUB) / -0.01).toBeCloseTo(4 / 50, 6);
    // tanh(1) of each amplitude one depth scale away (Zebiak & Cane 1987 style, our numbers).
    expect(subsurfaceTemperature(25, SUB)).toBeCloseTo(2 * Math.tanh(1), 12);
    expect(subsurfaceTemperature(-50, SUB)).toBeCloseTo(-4 * Math.tanh(1), 12);
  });
});

describe('the SST update', () => {
  const grid = new Grid(
    { lonWest: 0, lonEast: 20, latSouth: -5, latNorth: 5, dLon: 1, dLat: 1, land: [] },
    EARTH.radius,
  );
  const physics = defaultPhysics();
  const ctx = { physics, fCentre: new Float64Array(grid.ny).map((_, j) => physics.beta * grid.yCentre[j]) };
  const spec = {
    region: { kind: 'uniform' as const },
    upwellingDays: 30,
    dampingDays: 120,
    subsurface: SUB,
    meanGradient: 0,
    initial: 0,
  };

  it('relaxes to w T_sub / (w + eps_T) under a fixed thermocline, whatever the interval', () => {
    const sst = new SstAnomaly(grid, spec);
    for (const days of [0.5, 5, 60]) {
      const t = grid.field();
      const h = grid.field().fill(10);
      const u = grid.field();
      for (let n = 0; n < 4000; n++) sst.step(t, h, u, grid.field(), grid.field(), days * 86400, ctx);
      const w = 1 / 30;
      const e = 1 / 120;
      const k = grid.idx(3, 4);
      expect(t[k]).toBeCloseTo((w * subsurfaceTemperature(10, SUB)) / (w + e), 10);
    }
  });

  it('a single update over a short interval is dT/dt = w (T_sub - T) - eps_T T to first order', () => {
    const sst = new SstAnomaly(grid, spec);
    const t = grid.field().fill(0.3);
    const h = grid.field().fill(-20);
    const dt = 600;
    const before = t[grid.idx(2, 2)];
    sst.step(t, h, grid.field(), grid.field(), grid.field(), dt, ctx);
    const w = 1 / (30 * 86400);
    const e = 1 / (120 * 86400);
    const rate = (t[grid.idx(2, 2)] - before) / dt;
    // The semi-implicit form differs by the factor 1 / (1 + dt (w + eps_T)), here 3e-4.
    expect(rate / (w * (subsurfaceTemperature(-20, SUB) - before) - e * before)).toBeCloseTo(
      1 / (1 + dt * (w + e)),
      12,
    );
  });

  it('eastward surface flow carries warm water east against a mean gradient cooling eastward', () => {
    const sst = new SstAnomaly(grid, { ...spec, meanGradient: -2, upwellingDays: 1e3, dampingDays: 1e4 });
    const t = grid.field();
    const u = grid.field().fill(0.3);
    sst.step(t, grid.field(), u, grid.field(), grid.field(), 86400, ctx);
    const k = grid.idx(5, 2);
    // -u G = -0.3 * (-2e-6 K/m) = 6e-7 K/s: about 0.052 K in a day.
    expect(t[k]).toBeCloseTo((86400 * 0.3 * 2e-6) / (1 + 86400 * (1 / (1e3 * 86400) + 1 / (1e4 * 86400))), 9);
    expect(t[k]).toBeGreaterThan(0);
  });

  it('refuses a region that changes in time, with the reason', () => {
    expect(() => new SstAnomaly(grid, { ...spec, region: { kind: 'formula', expression: 'cos(t)' } })).toThrow(
      /must not change in time/,
    );
  });
});

describe('the answering stress', () => {
  const grid = new Grid(
    { lonWest: 0, lonEast: 60, latSouth: -15, latNorth: 15, dLon: 1, dLat: 1, land: [] },
    EARTH.radius,
  );
  const part = (over: Partial<AnsweringPart>): AnsweringPart => ({ ...answeringOf(scenario()), ...over });
  const spec = (p: AnsweringPart): WindSpec => ({
    parts: [p],
    bulk: { airDensity: 1.2, drag: 'large-pond', dragCoefficient: 1.2e-3 },
    updateHours: 3,
  });

  it('linear drag: rho_air C_D |U_b| mu u, on the faces; bulk: B(U_b + u) - B(U_b), the same for small winds to within the curvature', () => {
    const lin = buildWindStress(grid, spec(part({ strength: 1, drag: 'linear' })), { seed: 's', beta: BETA })
      .answering!;
    const blk = buildWindStress(grid, spec(part({ strength: 1, drag: 'bulk' })), { seed: 's', beta: BETA }).answering!;
    lin.answerTestAnomaly(0.01);
    blk.answerTestAnomaly(0.01);
    const c = makeBulkFormula({ airDensity: 1.2, drag: 'large-pond', dragCoefficient: 1.2e-3 }).factor(-6, 0);
    expect(c).toBeCloseTo(1.2 * 1.2e-3 * 6, 12);
    let big = 0;
    let k0 = 0;
    lin.stressU.forEach((v, k) => {
      if (Math.abs(v) > big) {
        big = Math.abs(v);
        k0 = k;
      }
    });
    expect(big).toBeGreaterThan(0);
    // Bulk about a zonal background: the zonal stress anomaly is 2 rho C_D |U| u for small u (C_D constant below 11 m/s).
    expect(blk.stressU[k0] / lin.stressU[k0]).toBeCloseTo(2, 2);
    // Linear in the anomaly: ten times the SST, ten times the stress.
    lin.answerTestAnomaly(0.1);
    expect(lin.stressU[k0] / big).toBeCloseTo(10 * Math.sign(lin.stressU[k0]), 10);
  });

  it('a warm east gives westerlies to its west on the equator (the Bjerknes feedback), easterlies to its east', () => {
    const a = buildWindStress(
      grid,
      spec(part({ sst: { ...part({}).sst, region: { kind: 'patch', lon: 30, lat: 0, lonWidth: 5, latWidth: 3 } } })),
      { seed: 's', beta: BETA },
    ).answering!;
    a.answerTestAnomaly(1);
    const w = a.centredWind();
    const j = grid.nearestRow(0.5);
    expect(w.u[grid.idx(20, j)]).toBeGreaterThan(0);
    expect(w.u[grid.idx(45, j)]).toBeLessThan(0);
    // Westerlies of about mu/2 per kelvin of projected heating at most: here a few m/s for mu = 20.
    expect(Math.abs(w.u[grid.idx(20, j)])).toBeLessThan(10);
  });

  it('adds nothing at strength 0, and the wind of a steady design stays steady with an answering part', () => {
    const built = buildWindStress(grid, spec(part({ strength: 0 })), { seed: 's', beta: BETA });
    built.answering!.answerTestAnomaly(3);
    const tx = grid.field();
    const ty = grid.field();
    built.stress.fill(0, tx, ty);
    expect(tx.every((x) => x === 0) && ty.every((x) => x === 0)).toBe(true);
    expect(built.stress.steady).toBe(true);
    expect(built.stress.coupling?.everySteps).toBe(8);
  });

  it('refuses a second answering part', () => {
    const p = part({});
    expect(() => buildWindStress(grid, { ...spec(p), parts: [p, p] }, { seed: 's', beta: BETA })).toThrow(
      /at most one answering part/,
    );
  });

  it('keeps the SST in the state: a fresh start gets initial x S', () => {
    const built = buildWindStress(
      grid,
      spec(part({ sst: { ...part({}).sst, initial: 0.7, region: { kind: 'uniform' } } })),
      { seed: 's', beta: BETA },
    );
    const state = new State(grid);
    built.stress.coupling!.start(state, { physics: defaultPhysics(), dt: 3600, fCentre: new Float64Array(grid.ny) });
    expect(state.sst![grid.idx(10, 10)]).toBe(0.7);
    expect(state.sst![0]).toBe(0); // the halo
    expect(state.clone().sst![grid.idx(10, 10)]).toBe(0.7);
  });
});

describe('indices and the mode fit', () => {
  it('the eastern index is the S-weighted mean of T; the warm water the mean h between 5S and 5N', () => {
    const layout = {
      nx: 3,
      ny: 3,
      lat: [-10, 0, 4],
      ocean: [1, 1, 1, 1, 1, 1, 1, 0, 1],
      index: (i: number, j: number) => j * 3 + i,
    };
    const region = [0, 0, 0, 1, 0.5, 0, 0, 0, 0];
    const sst = [9, 9, 9, 1, 4, 9, 9, 9, 9];
    const h = [100, 100, 100, 1, 2, 3, 4, 50, 6];
    const c = coupledIndices(layout, region, sst, h);
    expect(c.eastSst).toBeCloseTo((1 + 0.5 * 4) / 1.5, 12);
    expect(c.warmWater).toBeCloseTo((1 + 2 + 3 + 4 + 6) / 5, 12); // the land cell (50) is left out
  });

  it('recovers the period and growth rate of a damped and of a growing sinusoid sampled every 10 days', () => {
    for (const [period, sigma] of [
      [900, -0.2 / 365.25],
      [700, 0.3 / 365.25],
    ]) {
      const days = Array.from({ length: 400 }, (_, k) => 10 * k);
      const x = days.map((t) => Math.exp(sigma * t) * Math.cos((2 * Math.PI * t) / period + 0.4));
      const fit = fitOscillation(days, x)!;
      expect(fit.periodDays / period).toBeCloseTo(1, 3);
      expect(fit.growthPerDay / sigma).toBeCloseTo(1, 2);
      // A series a quarter period ahead leads by 0.25.
      const ahead = days.map((t) => Math.exp(sigma * t) * Math.cos((2 * Math.PI * (t + period / 4)) / period + 0.4));
      expect(phaseLead(days, ahead, x, fit)).toBeCloseTo(0.25, 3);
      expect(phaseLead(days, x, ahead, fit)).toBeCloseTo(-0.25, 3);
    }
  });

  it('says when there is no oscillation to measure', () => {
    const days = Array.from({ length: 100 }, (_, k) => k);
    expect(
      fitOscillation(
        days,
        days.map((d) => Math.exp(-d / 30)),
      ),
    ).toBeNull();
    expect(
      coupledMode(
        days,
        days.map(() => 0),
        days.map(() => 0),
      ),
    ).toBeNull();
    expect(coupledModeLine(null)).toMatch(/no oscillation to measure/);
  });
});

describe('the answering part in a scenario', () => {
  it('validates with every default filled in', () => {
    const sc = scenario();
    const p = sc.wind.parts[1];
    for (const k of ['everySteps', 'drag', 'background', 'atmosphere']) delete p[k];
    p.sst = { region: p.sst.region };
    const a = answeringOf(sc);
    expect(a.everySteps).toBe(8);
    expect(a.drag).toBe('linear');
    expect(a.background).toEqual({ x: -6, y: 0 });
    expect(a.atmosphere).toEqual({ speed: 30, dampingDays: 2, heatingModes: 1 });
    expect(a.sst).toMatchObject({ upwellingDays: 30, dampingDays: 125, subsurface: SUB, meanGradient: 0, initial: 0 });
  });

  it('refuses what the schema and the checks cannot accept, each at its path', () => {
    const a = scenario();
    a.wind.parts[1].atmosphere.heatingModes = 9;
    expect(issueAt(issuesOf(a), 'wind.parts[1].atmosphere.heatingModes').message).toMatch(/8/);
    const b = scenario();
    b.wind.parts.push(structuredClone(b.wind.parts[1]));
    expect(issueAt(issuesOf(b), 'wind.parts[2]').message).toMatch(/at most one answering part/);
    const c = scenario();
    c.wind.parts[1].enabled = false;
    expect(issueAt(issuesOf(c), 'output.fields[5]').message).toMatch(/sst_anom comes from an answering wind part/);
    const d = scenario();
    Object.assign(d.basin, { latSouth: 2, latNorth: 20 });
    d.probes = [];
    d.hovmoller = { lat: [10] };
    expect(issuesOf(d).some((i) => i.path === 'wind.parts[1]' && /reach across the equator/.test(i.message))).toBe(
      true,
    );
    const e = scenario();
    e.wind.parts[1].background = { x: 0, y: 0 };
    expect(issueAt(issuesOf(e), 'wind.parts[1].background').message).toMatch(/no stress at all/);
    const f = scenario();
    f.wind.parts[1].everySteps = 200;
    expect(issueAt(issuesOf(f), 'wind.parts[1].everySteps').message).toMatch(
      /more than a quarter of the SST's relaxation time .* use at most 41/,
    );
    const g = scenario();
    delete g.wind.parts[1].sst.region;
    expect(issuesOf(g).some((i) => i.path.startsWith('wind.parts[1].sst'))).toBe(true);
  });

  it('takes --set on its paths, and names the keys it has', () => {
    const r = applyOverrides(SHIPPED, [
      'wind.parts[1].strength=25',
      'wind.parts[1].atmosphere.speed=40',
      'wind.parts[1].sst.subsurface.warm=3',
    ]);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const p = r.scenario.wind.parts[1] as AnsweringPart;
    expect([p.strength, p.atmosphere.speed, p.sst.subsurface.warm]).toEqual([25, 40, 3]);
    const bad = applyOverrides(SHIPPED, ['wind.parts[1].strenght=25']);
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.errors[0].message).toMatch(/did you mean 'strength'/);
  });

  it('derived numbers: the atmosphere radius, decay lengths, coupling interval and SST relaxation time', () => {
    const r = validateScenario(SHIPPED);
    if (!r.ok) throw new Error('invalid');
    const res = resolveScenario(r.scenario);
    const d = derivedNumbers(res);
    const a = d.answering!;
    expect(a.part).toBe(1);
    expect(a.atmosphereRadiusKm).toBeCloseTo(Math.sqrt(30 / d.beta) / 1000, 9);
    expect(a.kelvinDecayKm).toBeCloseTo((30 * 2 * 86400) / 1000, 9);
    expect(a.rossbyDecayKm).toBeCloseTo(a.kelvinDecayKm / 3, 9);
    expect(a.couplingDays).toBeCloseTo((8 * d.dt) / 86400, 12);
    expect(a.sstRelaxationDays).toBeCloseTo(1 / (1 / 30 + 1 / 125), 12);
    const plain = structuredClone(SHIPPED);
    plain.wind.parts.pop();
    plain.output.fields = ['h_anom'];
    const rp = validateScenario(plain);
    expect(rp.ok && derivedNumbers(resolveScenario(rp.scenario)).answering).toBeNull();
  });
});

describe('a region that misses the ocean', () => {
  it('is refused when the model is built, saying why', () => {
    const sc = scenario();
    sc.wind.parts[1].sst.region = { kind: 'patch', lon: 85, lat: 0, lonWidth: 0.01, latWidth: 0.01 };
    // The patch falls between cell centres (84.75 and 85.25) and is below 1e-6 at both.
    const r = validateScenario(sc);
    if (!r.ok) throw new Error('invalid');
    const grid = new Grid(resolveScenario(r.scenario).model.basin, EARTH.radius);
    expect(() => buildWindStress(grid, r.scenario.wind, { seed: 's', beta: BETA })).toThrow(
      /wind part 2 \('answering wind'\): sst.region: patch is 0 on every ocean cell/,
    );
  });
});
