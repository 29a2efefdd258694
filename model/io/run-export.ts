// A RunData as a Pycno run file, written by the command line's own RunOutputWriter, so export ->
// import (run-import.ts) gives back every value bit for bit. In the file every record has the
// field variables; a record without a snapshot has them all at the fill value (CF's "missing").

import type { FieldName } from '../diagnostics/fields.ts';
import type { Integrals } from '../diagnostics/integrals.ts';
import { MemorySink } from './netcdf-writer.ts';
import { checkRun, INTEGRAL_KEYS, type RunData, type RunSnapshot } from './run-data.ts';
import { PYCNO_VERSION, RunOutputWriter, type OutputRecord, type RunDescription } from './run-output.ts';

export function runDescription(run: RunData): RunDescription {
  // The version in a file is the writer's; a run made by another version says so in its history.
  const command = run.command ?? `export of ${run.name}`;
  return {
    name: run.name,
    description: run.description,
    scenarioJson: run.scenarioJson,
    grid: run.grid,
    fields: run.fields,
    hovmollerLats: run.hovmoller.map((h) => h.requestedLat),
    hovmollerRowLats: run.hovmoller.map((h) => h.rowLat),
    probes: run.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat })),
    bursts: run.bursts,
    dt: run.dt,
    physics: run.physics,
    command: run.version === PYCNO_VERSION ? command : `${command}; run made by Pycno ${run.version}`,
    createdAt: run.createdAt ? new Date(run.createdAt) : undefined,
  };
}

/** Record n of a run as the writer takes it; fields all missing where there is no snapshot. */
export function runRecord(run: RunData, n: number, snapshot: RunSnapshot | undefined, missing: Float32Array): OutputRecord {
  const nx = run.grid.nx;
  const fields: Partial<Record<FieldName, ArrayLike<number>>> = {};
  for (const f of run.fields) fields[f] = snapshot?.fields[f] ?? missing;
  const integrals = { day: run.days[n] } as Integrals;
  for (const k of INTEGRAL_KEYS) integrals[k] = run.integrals[k][n];
  return {
    day: run.days[n],
    step: run.steps[n],
    fields,
    integrals,
    hovmoller: run.hovmoller.map((h) => h.values.subarray(n * nx, (n + 1) * nx)),
    probeValues: run.probes.map((p) => Float32Array.from(run.fields, (f) => p.series[f]![n])),
  };
}

/** The run as a CF-NetCDF file, written by the command line's writer. */
export async function toNetcdf(run: RunData): Promise<Uint8Array> {
  checkRun(run);
  const sink = new MemorySink(1 << 16);
  const writer = new RunOutputWriter(runDescription(run), sink);
  await writer.begin();
  const missing = new Float32Array(run.grid.nx * run.grid.ny).fill(NaN);
  const byIndex = new Map(run.snapshots.map((s) => [s.index, s]));
  for (let n = 0; n < run.days.length; n++) await writer.append(runRecord(run, n, byIndex.get(n), missing));
  await writer.close();
  return sink.bytes().slice();
}
