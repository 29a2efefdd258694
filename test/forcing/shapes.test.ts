// Shapes, band profiles and envelopes against values worked out by hand from their definitions
// in model/forcing/spec.ts (no outside source needed: these are our own definitions).
import { describe, expect, it } from 'vitest';
import { compileBand, compileShape } from '../../model/forcing/shapes.ts';
import { compileEnvelope, pulseFactor } from '../../model/forcing/envelopes.ts';
import { ForcingError } from '../../model/forcing/errors.ts';

describe('shapes', () => {
  it('uniform is 1 everywhere', () => {
    const s = compileShape({ kind: 'uniform' });
    expect(s.at(123, -7, 50)).toBe(1);
    expect(s.timeDependent).toBe(false);
  });

  it('patch: Gaussian with the widths as standard deviations', () => {
    const s = compileShape({ kind: 'patch', lon: 160, lat: 0, lonWidth: 10, latWidth: 5 });
    expect(s.at(160, 0, 0)).toBe(1);
    // one sigma east: exp(-1/2) = 0.60653
    expect(s.at(170, 0, 0)).toBeCloseTo(0.6065306597, 9);
    // one sigma north and one east: exp(-1) = 0.36788
    expect(s.at(170, 5, 0)).toBeCloseTo(0.3678794412, 9);
    // two sigma south: exp(-2) = 0.13534
    expect(s.at(160, -10, 0)).toBeCloseTo(0.1353352832, 9);
  });

  it('patch tilt turns the long axis anticlockwise', () => {
    // Long axis 10 deg, short 2 deg, turned 90 deg: the long axis now points north.
    const s = compileShape({ kind: 'patch', lon: 0, lat: 0, lonWidth: 10, latWidth: 2, tiltDeg: 90 });
    expect(s.at(0, 10, 0)).toBeCloseTo(Math.exp(-0.5), 12);
    expect(s.at(2, 0, 0)).toBeCloseTo(Math.exp(-0.5), 12);
    // 45 deg: a point 10 deg along the diagonal is one long sigma away.
    const d = compileShape({ kind: 'patch', lon: 0, lat: 0, lonWidth: 10, latWidth: 2, tiltDeg: 45 });
    const r = 10 / Math.SQRT2;
    expect(d.at(r, r, 0)).toBeCloseTo(Math.exp(-0.5), 12);
    expect(d.at(-r, r, 0)).toBeCloseTo(Math.exp(-0.5 * 25), 12);
  });

  it('band cosine: cos(pi/2 (lat - c)/hw) inside, 0 outside', () => {
    const f = compileBand({ kind: 'cosine', centre: 2, halfWidth: 10 });
    expect(f(2)).toBe(1);
    expect(f(7)).toBeCloseTo(Math.SQRT1_2, 12); // cos(pi/4)
    expect(f(-3)).toBeCloseTo(Math.SQRT1_2, 12);
    expect(f(12)).toBe(0);
    expect(f(-20)).toBe(0);
  });

  it('band tanh: 1 inside, 1/2 on the edge latitudes, 0 far out', () => {
    const f = compileBand({ kind: 'tanh', south: -10, north: 10, edge: 1 });
    expect(f(0)).toBeCloseTo(1, 8);
    // on the south edge: 0.5 (tanh 0 - tanh(-20)) = 0.5 (1 - 4.2e-18)
    expect(f(-10)).toBeCloseTo(0.5, 12);
    // one edge-width outside: 0.5 (tanh(-1) - tanh(-21)) = 0.5 (1 - 0.76159) = 0.11920
    expect(f(-11)).toBeCloseTo(0.5 * (1 - Math.tanh(1)), 12);
    expect(f(30)).toBeCloseTo(0, 8);
    const sharp = compileBand({ kind: 'tanh', south: -1, north: 1, edge: 0 });
    expect([sharp(-2), sharp(-1), sharp(0), sharp(1), sharp(2)]).toEqual([0, 0.5, 1, 0.5, 0]);
  });

  it('band gap: 1 - depth exp(-(lat - c)^2/(2 w^2))', () => {
    const f = compileBand({ kind: 'gap', centre: 6, width: 2, depth: 0.8 });
    expect(f(6)).toBeCloseTo(0.2, 12);
    expect(f(8)).toBeCloseTo(1 - 0.8 * Math.exp(-0.5), 12); // 0.51478
    expect(f(8)).toBeCloseTo(0.514775, 6);
    expect(f(40)).toBeCloseTo(1, 12);
  });

  it('band trades: cos(pi lat/(2 edge)) inside +-edge, 0 beyond', () => {
    const f = compileBand({ kind: 'trades', edgeLat: 20 });
    expect(f(0)).toBe(1);
    expect(f(10)).toBeCloseTo(Math.SQRT1_2, 12);
    expect(f(-10)).toBeCloseTo(Math.SQRT1_2, 12);
    expect(f(20)).toBe(0);
    // cos(pi*70/40) = cos(1.75 pi) > 0 would come back without the clip
    expect(f(70)).toBe(0);
  });

  it('band shape reads latitude only', () => {
    const s = compileShape({ kind: 'band', profile: { kind: 'trades', edgeLat: 20 } });
    expect(s.at(100, 10, 0)).toBe(s.at(250, 10, 99));
  });

  it('formula shape: value and time dependence', () => {
    const s = compileShape({ kind: 'formula', expression: 'cos(pi*lat/20) * (1 + 0.5*sin(2*pi*t/365))' });
    expect(s.timeDependent).toBe(true);
    expect(s.at(0, 10, 365 / 4)).toBeCloseTo(Math.cos(Math.PI / 2) * 1.5, 12);
    expect(s.at(0, 0, 0)).toBe(1);
    expect(compileShape({ kind: 'formula', expression: 'lat*2' }).timeDependent).toBe(false);
  });

  it('rejects bad parameters', () => {
    expect(() => compileShape({ kind: 'patch', lon: 0, lat: 0, lonWidth: 0, latWidth: 1 })).toThrow(
      /lonWidth must be positive/,
    );
    expect(() => compileBand({ kind: 'tanh', south: 5, north: 1, edge: 1 })).toThrow(ForcingError);
    expect(() => compileBand({ kind: 'cosine', centre: Number.NaN, halfWidth: 1 })).toThrow(/finite/);
  });
});

