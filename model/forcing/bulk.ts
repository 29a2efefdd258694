// Wind at 10 m to surface stress: tau = rho_air C_D |U| U (a vector).

import type { BulkSpec } from './spec.ts';
import { ForcingError } from './errors.ts';

/** Lower end of the Large & Pond (1981) fit, m s-1. */
export const LP81_LOW = 4;
/** Speed where the Large & Pond (1981) drag starts to grow with the wind, m s-1. */
export const LP81_KNEE = 11;
/** Upper end of the Large & Pond (1981) fit, m s-1. */
export const LP81_HIGH = 25;

/**
 * Neutral 10 m drag coefficient of Large & Pond (1981, JPO 11, 324):
 * 10^3 C_D = 1.2 for 4 <= U < 11 m/s, 0.49 + 0.065 U for 11 <= U <= 25 m/s.
 * Outside the fitted range we hold the end values rather than extrapolate a straight line that
 * was never fitted there: below 4 m/s C_D stays 1.2e-3 (light winds give so little stress,
 * tau < 0.02 N m-2, that the choice hardly matters, and a constant keeps tau smooth through 0);
 * above 25 m/s C_D stays at its 25 m/s value, 2.115e-3 (a cap; drag is thought to level off in
 * very strong winds, which is common practice, no source here).
 */
export function largePondDrag(speed: number): number {
  if (speed < LP81_KNEE) return 1.2e-3;
  const u = Math.min(speed, LP81_HIGH);
  return (0.49 + 0.065 * u) * 1e-3;
}

/** A validated bulk formula: C_D(|U|) times rho_air. */
export interface BulkFormula {
  readonly airDensity: number;
  drag(speed: number): number;
  /** rho_air C_D(|U|) |U|: multiply a wind component by it to get that stress component. */
  factor(ux: number, uy: number): number;
}

export function makeBulkFormula(spec: BulkSpec): BulkFormula {
  const rho = spec.airDensity;
  if (!(typeof rho === 'number' && rho > 0 && Number.isFinite(rho))) {
    throw new ForcingError(`bulk.airDensity must be a positive number (got ${String(rho)})`);
  }
  let drag: (speed: number) => number;
  if (spec.drag === 'large-pond') drag = largePondDrag;
  else if (spec.drag === 'constant') {
    const cd = spec.dragCoefficient;
    if (!(typeof cd === 'number' && cd > 0 && Number.isFinite(cd))) {
      throw new ForcingError(`bulk.dragCoefficient must be a positive number (got ${String(cd)})`);
    }
    drag = () => cd;
  } else throw new ForcingError(`bulk.drag must be 'large-pond' or 'constant' (got ${String(spec.drag)})`);
  return {
    airDensity: rho,
    drag,
    factor(ux, uy) {
      const s = Math.sqrt(ux * ux + uy * uy);
      return rho * drag(s) * s;
    },
  };
}

/** The stress vector of a wind vector, N m-2. */
export function bulkStress(bulk: BulkFormula, ux: number, uy: number): [number, number] {
  const k = bulk.factor(ux, uy);
  return [k * ux, k * uy];
}
