// Period and growth rate of an oscillating index (a coupled run's eastern SST anomaly), and the
// phase by which one index leads another (the warm-water volume and the eastern SST of the
// recharge oscillator, Jin 1997). Used by `pycno run` and `pycno report`, the page's coupled panel
// and the tests, so every place shows the same numbers.
//
// Method: the zero crossings (linear between samples) cut the series into half cycles; the period
// is twice the least-squares slope of crossing time against crossing number; each complete half
// cycle's extreme (refined by a parabola through the three samples around it) gives an amplitude,
// and the growth rate is the least-squares slope of ln |amplitude| against its time. A damped
// oscillation has a negative rate, a growing one a positive rate, a steady limit cycle about 0.

import * as pm from '../portable-math.ts';

export interface ModeFit {
  /** Period, days. */
  periodDays: number;
  /** Growth rate sigma of the amplitude, per day (negative: damped); the amplitude goes as exp(sigma t). */
  growthPerDay: number;
  /** The same per 365.25 days, the e-folding rate per year. */
  growthPerYear: number;
  /** Complete half cycles used, and the days they span. */
  halfCycles: number;
  fromDay: number;
  toDay: number;
  /** The extremes used: day and signed value. */
  extremes: Array<{ day: number; value: number }>;
}

/** Least-squares slope of y on x. */
function slope(xs: number[], ys: number[]): number {
  const n = xs.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += xs[i];
    my += ys[i];
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) * (xs[i] - mx);
  }
  return sxy / sxx;
}

/** Half cycles whose extreme is below this share of the largest are noise around zero, not the mode. */
const SMALLEST_SHARE = 1e-6;

/**
 * Fit the oscillation of x(days) from `fromDay` on. Null when there are fewer than three complete
 * half cycles (the period needs two, the growth rate three extremes).
 */
export function fitOscillation(days: ArrayLike<number>, x: ArrayLike<number>, fromDay = -Infinity): ModeFit | null {
  const t: number[] = [];
  const v: number[] = [];
  for (let k = 0; k < days.length; k++) {
    if (days[k] >= fromDay && Number.isFinite(x[k])) {
      t.push(days[k]);
      v.push(x[k]);
    }
  }
  let largest = 0;
  for (const y of v) largest = Math.max(largest, Math.abs(y));
  if (!(largest > 0)) return null;
  // Crossings: between successive nonzero samples of opposite sign (zeros join the half cycle they end).
  const crossings: Array<{ day: number; after: number }> = [];
  let last = -1;
  for (let k = 0; k < v.length; k++) {
    if (v[k] === 0) continue;
    if (last >= 0 && v[last] > 0 !== v[k] > 0) {
      const a = v[last];
      const b = v[k];
      crossings.push({ day: t[last] + ((t[k] - t[last]) * a) / (a - b), after: k });
    }
    last = k;
  }
  const extremes: Array<{ day: number; value: number }> = [];
  const crossDays: number[] = [];
  for (let c = 0; c + 1 < crossings.length; c++) {
    const from = crossings[c].after;
    const to = crossings[c + 1].after; // samples from..to-1 hold the half cycle
    let m = from;
    for (let k = from + 1; k < to; k++) if (Math.abs(v[k]) > Math.abs(v[m])) m = k;
    let day = t[m];
    let value = v[m];
    if (m > 0 && m + 1 < v.length) {
      const [y0, y1, y2] = [v[m - 1], v[m], v[m + 1]];
      const den = y0 - 2 * y1 + y2;
      if (den !== 0) {
        const d = (0.5 * (y0 - y2)) / den;
        if (Math.abs(d) <= 1) {
          day = t[m] + d * 0.5 * (t[m + 1] - t[m - 1]);
          value = y1 - 0.25 * (y0 - y2) * d;
        }
      }
    }
    if (Math.abs(value) < SMALLEST_SHARE * largest) break;
    extremes.push({ day, value });
    if (crossDays.length === 0) crossDays.push(crossings[c].day);
    crossDays.push(crossings[c + 1].day);
  }
  if (extremes.length < 3) return null;
  const period =
    2 *
    slope(
      crossDays.map((_, n) => n),
      crossDays,
    );
  const growth = slope(
    extremes.map((e) => e.day),
    extremes.map((e) => pm.log(Math.abs(e.value))),
  );
  return {
    periodDays: period,
    growthPerDay: growth,
    growthPerYear: growth * 365.25,
    halfCycles: extremes.length,
    fromDay: crossDays[0],
    toDay: crossDays[crossDays.length - 1],
    extremes,
  };
}

