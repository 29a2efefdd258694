// buildWindStress: parts on the C grid, bulk conversion of the summed wind, envelopes in time,
// caching between updates, the steady flag.
import { describe, expect, it } from 'vitest';
import { Grid } from '../../model/grid.ts';
import { EARTH } from '../../model/config.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { compileShape } from '../../model/forcing/shapes.ts';
import { pulseFactor } from '../../model/forcing/envelopes.ts';
import type { BulkSpec, EnvelopeSpec, FixedPart, ShapeSpec, WindPart, WindSpec } from '../../model/forcing/spec.ts';

// A small basin with an island, so that land faces exist.
const grid = new Grid(
  {
    lonWest: 140,
    lonEast: 160,
    latSouth: -5,
    latNorth: 5,
    dLon: 1,
    dLat: 0.5,
    land: [{ kind: 'rectangle', lonWest: 150, lonEast: 152, latSouth: 1, latNorth: 2 }],
  },
  EARTH.radius,
);
const lp: BulkSpec = { airDensity: 1.2, drag: 'large-pond', dragCoefficient: 0 };
const DAY = 86400;

function spec(parts: WindPart[], updateHours = 0): WindSpec {
  return { parts, bulk: lp, updateHours };
}
function shaped(
  quantity: 'stress' | 'wind',
  x: number,
  y: number,
  envelope: EnvelopeSpec = { kind: 'constant' },
  shape: ShapeSpec = { kind: 'uniform' },
): FixedPart {
  return { kind: 'fixed', quantity, source: { kind: 'shaped', shape, x, y }, envelope };
}
function fillAt(w: ReturnType<typeof buildWindStress>, days: number): [Float64Array, Float64Array] {
  // Garbage first: fill() must overwrite everything.
  const tx = grid.field().fill(7);
  const ty = grid.field().fill(7);
  w.stress.fill(days * DAY, tx, ty);
  return [tx, ty];
}
/** Every u face (value, lon, lat, ocean?) and every v face. */
function* uFaces(tx: Float64Array) {
  for (let j = 0; j < grid.ny; j++)
    for (let i = 0; i <= grid.nx; i++) {
      const k = grid.idx(i, j);
      yield { value: tx[k], lon: grid.lonFace[i], lat: grid.latCentre[j], ocean: grid.maskU[k] === 1 };
    }
}
function* vFaces(ty: Float64Array) {
  for (let j = 0; j <= grid.ny; j++)
    for (let i = 0; i < grid.nx; i++) {
      const k = grid.idx(i, j);
      yield { value: ty[k], lon: grid.lonCentre[i], lat: grid.latFace[j], ocean: grid.maskV[k] === 1 };
    }
}
function count(a: Float64Array, m: Float64Array): number {
  let n = 0;
  for (let k = 0; k < a.length; k++) if (m[k] === 1) n++;
  return n;
}

