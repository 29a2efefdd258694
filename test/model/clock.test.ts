// The model clock (model/clock.ts): time from the step count, exact on whole output intervals,
// the same bits whatever the interval for one step length, and a restart's origin kept.

import { describe, expect, it } from 'vitest';
import { Clock, secondsOfDays, sameStepLength } from '../../model/clock.ts';
import { Model } from '../../model/model.ts';
import { chooseTimeStep, stabilityLimit, stepsInInterval } from '../../model/dynamics/stability.ts';
import { referenceConfig } from '../../model/reference-kernel.ts';

const fresh = (I: number, N: number) =>
  new Clock({ dt: I / N, intervalSeconds: I, stepsPerInterval: N, originSteps: 0, originTime: 0 });

describe('the model clock', () => {
  it('lands on whole intervals to the bit where adding dt drifts', () => {
    // 5 days in 17 steps: dt = 25411.764705882353 s, not a whole number of seconds.
    const I = 5 * 86400;
    const N = 17;
    const clock = fresh(I, N);
    let added = 0;
    let drifted = 0;
    for (let n = 1; n <= 292 * N; n++) {
      added += I / N;
      if (n % N === 0) {
        const k = n / N;
        // k I is a whole number of seconds and one division gives the nearest double of 5 k days.
        expect(clock.timeAt(n)).toBe(k * I);
        expect(clock.timeAt(n) / 86400).toBe(5 * k);
        if (added !== k * I) drifted++;
      }
    }
    // Not a vacuous comparison: accumulation misses most of these records.
    expect(drifted).toBeGreaterThan(200);
  });

  it('depends on the step length only: 17 steps of 5 days read like 34 of 10 days', () => {
    const a = fresh(5 * 86400, 17);
    const b = fresh(10 * 86400, 34);
    expect(sameStepLength(a.spec, b.spec)).toBe(true);
    for (let n = 0; n < 2000; n += 7) expect(a.timeAt(n)).toBe(b.timeAt(n));
    expect(sameStepLength(a.spec, fresh(5 * 86400, 18).spec)).toBe(false);
  });

  it('finds the next whole interval and the steps of a span', () => {
    const c = fresh(86400, 24);
    expect(c.nextWholeInterval(0)).toBe(24);
    expect(c.nextWholeInterval(23)).toBe(24);
    expect(c.nextWholeInterval(24)).toBe(48);
    expect(c.stepsFor(10 * 86400)).toBe(240);
    expect(c.stepsFor(10.5 * 86400 + 1)).toBe(253); // 252.01 steps, rounded up
    const late = new Clock({ ...c.spec, originSteps: 5, originTime: 9000 });
    expect(late.nextWholeInterval(5)).toBe(29);
    expect(late.timeAt(29)).toBe(9000 + 86400);
    expect(
      new Clock({ dt: 600, intervalSeconds: 0, stepsPerInterval: 0, originSteps: 0, originTime: 0 }).nextWholeInterval(
        3,
      ),
    ).toBe(Infinity);
  });

  it('continues a clock of the same step length from its origin, and starts anew for another', () => {
    const written = { ...fresh(5 * 86400, 17).spec };
    const same = Clock.continuing(written.dt, 10 * 86400, 34, 89, fresh(5 * 86400, 17).timeAt(89), written);
    expect(same.spec.originSteps).toBe(0);
    const other = Clock.continuing(86400 / 4, 86400, 4, 89, 123456, written);
    expect(other.spec).toMatchObject({ originSteps: 89, originTime: 123456 });
    expect(other.timeAt(93)).toBe(123456 + 86400);
    expect(Clock.continuing(900, 0, 0, 10, 9000, null).timeAt(12)).toBe(10800);
  });

  it('takes an interval in whole seconds when it is within a microsecond of them', () => {
    expect(0.7 * 86400).not.toBe(60480); // floating point: 60479.99999999999
    expect(secondsOfDays(0.7)).toBe(60480);
    expect(secondsOfDays(2.3)).toBe(198720);
    expect(secondsOfDays(0.25)).toBe(21600);
    const odd = 0.1234567 * 86400; // 10666.65888 s, not near whole seconds
    expect(secondsOfDays(0.1234567)).toBe(odd);
  });
});

describe('the time step and the output interval', () => {
  const limit = stabilityLimit({ c: 2, dx: 1e5, dy: 1e5, fMax: 1e-5, viscosity: 0, mode: 'linear' });

  it('automatic dt makes the interval a whole number of steps', () => {
    const dt = chooseTimeStep(limit, null, 0.8, 86400);
    expect(stepsInInterval(dt, 86400)).toBe(Math.round(86400 / dt));
    expect(86400 / dt).toBeCloseTo(Math.round(86400 / dt), 9);
    expect(dt).toBeLessThanOrEqual(0.8 * limit.dtMax);
  });

  it('a model refuses a given dt that does not divide its interval, naming the place', () => {
    const cfg = referenceConfig(80, 60);
    cfg.time = { dt: 1000, safety: 0.8, alignTo: 21600 };
    expect(() => new Model(cfg)).toThrow(
      /^time\.dtSeconds: time step 1000 s does not divide the output interval of 0\.25 days \(21600 s\)/,
    );
    cfg.time = { dt: 900, safety: 0.8, alignTo: 21600 };
    const m = new Model(cfg);
    expect(m.clock.spec.stepsPerInterval).toBe(24);
    m.advance(24);
    expect(m.state.time).toBe(21600);
    expect(m.day).toBe(0.25);
  });
});
