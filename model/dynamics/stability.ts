// The time-step limit of each scheme, and the refusal of a user dt beyond it.

import type { DynamicsMode } from '../config.ts';
import { InputError } from '../errors.ts';

export interface StabilityInput {
  /** Gravity-wave speed sqrt(g' H), m s-1. */
  c: number;
  dx: number;
  dy: number;
  /** Largest |f| on the grid, s-1. */
  fMax: number;
  viscosity: number;
  friction: number;
  mode: DynamicsMode;
}

export type LimitingTerm = 'gravity-wave' | 'coriolis' | 'viscosity' | 'friction';

export interface StabilityLimit {
  dtMax: number;
  limitingTerm: LimitingTerm;
  /** One sentence naming the criterion and the numbers, for messages. */
  explanation: string;
}

/**
 * Imaginary-axis reach of third-order Adams-Bashforth (about 0.72) and its real-axis reach (6/11):
 * standard values for AB3's stability region (common practice, no source; from memory).
 */
const AB3_IMAG = 0.72;
const AB3_REAL = 6 / 11;

/**
 * Nonlinear runs see faster waves where the layer thickens and flow carried by the current:
 * the limit uses c at 1.5 H plus 2 m s-1 of advection (a margin of our choosing).
 */
export function nonlinearWaveSpeed(reducedGravity: number, layerThickness: number): number {
  return Math.sqrt(reducedGravity * 1.5 * layerThickness) + 2;
}

export function stabilityLimit(p: StabilityInput): StabilityLimit {
  const k = Math.sqrt(1 / (p.dx * p.dx) + 1 / (p.dy * p.dy));
  const lap = 4 / (p.dx * p.dx) + 4 / (p.dy * p.dy);
  const km = (x: number) => (x / 1000).toFixed(1);
  const candidates: Array<{ dt: number; term: LimitingTerm; why: string }> = [];
  if (p.mode === 'linear') {
    // Forward-backward on the C grid: c dt sqrt(1/dx^2 + 1/dy^2) <= 1 (Mesinger & Arakawa 1976).
    candidates.push({
      dt: 1 / (p.c * k),
      term: 'gravity-wave',
      why: `gravity-wave CFL for forward-backward stepping, c·dt·sqrt(1/dx²+1/dy²) ≤ 1, with c = ${p.c.toFixed(3)} m/s, dx = ${km(p.dx)} km, dy = ${km(p.dy)} km`,
    });
    // Neutral for f dt < 2 (u first with old v, then v with new u); 1.5 keeps a margin.
    if (p.fMax > 0) candidates.push({ dt: 1.5 / p.fMax, term: 'coriolis', why: `inertial limit f·dt ≤ 1.5 with |f| up to ${p.fMax.toExponential(3)} s⁻¹` });
    // Forward Euler diffusion: A dt (4/dx^2 + 4/dy^2) <= 1, half the strict bound.
    if (p.viscosity > 0) candidates.push({ dt: 1 / (p.viscosity * lap), term: 'viscosity', why: `viscous limit A·dt·(4/dx²+4/dy²) ≤ 1 with A = ${p.viscosity} m²/s` });
    if (p.friction > 0) candidates.push({ dt: 1 / p.friction, term: 'friction', why: `friction limit r·dt ≤ 1` });
  } else {
    const omega = 2 * p.c * k + p.fMax;
    candidates.push({
      dt: AB3_IMAG / omega,
      term: 'gravity-wave',
      why: `third-order Adams-Bashforth limit ω·dt ≤ ${AB3_IMAG} on the fastest frequency ω = 2c·sqrt(1/dx²+1/dy²) + |f|, with c = ${p.c.toFixed(3)} m/s (1.5 H plus 2 m/s of flow), dx = ${km(p.dx)} km, dy = ${km(p.dy)} km`,
    });
    if (p.viscosity > 0) candidates.push({ dt: AB3_REAL / (p.viscosity * lap), term: 'viscosity', why: `viscous limit A·dt·(4/dx²+4/dy²) ≤ 6/11 for third-order Adams-Bashforth, A = ${p.viscosity} m²/s` });
    if (p.friction > 0) candidates.push({ dt: AB3_REAL / p.friction, term: 'friction', why: `friction limit r·dt ≤ 6/11` });
  }
  let best = candidates[0];
  for (const c of candidates) if (c.dt < best.dt) best = c;
  return { dtMax: best.dt, limitingTerm: best.term, explanation: best.why };
}

export class StabilityError extends InputError {
  override name = 'StabilityError';
}

/** The dt a run uses: automatic (safety x limit) or the user's, refused above the limit. */
export function chooseTimeStep(limit: StabilityLimit, requested: number | null, safety: number): number {
  if (requested === null) return safety * limit.dtMax;
  if (!(requested > 0) || !Number.isFinite(requested)) {
    throw new StabilityError(`time step must be a positive number of seconds (got ${requested})`);
  }
  // A relative margin of 1e-12 lets a dt computed as exactly the limit through.
  if (requested > limit.dtMax * (1 + 1e-12)) {
    throw new StabilityError(
      `time step ${fmt(requested)} s exceeds the stability limit ${fmt(limit.dtMax)} s (${limit.explanation}); use at most ${fmt(limit.dtMax)} s or "auto"`,
    );
  }
  return requested;
}

function fmt(x: number): string {
  return x >= 100 ? x.toFixed(0) : x.toPrecision(4);
}
