// The time-step limit of each scheme, and the refusal of a user dt beyond it. One function serves
// the solver, `pycno check` and the page (through model/scenario/derived.ts).

import type { DynamicsMode } from '../config.ts';
import { InputError } from '../errors.ts';
import * as pm from '../portable-math.ts';

export type LimitingTerm = 'gravity-wave' | 'coriolis' | 'viscosity' | 'friction' | 'sponge';

export interface StabilityInput {
  /** Linear gravity-wave speed sqrt(g' H), m s-1. */
  c: number;
  /** Cell sizes, m. */
  dx: number;
  dy: number;
  /** Largest |f| in the basin, s-1. */
  fMax: number;
  /** Laplacian viscosity A, m2 s-1. */
  viscosity: number;
  /** Rayleigh friction rate r, s-1 (default 0). */
  friction?: number;
  /** Sponge relaxation rate at the wall, s-1 (default 0: no sponge). */
  spongeRate?: number;
  mode: DynamicsMode;
  /** Nonlinear mode: allowance for advection added to the wave speed, m s-1 (default 2). */
  advection?: number;
  /** Nonlinear mode: the layer may thicken to this multiple of H (default 1.5). */
  thicknessFactor?: number;
}

export interface StabilityLimit {
  /** Largest stable time step, s. */
  dtMax: number;
  limitingTerm: LimitingTerm;
  /** One line: which term limits dt, by which criterion, with the numbers. */
  explanation: string;
  /** The limit of each term alone, s (Infinity when the term is absent). */
  terms: Record<LimitingTerm, number>;
}

/** Third-order Adams-Bashforth: stability interval on the imaginary axis, |omega dt| <= 0.72 (Durran 2010, from memory: 0.724). */
export const AB3_IMAGINARY_LIMIT = 0.72;
/** Third-order Adams-Bashforth on the negative real axis: |lambda dt| <= 6/11 (Durran 2010, from memory). */
export const AB3_REAL_LIMIT = 6 / 11;
/**
 * Linear mode, Coriolis: u first with the old v, then v with the new u, is neutral for f dt < 2
 * (reference kernel notes; the trapezoid-like ordering, common practice). 1.5 keeps a margin.
 */
export const FB_CORIOLIS_LIMIT = 1.5;

/**
 * Time-step limit of the solver's schemes, as a pure function of the numbers.
 *
 * Linear (forward-backward on the C grid):
 *   gravity waves  c dt sqrt(1/dx^2 + 1/dy^2) <= 1   (Mesinger & Arakawa 1976)
 *   Coriolis       f_max dt <= 1.5                    (neutral below 2; a margin)
 *   viscosity      A dt (4/dx^2 + 4/dy^2) <= 1        (forward Euler allows 2: a factor 2 of margin)
 *   friction       r dt <= 1
 *   sponge         r_sponge dt <= 1                   (its factor 1 - r_sponge dt stays >= 0)
 * Nonlinear (third-order Adams-Bashforth):
 *   gravity waves, advection and rotation  omega_max dt <= 0.72,
 *       omega_max = sqrt((2 c' sqrt(1/dx^2 + 1/dy^2))^2 + f_max^2), c' = c sqrt(1.5) + 2 m/s
 *   viscosity      A dt (4/dx^2 + 4/dy^2) <= 6/11     (real-axis interval)
 *   friction       r dt <= 6/11
 *   sponge         r_sponge dt <= 1                   (applied after the step as a factor, as above)
 */
export function stabilityLimit(p: StabilityInput): StabilityLimit {
  const k = Math.sqrt(1 / (p.dx * p.dx) + 1 / (p.dy * p.dy));
  const lap = 4 / (p.dx * p.dx) + 4 / (p.dy * p.dy);
  const r = p.friction ?? 0;
  const rs = p.spongeRate ?? 0;
  const km = (m: number) => `${(m / 1000).toPrecision(3)} km`;
  const grid = `dx = ${km(p.dx)}, dy = ${km(p.dy)}`;
  const orInf = (x: number) => (Number.isFinite(x) && x > 0 ? x : Infinity);
  let terms: Record<LimitingTerm, number>;
  let why: Record<LimitingTerm, string>;
  if (p.mode === 'linear') {
    terms = {
      'gravity-wave': orInf(1 / (p.c * k)),
      coriolis: orInf(FB_CORIOLIS_LIMIT / p.fMax),
      viscosity: orInf(1 / (p.viscosity * lap)),
      friction: orInf(1 / r),
      sponge: orInf(1 / rs),
    };
    why = {
      'gravity-wave': `gravity waves: c dt sqrt(1/dx^2 + 1/dy^2) <= 1 (forward-backward, C grid) with c = ${p.c.toPrecision(3)} m/s, ${grid}`,
      coriolis: `Coriolis: f_max dt <= ${FB_CORIOLIS_LIMIT} with f_max = ${p.fMax.toPrecision(3)} s-1`,
      viscosity: `viscosity: A dt (4/dx^2 + 4/dy^2) <= 1 with A = ${p.viscosity} m2/s, ${grid}`,
      friction: `friction: r dt <= 1 with r = ${r.toPrecision(3)} s-1`,
      sponge: `sponge: r_sponge dt <= 1 with r_sponge = ${rs.toPrecision(3)} s-1 at the wall (basin.sponge.dampingDays)`,
    };
  } else {
    const advection = p.advection ?? 2;
    const factor = p.thicknessFactor ?? 1.5;
    const cEff = p.c * Math.sqrt(factor) + advection;
    const omega = pm.hypot(2 * cEff * k, p.fMax);
    terms = {
      'gravity-wave': orInf(AB3_IMAGINARY_LIMIT / omega),
      coriolis: Infinity, // inside omega_max
      viscosity: orInf(AB3_REAL_LIMIT / (p.viscosity * lap)),
      friction: orInf(AB3_REAL_LIMIT / r),
      sponge: orInf(1 / rs),
    };
    why = {
      'gravity-wave': `gravity waves, advection and rotation: omega_max dt <= 0.72 (Adams-Bashforth 3), omega_max = sqrt((2 c' sqrt(1/dx^2 + 1/dy^2))^2 + f_max^2) with c' = c sqrt(${factor}) + ${advection} m/s = ${cEff.toPrecision(3)} m/s, ${grid}`,
      coriolis: '',
      viscosity: `viscosity: A dt (4/dx^2 + 4/dy^2) <= 6/11 (Adams-Bashforth 3) with A = ${p.viscosity} m2/s, ${grid}`,
      friction: `friction: r dt <= 6/11 (Adams-Bashforth 3) with r = ${r.toPrecision(3)} s-1`,
      sponge: `sponge: r_sponge dt <= 1 with r_sponge = ${rs.toPrecision(3)} s-1 at the wall (basin.sponge.dampingDays)`,
    };
  }
  let limitingTerm: LimitingTerm = 'gravity-wave';
  for (const t of ['coriolis', 'viscosity', 'friction', 'sponge'] as const)
    if (terms[t] < terms[limitingTerm]) limitingTerm = t;
  const dtMax = terms[limitingTerm];
  return { dtMax, limitingTerm, explanation: `dt <= ${Math.floor(dtMax)} s, set by ${why[limitingTerm]}`, terms };
}

