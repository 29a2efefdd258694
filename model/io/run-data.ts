// A run held in memory, typed: what the run library saves, what the comparison and the report
// read, and what a Pycno run NetCDF file holds (run-import.ts reads one into a RunData,
// run-export.ts writes one, run-collector.ts builds one record by record from the engine); and the
// small operations on it that its readers share.
//
// Field snapshots may be kept for only some output records (the run library saves every k-th).

import type { FieldName } from '../diagnostics/fields.ts';
import type { Integrals } from '../diagnostics/integrals.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import type { RunPhysics } from '../run-physics.ts';
import { INTEGRAL_VARIABLES } from './run-output.ts';

export type IntegralKey = Exclude<keyof Integrals, 'day'>;

export interface RunGrid {
  nx: number;
  ny: number;
  /** Cell-centre coordinates, degrees. */
  lon: Float64Array;
  lat: Float64Array;
  /** 1 ocean, 0 land, nx * ny from the south-west corner. */
  ocean: Uint8Array;
}

/** Full fields of one output record; nx * ny from the south-west corner, NaN on land. */
export interface RunSnapshot {
  /** Index of the output record (into RunData.days). */
  index: number;
  day: number;
  fields: Partial<Record<FieldName, Float32Array>>;
}

export interface HovmollerSection {
  /** Latitude asked for in the scenario, and the centre latitude of the model row used. */
  requestedLat: number;
  rowLat: number;
  /** h' along the row, days.length * nx values, record after record; NaN on land. */
  values: Float32Array;
}

export interface ProbeSeries {
  name: string;
  lon: number;
  lat: number;
  /** One value per output record for each of the run's fields. */
  series: Partial<Record<FieldName, Float32Array>>;
}

export interface RunData {
  name: string;
  description: string;
  /** The scenario JSON exactly as run (defaults filled in), and its SHA-256. */
  scenarioJson: string;
  scenarioSha256: string;
  /** Program version that made the run. */
  version: string;
  seed: string | number;
  /** When and by what the run was made (the file's history line); null when unknown. */
  createdAt: string | null;
  command: string | null;
  dt: number;
  /** g', H, beta, rho0, dynamics, c, L, ... of the run (model/run-physics.ts). */
  physics: RunPhysics;
  grid: RunGrid;
  fields: FieldName[];
  /** One entry per output record: model day and steps taken. */
  days: Float64Array;
  steps: Float64Array;
  integrals: Record<IntegralKey, Float64Array>;
  hovmoller: HovmollerSection[];
  probes: ProbeSeries[];
  /** Snapshots in record order; a subset of the records (maybe all). */
  snapshots: RunSnapshot[];
  bursts: DrawnBurst[];
}

export class RunFileError extends Error {
  override name = 'RunFileError';
}

export const INTEGRAL_KEYS = INTEGRAL_VARIABLES.map((v) => v.key as IntegralKey);

// --- helpers for readers of a RunData ----------------------------------------------------------

/** A Hovmoller section in the shape the wave fit takes (rows are views, not copies). */
export function hovmollerData(
  run: RunData,
  section: number,
): { lon: Float64Array; days: Float64Array; rows: Float32Array[] } {
  const h = run.hovmoller[section];
  if (!h) throw new RunFileError(`the run has no Hovmoller section ${section} (it has ${run.hovmoller.length})`);
  const nx = run.grid.nx;
  const rows = Array.from(run.days, (_, n) => h.values.subarray(n * nx, (n + 1) * nx));
  return { lon: run.grid.lon, days: run.days, rows };
}

/** The snapshot of record `index`, or undefined if that record has none. */
export function snapshotAt(run: RunData, index: number): RunSnapshot | undefined {
  return run.snapshots.find((s) => s.index === index);
}

/** Keep every k-th snapshot (by record index, the first included): what the library saves. */
export function thinSnapshots(run: RunData, every: number): RunSnapshot[] {
  if (!Number.isInteger(every) || every < 1)
    throw new RunFileError(`snapshotEvery must be a whole number >= 1 (got ${every})`);
  return run.snapshots.filter((s) => s.index % every === 0);
}

/** A run kept by an older Pycno lacks the newer (optional) integrals: they are NaN, as when a file is read. */
export function withAllIntegrals(run: RunData): RunData {
  const missing = INTEGRAL_VARIABLES.filter((iv) => iv.optional && !run.integrals[iv.key as IntegralKey]);
  if (missing.length === 0) return run;
  const integrals = { ...run.integrals };
  for (const iv of missing) integrals[iv.key as IntegralKey] = new Float64Array(run.days.length).fill(NaN);
  return { ...run, integrals };
}

/** Sizes and orders agree, so a file written from it can be read back. */
export function checkRun(run: RunData): void {
  const { nx, ny } = run.grid;
  const nt = run.days.length;
  const bad = (what: string) => {
    throw new RunFileError(`run '${run.name}': ${what}`);
  };
  if (nt === 0) bad('no output records');
  if (!run.physics || !(run.physics.reducedGravity > 0 && run.physics.layerThickness > 0))
    bad("no run-physics record (g', H, beta, ...)");
  if (run.grid.lon.length !== nx || run.grid.lat.length !== ny || run.grid.ocean.length !== nx * ny)
    bad('grid arrays do not match nx, ny');
  if (run.steps.length !== nt) bad(`steps has ${run.steps.length} values for ${nt} records`);
  for (const k of INTEGRAL_KEYS)
    if (run.integrals[k].length !== nt) bad(`integral ${k} has ${run.integrals[k].length} values for ${nt} records`);
  run.hovmoller.forEach(
    (h, q) =>
      h.values.length !== nt * nx && bad(`Hovmoller section ${q} has ${h.values.length} values, expected ${nt * nx}`),
  );
  for (const p of run.probes)
    for (const f of run.fields)
      if (p.series[f]?.length !== nt) bad(`probe '${p.name}' series ${f} does not have ${nt} values`);
  let last = -1;
  for (const s of run.snapshots) {
    if (!(s.index > last) || s.index >= nt)
      bad(`snapshot indices must increase within 0..${nt - 1} (found ${s.index} after ${last})`);
    last = s.index;
    for (const f of run.fields)
      if (s.fields[f]?.length !== nx * ny) bad(`snapshot of record ${s.index} lacks field ${f} of ${nx * ny} values`);
  }
}
