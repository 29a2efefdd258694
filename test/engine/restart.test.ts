import { describe, expect, it } from 'vitest';
import { InputError } from '../../model/errors.ts';
import { Grid } from '../../model/grid.ts';
import { Model } from '../../model/model.ts';
import { writeNetcdfToMemory } from '../../model/io/netcdf-writer.ts';
import { NC_DOUBLE } from '../../model/io/netcdf-format.ts';
import { readRestart, readStartFile, writeRestart } from '../../model/io/restart.ts';
import { buildModel } from '../../model/scenario/build.ts';
import { buildPrepared, parseScenario } from '../../model/scenario/load-inputs.ts';
import type { State } from '../../model/state.ts';
import { FIXTURE, FIXTURE_TEXT } from '../support/engine-fixture.ts';

function same(a: Float64Array | Float32Array, b: Float64Array | Float32Array): boolean {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));
}

function expectIdentical(a: State, b: State): void {
  expect(same(a.u, b.u)).toBe(true);
  expect(same(a.v, b.v)).toBe(true);
  expect(same(a.h, b.h)).toBe(true);
  expect(a.time).toBe(b.time);
  expect(a.steps).toBe(b.steps);
  expect(a.historyCount).toBe(b.historyCount);
  for (const k of ['du', 'dv', 'dh'] as const)
    for (const n of [0, 1]) expect(same(a.history[k][n], b.history[k][n])).toBe(true);
}

const scenario = (sets: string[]) =>
  parseScenario(FIXTURE_TEXT, FIXTURE, ['basin.resolution=0.25', 'time.days=20', ...sets]);
const parsed = (sets: string[]) => scenario(sets).resolved;