export class StabilityError extends InputError {
  override name = 'StabilityError';
}

/**
 * The dt a run uses: automatic (safety x limit, shortened so that alignTo, the output interval,
 * is a whole number of steps when given) or the user's, refused above the limit and, with an
 * interval, when it does not divide the interval into whole steps (records could not fall on
 * whole intervals; the message gives the nearest steps that do).
 */
export function chooseTimeStep(
  limit: StabilityLimit,
  requested: number | null,
  safety: number,
  alignTo?: number,
): number {
  const interval = alignTo && alignTo > 0 && Number.isFinite(alignTo) ? alignTo : 0;
  if (requested === null) {
    const dt = safety * limit.dtMax;
    // At least one step per interval: an interval far below the limit is then one step long.
    if (interval > 0) return interval / Math.max(1, Math.ceil(interval / dt - 1e-9));
    return dt;
  }
  if (!(requested > 0) || !Number.isFinite(requested)) {
    throw new StabilityError(`time step must be a positive number of seconds (got ${requested})`, 'time.dtSeconds');
  }
  // A relative margin of 1e-12 lets a dt computed as exactly the limit through.
  if (requested > limit.dtMax * (1 + 1e-12)) {
    throw new StabilityError(
      `time step ${fmt(requested)} s exceeds the stability limit ${fmt(limit.dtMax)} s (${limit.explanation}); use at most ${fmt(limit.dtMax)} s or "auto"`,
      'time.dtSeconds',
    );
  }
  if (interval > 0 && stepsInInterval(requested, interval) === 0) {
    throw new InputError(`time step ${notDividing(requested, interval, limit.dtMax)}`, 'time.dtSeconds');
  }
  return requested;
}

/**
 * The whole number of steps dt makes of an interval, or 0 when it makes none. A decimal dt
 * is taken as dividing when it does to 1e-12 of the interval (its last digit's rounding: 21600 / 7
 * written as 3085.714285714286 divides 21600 s in 7 steps).
 */
export function stepsInInterval(dt: number, interval: number): number {
  const n = Math.round(interval / dt);
  return n >= 1 && Math.abs(n * dt - interval) <= 1e-12 * interval ? n : 0;
}

/**
 * Why dt does not serve an output interval, with the nearest steps that do (within the stability
 * limit), as the end of a sentence that starts with the dt's place: "1001 s does not divide ...".
 */
export function notDividing(dt: number, interval: number, dtMax: number): string {
  const days = interval / 86400;
  const lines: string[] = [];
  const fits = (x: number) => x <= dtMax * (1 + 1e-12);
  const below = Math.ceil(interval / dt - 1e-9);
  const above = Math.floor(interval / dt + 1e-9);
  const exact: string[] = [`${num(interval / below)} s (${below} steps per interval)`];
  if (above >= 1 && above !== below && fits(interval / above))
    exact.push(`${num(interval / above)} s (${above} steps)`);
  lines.push(`the nearest steps that do are ${exact.join(' and ')}`);
  if (Number.isInteger(interval)) {
    // Whole seconds are easier to write down; the nearest whole divisors of the interval.
    const whole: number[] = [];
    for (let d = Math.min(Math.floor(dt), interval); d >= 1; d--) {
      if (interval % d === 0) {
        whole.push(d);
        break;
      }
    }
    for (let d = Math.ceil(dt); d <= Math.min(interval, dtMax); d++) {
      if (interval % d === 0) {
        whole.push(d);
        break;
      }
    }
    const ints = whole.filter((d) => d !== dt && !exact.some((e) => e.startsWith(`${d} s`)));
    if (ints.length) lines.push(`in whole seconds ${ints.map((d) => `${d} s (${interval / d} steps)`).join(' and ')}`);
  }
  return `${num(dt)} s does not divide the output interval of ${num(days)} ${days === 1 ? 'day' : 'days'} (${num(interval)} s) into whole steps, so records could not fall on whole intervals; ${lines.join('; ')}; or use "auto"`;
}

function num(x: number): string {
  return String(x);
}

function fmt(x: number): string {
  return x >= 100 ? String(Math.floor(x)) : x.toPrecision(4);
}