/** Solve the 3 x 3 system A z = b (Gaussian elimination with partial pivoting). */
function solve3(A: number[][], b: number[]): number[] {
  const M = A.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < 3; c++) {
    let p = c;
    for (let r = c + 1; r < 3; r++) if (Math.abs(M[r][c]) > Math.abs(M[p][c])) p = r;
    [M[c], M[p]] = [M[p], M[c]];
    for (let r = c + 1; r < 3; r++) {
      const f = M[r][c] / M[c][c];
      for (let k = c; k < 4; k++) M[r][k] -= f * M[c][k];
    }
  }
  const z = [0, 0, 0];
  for (let r = 2; r >= 0; r--) {
    let s = M[r][3];
    for (let k = r + 1; k < 3; k++) s -= M[r][k] * z[k];
    z[r] = s / M[r][r];
  }
  return z;
}

/** Phase (radians) of y(t) exp(-sigma t) ~ a cos(w t) + b sin(w t) + c: the peak falls at phase / w. */
function phaseOf(t: number[], y: number[], w: number, sigma: number, t0: number): number {
  const A = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const b = [0, 0, 0];
  for (let k = 0; k < t.length; k++) {
    const s = t[k] - t0;
    const g = [pm.cos(w * s), pm.sin(w * s), 1];
    const yy = y[k] * pm.exp(-sigma * s);
    for (let i = 0; i < 3; i++) {
      b[i] += g[i] * yy;
      for (let j = 0; j < 3; j++) A[i][j] += g[i] * g[j];
    }
  }
  const [ca, sb] = solve3(A, b);
  return pm.atan2(sb, ca);
}

/**
 * The share of a period by which `lead` leads `follow` (both sampled at `days`), from fitting each
 * with the oscillation's own period and growth over [fromDay, toDay]: in (-0.5, 0.5], positive when
 * `lead` peaks first.
 */
export function phaseLead(
  days: ArrayLike<number>,
  lead: ArrayLike<number>,
  follow: ArrayLike<number>,
  fit: Pick<ModeFit, 'periodDays' | 'growthPerDay' | 'fromDay' | 'toDay'>,
): number {
  const t: number[] = [];
  const a: number[] = [];
  const b: number[] = [];
  for (let k = 0; k < days.length; k++) {
    if (days[k] >= fit.fromDay && days[k] <= fit.toDay && Number.isFinite(lead[k]) && Number.isFinite(follow[k])) {
      t.push(days[k]);
      a.push(lead[k]);
      b.push(follow[k]);
    }
  }
  const w = (2 * Math.PI) / fit.periodDays;
  const pa = phaseOf(t, a, w, fit.growthPerDay, fit.fromDay);
  const pb = phaseOf(t, b, w, fit.growthPerDay, fit.fromDay);
  let share = (pb - pa) / (2 * Math.PI);
  share -= Math.round(share);
  return share === -0.5 ? 0.5 : share;
}

/** The coupled mode of a run's index series as the program reports it: the fit and the warm-water lead. */
export interface CoupledMode {
  fit: ModeFit;
  /** Share of a period by which the warm-water volume leads the eastern SST (Jin 1997: about a quarter). */
  warmWaterLead: number;
}

/** Share of a run's days the report skips before fitting: the mode growing out of its kick. */
export const FIT_SKIP = 0.1;

/** Fit the eastern SST of a run (skipping the first FIT_SKIP of its days) and measure the warm-water lead; null when it does not oscillate enough to tell. */
export function coupledMode(
  days: ArrayLike<number>,
  eastSst: ArrayLike<number>,
  warmWater: ArrayLike<number>,
): CoupledMode | null {
  if (days.length < 4) return null;
  const from = days[0] + FIT_SKIP * (days[days.length - 1] - days[0]);
  const fit = fitOscillation(days, eastSst, from);
  if (!fit) return null;
  return { fit, warmWaterLead: phaseLead(days, warmWater, eastSst, fit) };
}

/** One line about a coupled mode, the same on the command line and in reports. */
export function coupledModeLine(m: CoupledMode | null): string {
  if (!m) return 'no oscillation to measure: fewer than three complete half cycles of the eastern SST anomaly';
  const f = m.fit;
  const efold = f.growthPerYear !== 0 ? `, e-folding ${Math.abs(1 / f.growthPerYear).toPrecision(3)} years` : '';
  const kind = f.growthPerYear > 0 ? 'growing' : 'damped';
  return `period ${f.periodDays.toFixed(0)} days (${(f.periodDays / 365.25).toFixed(2)} years), growth rate ${f.growthPerYear.toFixed(3)} per year (${kind}${efold}), from ${f.halfCycles} half cycles over days ${f.fromDay.toFixed(0)}-${f.toDay.toFixed(0)}; the warm-water volume leads the eastern SST by ${m.warmWaterLead.toFixed(2)} of a period`;
}
