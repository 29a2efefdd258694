// Shared by the shipped-scenario tests: load a configs/ scenario, build it, run it while sampling.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { FieldName } from '../../model/diagnostics/fields.ts';
import type { Model } from '../../model/model.ts';
import { buildModel, type BuiltRun } from '../../model/scenario/build.ts';
import { applyOverrides, loadScenario, resolveScenario, type ResolvedScenario } from '../../model/scenario/index.ts';
import type { State } from '../../model/state.ts';

export const DAY = 86400;
export const CONFIGS = 'configs';

/** Read, validate and resolve a shipped scenario, with optional --set style overrides. */
export function resolved(file: string, overrides: string[] = []): ResolvedScenario {
  const path = join(CONFIGS, file);
  let sc = loadScenario(readFileSync(path, 'utf8'), path);
  if (overrides.length) {
    const r = applyOverrides(sc, overrides);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    sc = r.scenario;
  }
  return resolveScenario(sc);
}

export function build(
  file: string,
  options: { overrides?: string[]; startState?: State } = {},
): BuiltRun & { r: ResolvedScenario } {
  const r = resolved(file, options.overrides);
  const opts = options.startState ? { startState: options.startState } : {};
  return { ...buildModel(r, opts), r };
}

/** Run to `days`, calling `sample` at every whole day (day 0 included). */
export function runDaily(m: Model, days: number, sample: (day: number) => void): void {
  sample(0);
  for (let d = 1; d <= days; d++) {
    m.advance(m.stepsUntil(d * DAY));
    sample(d);
  }
}

/** Value of a centred field at the cell holding (lon, lat). */
export function at(m: Model, name: FieldName, lon: number, lat: number): number {
  const c = m.grid.cellAt(lon, lat);
  if (!c) throw new Error(`(${lon}, ${lat}) lies outside the basin`);
  return m.field(name)[c.j * m.grid.nx + c.i];
}

/** Mean of a centred field over the cells whose centres lie in a lon/lat box (ocean only). */
export function boxMean(field: ArrayLike<number>, m: Model, lon: [number, number], lat: [number, number]): number {
  const { nx, ny, lonCentre, latCentre } = m.grid;
  let s = 0;
  let n = 0;
  for (let j = 0; j < ny; j++) {
    if (latCentre[j] < lat[0] || latCentre[j] > lat[1]) continue;
    for (let i = 0; i < nx; i++) {
      if (lonCentre[i] < lon[0] || lonCentre[i] > lon[1]) continue;
      const v = field[j * nx + i];
      if (Number.isNaN(v)) continue;
      s += v;
      n++;
    }
  }
  if (n === 0) throw new Error('empty box');
  return s / n;
}

/** Metres per degree along the model's axes (R times radians, as in the grid). */
export function metresPerDegree(m: Model): number {
  return m.grid.dx / m.grid.dLon;
}

/** Index of the largest value, refined by a parabola through it and its neighbours (returns a fractional index). */
export function peakIndex(ys: ArrayLike<number>, from = 0, to = ys.length): number {
  let k = from;
  for (let i = from + 1; i < to; i++) if (ys[i] > ys[k]) k = i;
  if (k === 0 || k === ys.length - 1) return k;
  const [a, b, c] = [ys[k - 1], ys[k], ys[k + 1]];
  const den = a - 2 * b + c;
  return den === 0 ? k : k + (0.5 * (a - c)) / den;
}

/** First time (fractional index, linear interpolation) where ys rises through level, searching from `from`. */
export function firstCrossing(ys: ArrayLike<number>, level: number, from = 0): number {
  for (let i = Math.max(1, from); i < ys.length; i++) {
    if (ys[i - 1] < level && ys[i] >= level) return i - 1 + (level - ys[i - 1]) / (ys[i] - ys[i - 1]);
  }
  return NaN;
}

/**
 * The end state of a spin-up as the start of a new run: a copy with the clock at zero. buildModel
 * hands the state to the model as it is, clock included, so without this the new run's envelopes
 * would be read at spin-up time + t (reported; the builder should reset the clock for 'spinup').
 */
export function startOfNewRun(end: State): State {
  const s = end.clone();
  s.startNewRun();
  return s;
}
