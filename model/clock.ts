// The model clock: the time of step n computed from the step count, never accumulated. Adding dt
// at every step drifts (day 1460 became 1459.99999999995 and decoded to the previous day), so
// the time of step n is
//
//     time(n) = originTime + ((n - originSteps) * I) / N
//
// with I the output interval in seconds and N the whole number of steps in it (dt = I / N; see
// chooseTimeStep). When I is a whole number of seconds, (k I) is an exact integer and one division
// gives the double nearest the true time; at the end of each whole interval that is k I itself, so
// a record's day, (k I) / 86400, is the double nearest its nominal day. The result depends only on
// the step length I / N, not on the interval: 40 steps of 5 days and 80 of 10 days agree to the bit.
// Without an output interval the clock counts originTime + (n - originSteps) dt.
//
// A fresh run's origin is (0, 0). A restart keeps the origin of the run that wrote it while the
// step length is the same, so a continued run reads the same times as a straight one; with another
// step it starts a new origin at the restart.

import { DAY } from './config.ts';

/** What a restart file keeps of the clock, and what a State carries (model/state.ts). */
export interface ClockSpec {
  /** The time step, s. */
  dt: number;
  /** The output interval I, s; 0 when the clock has none (time then counts in dt). */
  intervalSeconds: number;
  /** Whole steps per output interval, N; 0 when there is no interval. */
  stepsPerInterval: number;
  /** The step count and time (s) the clock counts from. */
  originSteps: number;
  originTime: number;
}

export class Clock {
  readonly spec: Readonly<ClockSpec>;

  constructor(spec: ClockSpec) {
    this.spec = { ...spec };
  }

  /** A clock of this step length that continues `from` (a restart's clock) or starts at (steps, time). */
  static continuing(
    dt: number,
    intervalSeconds: number,
    stepsPerInterval: number,
    steps: number,
    time: number,
    from: ClockSpec | null,
  ): Clock {
    const own = { dt, intervalSeconds, stepsPerInterval };
    if (from && sameStepLength(own, from))
      return new Clock({ ...own, originSteps: from.originSteps, originTime: from.originTime });
    return new Clock({ ...own, originSteps: steps, originTime: time });
  }

  /** Model time of step n, s. */
  timeAt(n: number): number {
    const { intervalSeconds: I, stepsPerInterval: N, originSteps, originTime, dt } = this.spec;
    const k = n - originSteps;
    return N > 0 ? originTime + (k * I) / N : originTime + k * dt;
  }

  /** The first step after n that ends a whole output interval counted from the origin (Infinity without one). */
  nextWholeInterval(n: number): number {
    const { stepsPerInterval: N, originSteps } = this.spec;
    if (!(N > 0)) return Infinity;
    return originSteps + (Math.floor((n - originSteps) / N) + 1) * N;
  }

  /**
   * Steps that cover a span of `seconds`, rounded up: a whole number of output intervals is a
   * whole number of steps exactly (s N / I is an integer divided exactly when s and I are whole seconds).
   */
  stepsFor(seconds: number): number {
    const { intervalSeconds: I, stepsPerInterval: N, dt } = this.spec;
    const x = N > 0 ? (seconds * N) / I : seconds / dt;
    // The margin takes rounding off a whole count, never a real fraction of a step.
    return Math.max(0, Math.ceil(x - 1e-9 - 1e-12 * x));
  }
}

/** True when two clocks count steps of the same length, so that one's origin serves the other. */
export function sameStepLength(
  a: Pick<ClockSpec, 'dt' | 'intervalSeconds' | 'stepsPerInterval'>,
  b: Pick<ClockSpec, 'dt' | 'intervalSeconds' | 'stepsPerInterval'>,
): boolean {
  if (a.stepsPerInterval > 0 && b.stepsPerInterval > 0) {
    // I_a / N_a = I_b / N_b, compared as products: exact for whole seconds up to 2^53.
    return a.intervalSeconds * b.stepsPerInterval === b.intervalSeconds * a.stepsPerInterval;
  }
  return !(a.stepsPerInterval > 0) && !(b.stepsPerInterval > 0) && a.dt === b.dt;
}

/**
 * A span of days in seconds, whole seconds when it is within a microsecond of them:
 * 0.7 x 86400 is 60479.99999999999 in floating point, and a clock counting in that would put
 * records a hair off their days. Other intervals are kept as they are.
 */
export function secondsOfDays(days: number): number {
  const s = days * DAY;
  const whole = Math.round(s);
  return Math.abs(s - whole) <= 1e-6 ? whole : s;
}