describe('envelopes', () => {
  it('constant', () => {
    const e = compileEnvelope({ kind: 'constant' });
    expect(e.constant).toBe(true);
    expect(e.at(-5)).toBe(1);
  });

  it('ramp up and down', () => {
    const up = compileEnvelope({ kind: 'ramp', start: 10, duration: 20, direction: 'up' });
    expect([up.at(0), up.at(10), up.at(15), up.at(30), up.at(100)]).toEqual([0, 0, 0.25, 1, 1]);
    const down = compileEnvelope({ kind: 'ramp', start: 10, duration: 20, direction: 'down' });
    expect([down.at(0), down.at(20), down.at(40)]).toEqual([1, 0.5, 0]);
    const step = compileEnvelope({ kind: 'ramp', start: 5, duration: 0, direction: 'up' });
    expect([step.at(4.999), step.at(5), step.at(6)]).toEqual([0, 1, 1]);
    expect(up.constant).toBe(false);
  });

  it('pulse: ramps inside the duration', () => {
    const p = compileEnvelope({ kind: 'pulse', start: 10, duration: 14, ramp: 2 });
    expect([p.at(9), p.at(10), p.at(11), p.at(12), p.at(17), p.at(23), p.at(24), p.at(30)]).toEqual([
      0, 0, 0.5, 1, 1, 0.5, 0, 0,
    ]);
    expect(() => compileEnvelope({ kind: 'pulse', start: 0, duration: 3, ramp: 2 })).toThrow(/at most half/);
    expect(pulseFactor(5, 0, 10, 0)).toBe(1);
  });

  it('harmonics: mean + sum of cosines peaking on peakDay', () => {
    const h = compileEnvelope({
      kind: 'harmonics',
      mean: 0.5,
      terms: [
        { period: 365, amplitude: 0.3, peakDay: 100 },
        { period: 182.5, amplitude: 0.1, peakDay: 0 },
      ],
    });
    // t = 100: 0.5 + 0.3 + 0.1 cos(2 pi 100/182.5)
    expect(h.at(100)).toBeCloseTo(0.5 + 0.3 + 0.1 * Math.cos((2 * Math.PI * 100) / 182.5), 12);
    // half an annual period after the peak: annual term -0.3; semiannual at 282.5 days
    expect(h.at(282.5)).toBeCloseTo(0.5 - 0.3 + 0.1 * Math.cos((2 * Math.PI * 282.5) / 182.5), 12);
    expect(h.at(0) - h.at(365)).toBeCloseTo(0, 12);
    expect(compileEnvelope({ kind: 'harmonics', mean: 2, terms: [] }).constant).toBe(true);
  });

  it('table: piecewise linear, held beyond the ends, jumps on repeated days', () => {
    const t = compileEnvelope({
      kind: 'table',
      points: [
        [0, 0],
        [10, 1],
        [20, 1],
        [20, -1],
        [30, 0],
      ],
    });
    expect([t.at(-5), t.at(0), t.at(5), t.at(15), t.at(19.5), t.at(20), t.at(25), t.at(30), t.at(99)]).toEqual([
      0, 0, 0.5, 1, 1, -1, -0.5, 0, 0,
    ]);
    expect(() =>
      compileEnvelope({
        kind: 'table',
        points: [
          [5, 1],
          [4, 0],
        ],
      }),
    ).toThrow(/must not decrease/);
    expect(() => compileEnvelope({ kind: 'table', points: [] })).toThrow(/at least one/);
  });

  it('switch-off: 1 until the day, then a ramp to 0', () => {
    const s = compileEnvelope({ kind: 'switch-off', day: 30, ramp: 4 });
    expect([s.at(0), s.at(30), s.at(31), s.at(33), s.at(34), s.at(50)]).toEqual([1, 1, 0.75, 0.25, 0, 0]);
    const sharp = compileEnvelope({ kind: 'switch-off', day: 30, ramp: 0 });
    expect([sharp.at(30), sharp.at(30.0001)]).toEqual([1, 0]);
  });
});
