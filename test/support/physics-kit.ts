// Small builders shared by the physics-verification tests.

import { appendFileSync, mkdirSync } from 'node:fs';
import { relative } from 'node:path';
import { expect } from 'vitest';
import { defaultPhysics, type BasinConfig, type ModelConfig, type PhysicsConfig } from '../../model/config.ts';
import type { WindPart } from '../../model/forcing/spec.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { Grid } from '../../model/grid.ts';
import type { Precision } from '../../model/precision.ts';

export function basin(
  lonWest: number,
  lonEast: number,
  latSouth: number,
  latNorth: number,
  res: number,
  land: BasinConfig['land'] = [],
): BasinConfig {
  return { lonWest, lonEast, latSouth, latNorth, dLon: res, dLat: res, land };
}

/**
 * The precision the physics checks run in. `npm test` runs this folder twice: as it is (double),
 * and as the vitest project physics-float32 with PYCNO_PRECISION=float32 (vitest.config.ts), so
 * that every check holds in float32 too; where float32 round-off needs a wider tolerance, the test
 * says which and why (tolerance() below), and the table shows the float32 row beside the double one.
 */
export const PRECISION: Precision = process.env.PYCNO_PRECISION === 'float32' ? 'float32' : 'float64';
export const FLOAT32 = PRECISION === 'float32';

/**
 * Why float32 widens the round-off checks (the table's tolerance text). Volume: float32 holds h' to
 * about 7 digits, so each step rounds every h' by up to half an ulp (6e-8 of |h'|) and the sum of h'
 * no longer telescopes exactly; the errors random-walk (measured 5e-10 of the layer in 10,000 steps,
 * 2e-9 in 60 days with the volume-keeping sponge). Energy: the forward-backward invariant is exact
 * only in exact arithmetic; float32 rounding of u, v and h' each step leaves it to float32 round-off
 * (measured 1.3e-7 in 10,000 steps). The sums themselves are double and compensated.
 */
export const FLOAT32_VOLUME = "1e-8 (float32: h' rounded to 6e-8 of itself each step, the errors random-walk)";
export const FLOAT32_ENERGY = "2e-6 (float32: u, v, h' rounded each step)";

/** A bound of a check: the double one, or the one float32 round-off allows (about 6e-8 relative per operation). */
export function tolerance(double: number, float32: number): number {
  return FLOAT32 ? float32 : double;
}

export function config(b: BasinConfig, physics: Partial<PhysicsConfig> = {}, dt: number | null = null): ModelConfig {
  return { basin: b, physics: { ...defaultPhysics(), ...physics }, time: { dt, safety: 0.9 }, precision: PRECISION };
}

/** A wind design's stress on a configuration's grid, through the forcing library the scenarios use. */
export function windOn(cfg: ModelConfig, parts: WindPart[]): WindStress {
  const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
  const spec = {
    parts,
    bulk: { airDensity: 1.2, drag: 'large-pond' as const, dragCoefficient: 1.2e-3 },
    updateHours: 3,
  };
  return buildWindStress(grid, spec, { seed: 'tests' }).stress;
}

/** A spatially uniform stress (N m-2) switched on at t = 0. */
export function uniformStress(cfg: ModelConfig, taux: number, tauy = 0): WindStress {
  return windOn(cfg, [
    {
      kind: 'fixed',
      quantity: 'stress',
      source: { kind: 'shaped', shape: { kind: 'uniform' }, x: taux, y: tauy },
      envelope: { kind: 'constant' },
    },
  ]);
}

/** Values of a centred field along row j. */
export function row(field: ArrayLike<number>, grid: Grid, j: number): number[] {
  return Array.from({ length: grid.nx }, (_, i) => field[j * grid.nx + i]);
}

/** Position of the maximum, refined by a parabola through the three highest samples. */
export function peak(xs: ArrayLike<number>, ys: ArrayLike<number>): { x: number; y: number } {
  let m = 0;
  for (let i = 1; i < ys.length; i++) if (ys[i] > ys[m]) m = i;
  if (m === 0 || m === ys.length - 1) return { x: xs[m], y: ys[m] };
  const [a, b, c] = [ys[m - 1], ys[m], ys[m + 1]];
  const d = (0.5 * (a - c)) / (a - 2 * b + c);
  const dx = xs[m + 1] - xs[m];
  return { x: xs[m] + d * dx, y: b - 0.25 * (a - c) * d };
}

/** Least-squares slope and intercept of y on x. */
export function linearFit(xs: number[], ys: number[]): { slope: number; intercept: number } {
  const n = xs.length;
  const mx = xs.reduce((s, x) => s + x, 0) / n;
  const my = ys.reduce((s, y) => s + y, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) ** 2;
  }
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx };
}

export const DAY = 86400;

/** A row of docs/physics.md's verification table: the outside source checked against, and the test's tolerance. */
export interface TableRow {
  source: string;
  tolerance: string;
}

/**
 * Keep a measured value (test-artifacts/verification.jsonl, not committed), with the test file that
 * measured it. With `table`, the value is a row of docs/physics.md's verification table, which
 * `npm run verification` writes from these records (test/support/verification-table.ts).
 */
export function record(check: string, measured: number, expected: number, unit = '', table?: TableRow): void {
  const path = expect.getState().testPath;
  const file = path ? relative(process.cwd(), path) : '';
  if (FLOAT32) check = `${check} (float32)`;
  mkdirSync('test-artifacts', { recursive: true });
  appendFileSync(
    'test-artifacts/verification.jsonl',
    JSON.stringify({ check, measured, expected, unit, file, ...table }) + '\n',
  );
}