describe('buildWindStress', () => {
  it('a uniform stress part gives the exact amplitude on every ocean face and 0 elsewhere', () => {
    const w = buildWindStress(grid, spec([shaped('stress', -0.05, 0.02)]), { seed: 'a' });
    expect(w.stress.steady).toBe(true);
    const [tx, ty] = fillAt(w, 3);
    let ocean = 0;
    for (const f of uFaces(tx)) {
      expect(f.value).toBe(f.ocean ? -0.05 : 0);
      if (f.ocean) ocean++;
    }
    for (const f of vFaces(ty)) expect(f.value).toBe(f.ocean ? 0.02 : 0);
    expect(ocean).toBe(count(tx, grid.maskU));
    expect(ocean).toBeLessThan((grid.nx + 1) * grid.ny); // the island and the coasts are there
    // the halo and everything outside the faces are 0 too
    const sumAbs = (a: Float64Array) => a.reduce((s, v) => s + Math.abs(v), 0);
    expect(sumAbs(tx)).toBeCloseTo(0.05 * count(tx, grid.maskU), 10);
    expect(sumAbs(ty)).toBeCloseTo(0.02 * count(ty, grid.maskV), 10);
  });

  it('a wind part gives the bulk stress (Large & Pond 1981 check values, rho_a = 1.2)', () => {
    // check-values.md section 0: U = 7 m/s -> 0.071 N m-2; 3-4-5 wind: |U| = 5 -> 0.036 N m-2.
    const w = buildWindStress(grid, spec([shaped('wind', -7, 0)]), { seed: 'a' });
    const [tx, ty] = fillAt(w, 0);
    for (const f of uFaces(tx)) if (f.ocean) expect(Math.abs(f.value + 0.071)).toBeLessThan(0.0005);
    for (const f of vFaces(ty)) expect(f.value).toBe(0);
    const d = buildWindStress(grid, spec([shaped('wind', 3, -4)]), { seed: 'a' });
    const [dx, dy] = fillAt(d, 0);
    const k = grid.idx(3, 4);
    expect(dx[k]).toBeCloseTo(0.036 * 0.6, 12);
    expect(dy[k]).toBeCloseTo(-0.036 * 0.8, 12);
  });

  it('wind parts are summed before the bulk formula, stress parts added after', () => {
    // 4 + 3 m/s eastward = 7 m/s: 1.2 * 1.2e-3 * 49 = 0.07056, not 1.2*1.2e-3*(16 + 9) = 0.036.
    const w = buildWindStress(grid, spec([shaped('wind', 4, 0), shaped('wind', 3, 0), shaped('stress', 0.01, 0)]), {
      seed: 'a',
    });
    const [tx] = fillAt(w, 0);
    expect(tx[grid.idx(5, 5)]).toBeCloseTo(0.07056 + 0.01, 12);
  });

  it('the cross component of the wind enters |U| on each face', () => {
    // Wind (x, y) = (-6, 8) m/s from a latitude band: |U| = 10 on every face where the shape is 1.
    // taux on u faces: 1.2 * 1.2e-3 * 10 * (-6) = -0.0864; tauy on v faces: 0.1152 (Large & Pond 1981).
    const w = buildWindStress(
      grid,
      spec([
        shaped(
          'wind',
          -6,
          8,
          { kind: 'constant' },
          { kind: 'band', profile: { kind: 'tanh', south: -40, north: 40, edge: 1 } },
        ),
      ]),
      { seed: 'a' },
    );
    const [tx, ty] = fillAt(w, 0);
    expect(tx[grid.idx(2, 3)]).toBeCloseTo(-0.0864, 12);
    expect(ty[grid.idx(2, 3)]).toBeCloseTo(0.1152, 12);
  });

  it('shapes are evaluated at the true face positions', () => {
    const shape: ShapeSpec = { kind: 'patch', lon: 147, lat: -1, lonWidth: 4, latWidth: 2, tiltDeg: 30 };
    const w = buildWindStress(grid, spec([shaped('stress', 0.1, -0.2, { kind: 'constant' }, shape)]), { seed: 'a' });
    const [tx, ty] = fillAt(w, 0);
    const s = compileShape(shape);
    for (const f of uFaces(tx)) expect(f.value).toBe(f.ocean ? 0.1 * s.at(f.lon, f.lat, 0) : 0);
    for (const f of vFaces(ty)) expect(f.value).toBe(f.ocean ? -0.2 * s.at(f.lon, f.lat, 0) : 0);
  });

  it('envelopes scale the field in time; the steady flag follows', () => {
    const ramp: EnvelopeSpec = { kind: 'ramp', start: 10, duration: 20, direction: 'up' };
    const w = buildWindStress(grid, spec([shaped('stress', -0.08, 0, ramp)]), { seed: 'a' });
    expect(w.stress.steady).toBe(false);
    const k = grid.idx(4, 4);
    expect(fillAt(w, 5)[0][k]).toBe(0);
    expect(fillAt(w, 15)[0][k]).toBeCloseTo(-0.02, 15);
    expect(fillAt(w, 40)[0][k]).toBeCloseTo(-0.08, 15);
    // a wind part under a ramp: stress goes with the square of the envelope
    const v = buildWindStress(grid, spec([shaped('wind', -8, 0, ramp)]), { seed: 'a' });
    expect(fillAt(v, 20)[0][k]).toBeCloseTo(-1.2 * 1.2e-3 * 16, 12);
  });

  it('steady only if nothing varies in time', () => {
    const steady = (parts: WindPart[]) => buildWindStress(grid, spec(parts), { seed: 'a' }).stress.steady;
    expect(steady([])).toBe(true);
    expect(steady([shaped('wind', 5, 0), shaped('stress', 0, 0.01, { kind: 'harmonics', mean: 1, terms: [] })])).toBe(
      true,
    );
    expect(
      steady([shaped('stress', 0.1, 0, { kind: 'constant' }, { kind: 'formula', expression: 'cos(rad(lat))' })]),
    ).toBe(true);
    expect(
      steady([shaped('stress', 0.1, 0, { kind: 'constant' }, { kind: 'formula', expression: 'sin(2*pi*t/365)' })]),
    ).toBe(false);
    expect(steady([shaped('stress', 0.1, 0, { kind: 'switch-off', day: 30, ramp: 0 })])).toBe(false);
    const off = { ...shaped('stress', 0.1, 0, { kind: 'switch-off', day: 30, ramp: 0 }), enabled: false };
    expect(steady([off])).toBe(true);
  });

  it('a formula in t is re-evaluated; a NaN names the point', () => {
    const f = shaped('stress', 1, 0, { kind: 'constant' }, { kind: 'formula', expression: '0.01 * t * lat' });
    const w = buildWindStress(grid, spec([f]), { seed: 'a' });
    const k = grid.idx(2, 15);
    expect(fillAt(w, 8)[0][k]).toBeCloseTo(0.08 * grid.latCentre[15], 12);
    const bad = shaped('stress', 1, 0, { kind: 'constant' }, { kind: 'formula', expression: 'sqrt(lat)' });
    expect(() => buildWindStress(grid, spec([{ ...bad, name: 'trades' }]), { seed: 'a' })).toThrow(
      /^wind part 1 \('trades'\): formula 'sqrt\(lat\)' gives NaN at lon 141, lat -4.75, t 0 days \(a u face\)$/,
    );
    const later = shaped('stress', 1, 0, { kind: 'constant' }, { kind: 'formula', expression: 'log(10 - t)' });
    const lw = buildWindStress(grid, spec([later]), { seed: 'a' });
    expect(() => fillAt(lw, 12)).toThrow(/gives NaN at lon 141, lat -4.75, t 12 days/);
  });

  it('holds the last evaluation between updates, sampled at the middle of the interval', () => {
    const ramp: EnvelopeSpec = { kind: 'ramp', start: 0, duration: 10, direction: 'up' };
    const w = buildWindStress(grid, spec([shaped('stress', 1, 0, ramp)], 6), { seed: 'a' });
    const k = grid.idx(1, 1);
    // every time in [1 d, 1.25 d) gives the value at 1.125 d
    for (const t of [1, 1.1, 1.2499]) expect(fillAt(w, t)[0][k]).toBeCloseTo(0.1125, 15);
    expect(fillAt(w, 1.25)[0][k]).toBeCloseTo(0.1375, 15);
    // and going back in time works too
    expect(fillAt(w, 0)[0][k]).toBeCloseTo(0.0125, 15);
  });

  it('the impulse of a burst-like pulse is kept to 0.1% with 3-hour updates', () => {
    // Exact impulse of a pulse of amplitude a, duration D, ramps r: a (D - r) N m-2 day.
    const pulse: EnvelopeSpec = { kind: 'pulse', start: 10.37, duration: 13.3, ramp: 0.7 };
    const w = buildWindStress(grid, spec([shaped('stress', 0.1, 0, pulse)], 3), { seed: 'a' });
    const k = grid.idx(6, 6);
    const tx = grid.field();
    const ty = grid.field();
    const dt = 1800;
    let impulse = 0;
    for (let t = 0; t < 40 * DAY; t += dt) {
      w.stress.fill(t, tx, ty);
      impulse += (tx[k] * dt) / DAY;
    }
    const exact = 0.1 * (13.3 - 0.7);
    expect(Math.abs(impulse - exact) / exact).toBeLessThan(1e-3);
  });

  it('painted grids: bilinear onto the faces', () => {
    const lin = (lon: number, lat: number) => 0.001 * (lon - 150) + 0.002 * lat;
    const g = { lon0: 139, lat0: -6, dLon: 2, dLat: 1, nLon: 12, nLat: 13, x: [] as number[], y: [] as number[] };
    for (let j = 0; j < g.nLat; j++)
      for (let i = 0; i < g.nLon; i++) {
        g.x.push(lin(g.lon0 + i * g.dLon, g.lat0 + j * g.dLat));
        g.y.push(-lin(g.lon0 + i * g.dLon, g.lat0 + j * g.dLat));
      }
    const part: FixedPart = {
      kind: 'fixed',
      quantity: 'stress',
      source: { kind: 'painted', grid: g },
      envelope: { kind: 'constant' },
    };
    const [tx, ty] = fillAt(buildWindStress(grid, spec([part]), { seed: 'a' }), 0);
    for (const f of uFaces(tx)) expect(f.value).toBeCloseTo(f.ocean ? lin(f.lon, f.lat) : 0, 13);
    for (const f of vFaces(ty)) expect(f.value).toBeCloseTo(f.ocean ? -lin(f.lon, f.lat) : 0, 13);
  });

  it('CSV files with a day column: linear in time; a missing file is named', () => {
    const rows = ['lon,lat,day,x,y'];
    for (const day of [0, 10])
      for (const lat of [-6, 6])
        for (const lon of [130, 170]) rows.push(`${lon},${lat},${day},${day === 0 ? -0.02 : -0.06},0`);
    const part: FixedPart = {
      kind: 'fixed',
      quantity: 'stress',
      source: { kind: 'file', path: 'winds.csv', format: 'csv' },
      envelope: { kind: 'constant' },
    };
    const w = buildWindStress(grid, spec([part]), { seed: 'a', files: new Map([['winds.csv', rows.join('\n')]]) });
    expect(w.stress.steady).toBe(false);
    const k = grid.idx(3, 3);
    expect(fillAt(w, 2.5)[0][k]).toBeCloseTo(-0.03, 14);
    expect(fillAt(w, 50)[0][k]).toBeCloseTo(-0.06, 14);
    expect(() => buildWindStress(grid, spec([part]), { seed: 'a' })).toThrow(
      "wind part 1: the file 'winds.csv' was not provided",
    );
  });

  it('bursts: the field is the sum of the drawn patches under their pulses', () => {
    const part: WindPart = {
      kind: 'bursts',
      quantity: 'stress',
      ratePerYear: 40,
      window: [0, 60],
      amplitude: [0.05, 0.1],
      lon: [142, 158],
      lat: [-2, 2],
      lonWidth: [2, 5],
      latWidth: [1, 3],
      duration: [5, 15],
      ramp: 1,
    };
    const w = buildWindStress(grid, spec([shaped('stress', -0.01, 0), part]), { seed: 'wwb' });
    const again = buildWindStress(grid, spec([shaped('stress', -0.01, 0), part]), { seed: 'wwb' });
    expect(again.bursts).toEqual(w.bursts);
    expect(w.bursts.length).toBeGreaterThan(1);
    expect(w.bursts.every((b) => b.part === 1)).toBe(true);
    expect(w.stress.steady).toBe(false);
    const b0 = w.bursts[0];
    const day = b0.start + b0.duration / 2;
    const [tx, ty] = fillAt(w, day);
    for (const f of uFaces(tx)) {
      if (!f.ocean) continue;
      let expected = -0.01;
      for (const b of w.bursts) {
        const patch = compileShape({
          kind: 'patch',
          lon: b.lon,
          lat: b.lat,
          lonWidth: b.lonWidth,
          latWidth: b.latWidth,
        });
        expected += b.amplitude * pulseFactor(day, b.start, b.duration, b.ramp) * patch.at(f.lon, f.lat, 0);
      }
      expect(f.value).toBeCloseTo(expected, 13);
    }
    for (const f of vFaces(ty)) expect(f.value).toBe(0);
  });

  it('rejects bad settings with the part named', () => {
    expect(() => buildWindStress(grid, { ...spec([]), updateHours: -1 }, { seed: 'a' })).toThrow(/updateHours/);
    const bad = shaped('stress', 1, 0, { kind: 'pulse', start: 0, duration: 1, ramp: 2 });
    expect(() =>
      buildWindStress(grid, spec([shaped('stress', 1, 0), { ...bad, name: 'burst' }]), { seed: 'a' }),
    ).toThrow(/^wind part 2 \('burst'\): pulse ramp/);
    const f = shaped('stress', 1, 0, { kind: 'constant' }, { kind: 'formula', expression: 'lat + lonn' });
    expect(() => buildWindStress(grid, spec([f]), { seed: 'a' })).toThrow(
      "wind part 1: unknown name 'lonn' at character 6",
    );
    const w = buildWindStress(grid, spec([]), { seed: 'a' });
    expect(() => w.stress.fill(0, new Float64Array(3), grid.field())).toThrow(/padded size/);
  });
});