describe('restart files', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    it(`continue a ${mode} run bit for bit: 2N steps = N, restart, N`, async () => {
      const sc = scenario([`physics.dynamics=${mode}`]);
      const r = sc.resolved;
      const N = 23;
      const straight = buildModel(r).model;
      straight.advance(2 * N);

      const first = buildModel(r).model;
      first.advance(N);
      const bytes = await writeRestart(first, { scenarioJson: JSON.stringify(r.scenario) });
      const state = readRestart(bytes, first.grid);
      expectIdentical(state, first.state);
      if (mode === 'nonlinear') expect(state.historyCount).toBe(2);
      const second = buildPrepared(sc, { files: new Map(), startState: state, startDt: first.dt, notes: [] }).model;
      second.advance(N);
      expectIdentical(second.state, straight.state);
      // The wind went on varying with time (pulse ramps): the clock came through too.
      expect(second.day).toBe(straight.day);
    });
  }

  it('keep the clock: a restart between whole intervals reads the same times as the straight run, step by step', async () => {
    // Wind evaluated at every step, so a time one ulp off would change the stress.
    const sc = scenario(['physics.reducedGravity=0.037', 'wind.updateHours=0']);
    const r = sc.resolved;
    const straight = buildModel(r).model;
    // A step that is not a whole number of seconds, and a restart that is not on a whole interval:
    // counting from the restart would round differently from counting from day 0.
    expect(Number.isInteger(straight.dt)).toBe(false);
    const N = straight.clock.spec.stepsPerInterval;
    const cut = N + Math.floor(N / 2) + 1;
    const first = buildModel(r).model;
    first.advance(cut);
    straight.advance(cut);
    const state = readRestart(await writeRestart(first), first.grid);
    expect(state.clock).toEqual(first.clock.spec);
    expect(state.clock!.originSteps).toBe(0);
    const second = buildPrepared(sc, { files: new Map(), startState: state, startDt: first.dt, notes: [] }).model;
    expect(second.clock.spec).toEqual(straight.clock.spec);
    let offTime = 0;
    let offRestarted = 0;
    const anchored = second.state.time; // what a clock starting at the restart would count from
    for (let k = 1; k <= 3 * N; k++) {
      straight.advance(1);
      second.advance(1);
      if (second.state.time !== straight.state.time) offTime++;
      if (anchored + (k * straight.clock.spec.intervalSeconds) / N !== straight.state.time) offRestarted++;
    }
    expect(offTime).toBe(0);
    // The comparison can fail: a clock counting from the restart misses some of these times.
    expect(offRestarted).toBeGreaterThan(0);
    expectIdentical(second.state, straight.state);
  });

  it('a restart with another time step starts a clock of its own at the restart', async () => {
    const sc = scenario(['physics.reducedGravity=0.037']);
    const first = buildModel(sc.resolved).model;
    first.advance(7);
    const state = readRestart(await writeRestart(first), first.grid);
    const other = scenario(['physics.reducedGravity=0.037', 'time.outputEveryDays=0.25']);
    const m = buildPrepared(other, { files: new Map(), startState: state, startDt: first.dt, notes: [] }).model;
    expect(m.dt).not.toBe(first.dt);
    expect(m.clock.spec).toMatchObject({ originSteps: 7, originTime: first.state.time, intervalSeconds: 21600 });
    m.advance(m.clock.spec.stepsPerInterval);
    expect(m.state.time).toBe(first.state.time + 21600);
  });

  it('refuses a restart whose clock does not fit its time', async () => {
    const m = buildModel(parsed([])).model;
    m.advance(5);
    m.state.clock = { ...m.state.clock!, originTime: 1000 };
    const bytes = await writeRestart(m);
    expect(() => readRestart(bytes, m.grid, 'odd.nc')).toThrow(/odd\.nc: has a corrupt clock/);
  });

  it('refuses files that are not Pycno restarts, other grids and other land, saying why', async () => {
    const r = parsed([]);
    const m = buildModel(r).model;
    m.advance(3);
    const bytes = await writeRestart(m);
    const other = new Grid({ ...m.grid.basin, lonEast: 200 }, m.grid.earthRadius);
    expect(() => readRestart(bytes, other, 'old.nc')).toThrow(
      /old\.nc: is on a 160 x 80 grid, the scenario on 200 x 80/,
    );
    const shifted = new Grid({ ...m.grid.basin, lonWest: 151, lonEast: 191 }, m.grid.earthRadius);
    expect(() => readRestart(bytes, shifted, 'old.nc')).toThrow(/basin\.lonWest = 150, the scenario 151/);
    const noLand = new Grid({ ...m.grid.basin, land: [] }, m.grid.earthRadius);
    expect(() => readRestart(bytes, noLand, 'old.nc')).toThrow(/different land: \d+ cells/);
    const plain = await writeNetcdfToMemory(
      { dimensions: [{ name: 'x', length: 2 }], variables: [{ name: 'a', type: NC_DOUBLE, dimensions: ['x'] }] },
      { a: [1, 2] },
    );
    expect(() => readRestart(plain, m.grid, 'plain.nc')).toThrow(/plain\.nc: is not a Pycno restart file/);
    expect(() => readRestart(new TextEncoder().encode('{"format": 1}'), m.grid, 'x.json')).toThrow(
      /x\.json: cannot be read as NetCDF: not a NetCDF file/,
    );
    // Truncated: the header promises variables the bytes do not hold.
    expect(() => readRestart(bytes.subarray(0, bytes.length - 100), m.grid, 'cut.nc')).toThrow(
      /cut\.nc: cannot be read as NetCDF: truncated/,
    );
    try {
      readRestart(plain, m.grid, 'plain.nc');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
    }
  });

  it('a model refuses a start state of another size', async () => {
    const r = parsed([]);
    const m = buildModel(r).model;
    const small = new Model({ ...r.model, basin: { ...r.model.basin, lonEast: 170 } });
    expect(() => new Model(r.model, { initial: small.state })).toThrow(
      /restart state is on a 80 x 80 grid, the scenario on 160 x 80/,
    );
    void m;
  });

  it('readStartFile takes a restart exactly', async () => {
    const r = parsed(['physics.dynamics=nonlinear']);
    const m = buildModel(r).model;
    m.advance(7);
    const start = readStartFile(await writeRestart(m), m.grid, 'spin.nc');
    expect(start.exact).toBe(true);
    expect(start.dt).toBe(m.dt);
    expectIdentical(start.state, m.state);
  });
});
