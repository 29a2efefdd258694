// Welford's one-pass mean and variance (Welford 1962, Technometrics 4, 419-420) against the
// two-pass float64 computation (mean first, then the squared deviations from it), on data made to
// defeat the textbook one-pass sum of squares: a large common offset with a small spread.

import { describe, expect, it } from 'vitest';
import seedrandom from 'seedrandom';
import { WelfordAccumulator } from '../../model/ensemble/welford.ts';

function twoPass(members: Float64Array[], k: number): { mean: number; std: number } {
  let sum = 0;
  for (const m of members) sum += m[k];
  const mean = sum / members.length;
  let ss = 0;
  for (const m of members) ss += (m[k] - mean) * (m[k] - mean);
  return { mean, std: Math.sqrt(ss / (members.length - 1)) };
}

describe('WelfordAccumulator', () => {
  it('agrees with the two-pass float64 mean and standard deviation where the sum of squares cancels', () => {
    const rng = seedrandom('welford');
    const n = 200;
    const len = 64;
    // Values about 1e4 with a spread of about 3e-4 (mean / std about 3e7): sum(x^2) - (sum x)^2 / n
    // loses every digit in float64 (eps^-1 is about 5e15 < (3e7)^2), the two-pass and Welford's
    // computations keep about eps times 3e7, some 1e-8 of the standard deviation.
    const members = Array.from({ length: n }, () =>
      Float64Array.from({ length: len }, (_, k) => 1e4 + k + 1e-3 * (rng() - 0.5)),
    );
    const acc = new WelfordAccumulator(len);
    for (const m of members) acc.add(m);
    expect(acc.count).toBe(n);
    let naiveWorst = 0;
    for (let k = 0; k < len; k++) {
      const ref = twoPass(members, k);
      // The mean: n roundings of relative size eps (1.1e-16) at most, 200 x 1.1e-16.
      expect(Math.abs(acc.mean[k] - ref.mean) / ref.mean).toBeLessThan(2.3e-14);
      expect(Math.abs(acc.std(k) - ref.std) / ref.std).toBeLessThan(1e-7);
      let s = 0;
      let s2 = 0;
      for (const m of members) {
        s += m[k];
        s2 += m[k] * m[k];
      }
      const naive = Math.sqrt(Math.max(0, (s2 - (s * s) / n) / (n - 1)));
      naiveWorst = Math.max(naiveWorst, Math.abs(naive - ref.std) / ref.std);
    }
    // The check can fail: the textbook formula is off by far more on the same data.
    expect(naiveWorst).toBeGreaterThan(0.1);
  });

  it('gives the same numbers fed in slices (record by record) as whole', () => {
    const rng = seedrandom('slices');
    const whole = new WelfordAccumulator(30);
    const sliced = new WelfordAccumulator(30);
    for (let m = 0; m < 7; m++) {
      const x = Float64Array.from({ length: 30 }, () => rng() * 10 - 5);
      whole.add(x);
      sliced.startMember();
      for (let r = 0; r < 3; r++) sliced.addSlice(r * 10, x.subarray(r * 10, r * 10 + 10));
      sliced.endMember();
    }
    expect(Array.from(sliced.mean)).toEqual(Array.from(whole.mean));
    expect(Array.from(sliced.m2)).toEqual(Array.from(whole.m2));
  });

  it('keeps NaN (land) as NaN, has no spread below two members, and refuses a member given short', () => {
    const acc = new WelfordAccumulator(3);
    acc.add([1, NaN, 3]);
    expect(Number.isNaN(acc.std(0))).toBe(true); // one member: no standard deviation
    acc.add([3, NaN, 3]);
    expect(acc.mean[0]).toBe(2);
    expect(acc.std(0)).toBeCloseTo(Math.SQRT2, 15);
    expect(acc.std(2)).toBe(0);
    expect(Number.isNaN(acc.mean[1])).toBe(true);
    acc.startMember();
    acc.addSlice(0, [1, 2]);
    expect(() => acc.endMember()).toThrow(/gave 2 values, expected 3/);
    expect(() => new WelfordAccumulator(2).addSlice(0, [1])).toThrow(/startMember\(\) first/);
  });
});
