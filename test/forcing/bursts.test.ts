// Seeded random westerly bursts.
import { describe, expect, it } from 'vitest';
import { drawBursts } from '../../model/forcing/bursts.ts';
import type { BurstsPart } from '../../model/forcing/spec.ts';

const part: BurstsPart = {
  kind: 'bursts',
  name: 'wwb',
  quantity: 'stress',
  ratePerYear: 3,
  window: [0, 365],
  amplitude: [0.05, 0.15],
  lon: [140, 180],
  lat: [-3, 3],
  lonWidth: [5, 15],
  latWidth: [3, 6],
  duration: [6, 20],
  ramp: 2,
};

describe('random bursts', () => {
  it('the same seed gives bit-identical draws', () => {
    const a = drawBursts({ ...part, ratePerYear: 20 }, 'run-42', 1);
    const b = drawBursts({ ...part, ratePerYear: 20 }, 'run-42', 1);
    expect(a.length).toBeGreaterThan(0);
    expect(b).toEqual(a);
    a.forEach((x, k) => {
      for (const key of ['start', 'amplitude', 'lon', 'lat', 'lonWidth', 'latWidth', 'duration'] as const)
        expect(Object.is(x[key], b[k][key])).toBe(true);
    });
  });

  it('a different seed, or a different part index, gives different draws', () => {
    const a = drawBursts({ ...part, ratePerYear: 20 }, 'run-42', 1);
    expect(drawBursts({ ...part, ratePerYear: 20 }, 'run-43', 1)).not.toEqual(a);
    expect(drawBursts({ ...part, ratePerYear: 20 }, 'run-42', 2)).not.toEqual(a);
  });

  it('draws lie in their ranges; starts are sorted inside the window', () => {
    for (let s = 0; s < 50; s++) {
      const list = drawBursts({ ...part, window: [100, 500] }, `s${s}`, 0);
      let last = -Infinity;
      for (const b of list) {
        expect(b.start).toBeGreaterThanOrEqual(100);
        expect(b.start).toBeLessThanOrEqual(500);
        expect(b.start).toBeGreaterThanOrEqual(last);
        last = b.start;
        expect(b.amplitude).toBeGreaterThanOrEqual(0.05);
        expect(b.amplitude).toBeLessThanOrEqual(0.15);
        expect(b.lon).toBeGreaterThanOrEqual(140);
        expect(b.lon).toBeLessThanOrEqual(180);
        expect(b.duration).toBeGreaterThanOrEqual(6);
        expect(b.duration).toBeLessThanOrEqual(20);
        expect(b.ramp).toBe(2);
        expect(b.partName).toBe('wwb');
      }
    }
  });

  it('the count is Poisson with mean rate * window / 365', () => {
    // 4000 windows of 2 years at 3 per year: mean 6, variance 6 (Poisson). The standard error of
    // the sample mean is sqrt(6/4000) = 0.039; we allow 4 standard errors (0.155), which a correct
    // sampler fails about once in 16,000 runs (normal approximation). The sample variance of a
    // Poisson(6) sample of 4000 has standard error about sqrt((6 + 2*36)/4000) = 0.14; we allow 0.7.
    const n = 4000;
    let sum = 0;
    let sum2 = 0;
    for (let s = 0; s < n; s++) {
      const c = drawBursts({ ...part, window: [0, 730] }, `count-${s}`, 0).length;
      sum += c;
      sum2 += c * c;
    }
    const mean = sum / n;
    const variance = sum2 / n - mean * mean;
    expect(Math.abs(mean - 6)).toBeLessThan(4 * Math.sqrt(6 / n));
    expect(Math.abs(variance - 6)).toBeLessThan(0.7);
  });

  it('no bursts at rate 0; short bursts become triangles', () => {
    expect(drawBursts({ ...part, ratePerYear: 0 }, 'x', 0)).toEqual([]);
    const list = drawBursts({ ...part, ratePerYear: 50, duration: [2, 3], ramp: 5 }, 'tri', 0);
    expect(list.length).toBeGreaterThan(0);
    for (const b of list) expect(b.ramp).toBe(b.duration / 2);
  });

  it('rejects bad ranges', () => {
    expect(() => drawBursts({ ...part, lonWidth: [0, 5] }, 'x', 0)).toThrow(/lonWidth must be positive/);
    expect(() => drawBursts({ ...part, lat: [3, -3] }, 'x', 0)).toThrow(/max \(-3\) is below min \(3\)/);
    expect(() => drawBursts({ ...part, ratePerYear: 1e9 }, 'x', 0)).toThrow(/bursts expected/);
  });
});
