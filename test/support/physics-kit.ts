// Small builders shared by the physics-verification tests.

import { appendFileSync, mkdirSync } from 'node:fs';
import { relative } from 'node:path';
import { expect } from 'vitest';
import { defaultPhysics, type BasinConfig, type ModelConfig, type PhysicsConfig } from '../../model/config.ts';
import type { WindPart } from '../../model/forcing/spec.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { Grid } from '../../model/grid.ts';

export function basin(lonWest: number, lonEast: number, latSouth: number, latNorth: number, res: number, land: BasinConfig['land'] = []): BasinConfig {
  return { lonWest, lonEast, latSouth, latNorth, dLon: res, dLat: res, land };
}

export function config(b: BasinConfig, physics: Partial<PhysicsConfig> = {}, dt: number | null = null): ModelConfig {
  return { basin: b, physics: { ...defaultPhysics(), ...physics }, time: { dt, safety: 0.9 } };
}

/** A wind design's stress on a configuration's grid, through the forcing library the scenarios use. */
export function windOn(cfg: ModelConfig, parts: WindPart[]): WindStress {
  const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
  const spec = { parts, bulk: { airDensity: 1.2, drag: 'large-pond' as const, dragCoefficient: 1.2e-3 }, updateHours: 3 };
  return buildWindStress(grid, spec, { seed: 'tests' }).stress;
}

/** A spatially uniform stress (N m-2) switched on at t = 0. */
export function uniformStress(cfg: ModelConfig, taux: number, tauy = 0): WindStress {
  return windOn(cfg, [
    { kind: 'fixed', quantity: 'stress', source: { kind: 'shaped', shape: { kind: 'uniform' }, x: taux, y: tauy }, envelope: { kind: 'constant' } },
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
  mkdirSync('test-artifacts', { recursive: true });
  appendFileSync('test-artifacts/verification.jsonl', JSON.stringify({ check, measured, expected, unit, file, ...table }) + '\n');
}
