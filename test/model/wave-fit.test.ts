// The speed fit against synthetic fronts of known speed and noise, and against a model Kelvin
// wave whose speed theory gives (c = sqrt(g'H), Matsuno 1966).

import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { arrivalDay, fitSpeed, regress, WaveFitError } from '../../model/diagnostics/wave-fit.ts';
import { equatorialScales } from '../../model/initial.ts';
import { Model } from '../../model/model.ts';
import { basin, config, DAY } from '../support/physics-kit.ts';

const M_PER_DEG = 111_195;

/** A Gaussian pulse of e-folding width w (deg) moving at `speed` m/s from lon0, plus white noise. */
function synthetic(speed: number, noise: number, seed: string, sign = 1) {
  const rng = seedrandom(seed);
  const lon = Float64Array.from({ length: 400 }, (_, i) => 100 + 0.25 * i);
  const days = Float64Array.from({ length: 40 }, (_, n) => n);
  const degPerDay = (speed * 86400) / M_PER_DEG;
  const rows = Array.from(days, (d) =>
    Float64Array.from(
      lon,
      (x) => sign * 10 * Math.exp(-(((x - 130 - degPerDay * d) / 4) ** 2)) + noise * (rng() - 0.5) * 2,
    ),
  );
  return { lon, days, rows };
}

describe('speed fit on synthetic fronts', () => {
  for (const method of ['front', 'peak'] as const) {
    it(`${method}: a clean eastward pulse at 2.5 m/s`, () => {
      const f = fitSpeed(synthetic(2.5, 0, 'a'), {
        direction: 'east',
        method,
        metresPerDegree: M_PER_DEG,
        dayRange: [2, 30],
      });
      expect(f.speed).toBeCloseTo(2.5, 2);
      expect(f.points.length).toBe(29);
    });

    it(`${method}: a westward upwelling pulse at 0.9 m/s`, () => {
      const h = synthetic(-0.9, 0, 'b', -1);
      const f = fitSpeed(h, { direction: 'west', method, sign: -1, metresPerDegree: M_PER_DEG, dayRange: [2, 30] });
      expect(f.speed).toBeCloseTo(0.9, 2);
    });

    it(`${method}: with noise, the standard error covers the true speed in most trials`, () => {
      let covered = 0;
      const trials = 100;
      for (let t = 0; t < trials; t++) {
        const f = fitSpeed(synthetic(2.0, 1.0, `n${t}`), {
          direction: 'east',
          method,
          metresPerDegree: M_PER_DEG,
          dayRange: [2, 30],
        });
        if (Math.abs(f.speed - 2.0) <= 2 * f.standardError) covered++;
        expect(Math.abs(f.speed - 2.0)).toBeLessThan(0.2);
      }
      // Two standard errors cover about 95 % of trials for a well-behaved fit (common practice).
      expect(covered).toBeGreaterThan(80);
    });
  }

  it('front of a decaying pulse: the level taken at each time keeps the true speed', () => {
    // A Gaussian pulse at 2.5 m/s whose amplitude halves every 7 days, as a wave under friction
    // does. With one level for the whole diagram the front slides back along the shrinking flank
    // and reads slow (then vanishes once the peak falls below the level); with the level taken at
    // each time the front stays at the same place on the pulse (the shape is kept exactly here).
    const lon = Float64Array.from({ length: 400 }, (_, i) => 100 + 0.25 * i);
    const days = Float64Array.from({ length: 30 }, (_, n) => n);
    const degPerDay = (2.5 * 86400) / M_PER_DEG;
    const rows = Array.from(days, (d) =>
      Float64Array.from(lon, (x) => 10 * 2 ** (-d / 7) * Math.exp(-(((x - 120 - degPerDay * d) / 4) ** 2))),
    );
    const opts = {
      direction: 'east',
      method: 'front',
      metresPerDegree: M_PER_DEG,
      dayRange: [1, 20] as [number, number],
    } as const;
    const eachTime = fitSpeed({ lon, days, rows }, { ...opts, levelFrom: 'each-time' });
    expect(eachTime.speed).toBeCloseTo(2.5, 3);
    expect(eachTime.points.length).toBe(20);
    const fixed = fitSpeed({ lon, days, rows }, { ...opts, levelFrom: 'diagram' });
    expect(fixed.speed).toBeLessThan(0.9 * 2.5);
  });

  it('front with the level at each time skips rows below the floor (noise before the wave)', () => {
    const lon = [0, 1, 2, 3, 4, 5];
    const days = [0, 1, 2];
    const rows = [
      [0.01, 0, 0.02, 0, 0, 0],
      [10, 8, 0, 0, 0, 0],
      [10, 10, 10, 8, 0, 0],
    ];
    const f = fitSpeed(
      { lon, days, rows },
      { direction: 'east', method: 'front', levelFrom: 'each-time', metresPerDegree: M_PER_DEG },
    );
    expect(f.points.map((p) => p[0])).toEqual([1, 2]);
    expect(f.points[0][1]).toBeCloseTo(1 + 3 / 8, 12); // level 5 between 8 at lon 1 and 0 at lon 2
  });

  it('refuses a diagram without signal, and too few points', () => {
    const flat = {
      lon: [1, 2, 3, 4],
      days: [0, 1],
      rows: [
        [0, 0, 0, 0],
        [0, 0, 0, 0],
      ],
    };
    expect(() => fitSpeed(flat, { direction: 'east', method: 'front', metresPerDegree: M_PER_DEG })).toThrow(
      WaveFitError,
    );
    expect(() =>
      regress([
        [1, 2],
        [1, 3],
      ]),
    ).toThrow(/all positions are at one time/);
  });

  it('arrival day: half-maximum crossing, interpolated', () => {
    expect(arrivalDay([0, 1, 2, 3, 4], [0, 0, 2, 4, 3])).toBeCloseTo(2, 12);
    expect(arrivalDay([0, 1, 2, 3], [0, 1, 3, 4])).toBeCloseTo(1.5, 12);
    expect(arrivalDay([0, 1, 2], [0, 0, 0])).toBeNull();
    expect(arrivalDay([0, 1, 2], [0, -2, -4], 0.5, -1)).toBeCloseTo(1, 12);
  });
});

describe('speed fit on a model Kelvin wave', () => {
  it("the front method recovers sqrt(g'H) within 2 %", () => {
    const m = new Model(config(basin(140, 240, -10.25, 10.25, 0.5), { reducedGravity: 0.03, layerThickness: 150 }), {
      initial: { kind: 'kelvin', lon: 155, amplitude: 5, zonalWidthDeg: 4 },
    });
    const j = m.grid.nearestRow(0);
    const days: number[] = [];
    const rows: Float64Array[] = [];
    for (let d = 0; d <= 30; d++) {
      m.advance(m.stepsUntil(d * DAY));
      const h = m.field('h_anom');
      days.push(m.day);
      rows.push(h.slice(j * m.grid.nx, (j + 1) * m.grid.nx) as Float64Array);
    }
    const f = fitSpeed(
      { lon: m.grid.lonCentre, days, rows },
      { direction: 'east', method: 'front', metresPerDegree: m.grid.dx / m.grid.dLon, dayRange: [3, 30] },
    );
    const { c } = equatorialScales(m.physics);
    expect(Math.abs(f.speed / c - 1)).toBeLessThan(0.02);
    expect(f.standardError).toBeLessThan(0.02 * c);
  });
});
