// A RunData as a Pycno run file, written by the command line's own RunOutputWriter, so export ->
// import (run-import.ts) gives back every value bit for bit. A run whose maps are kept for only
// some records (the run library saves every k-th) is written with the kept maps on an axis of
// their own, map_time (the fields are (map_time, lat, lon), the series stay complete on time), so
// the file holds no empty maps.

import type { FieldName } from '../diagnostics/fields.ts';
import type { Integrals } from '../diagnostics/integrals.ts';
import { MemorySink, NetcdfWriter } from './netcdf-writer.ts';
import { checkRun, INTEGRAL_KEYS, thinSnapshots, type RunData, type RunSnapshot } from './run-data.ts';
import { PYCNO_VERSION, RunOutputWriter, runOutputFile, type OutputRecord, type RunDescription } from './run-output.ts';

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
export function runRecord(
  run: RunData,
  n: number,
  snapshot: RunSnapshot | undefined,
  missing: Float32Array,
): OutputRecord {
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

export interface ExportOptions {
  /**
   * Called as the file grows, with the steps done and the steps in all (one per kept map field
   * and one per record); a returned promise is awaited, so a page can show it and stay responsive.
   */
  progress?: (done: number, total: number) => Promise<void> | void;
}

/** Whether a run's maps are kept for every record (then they are written on time, as pycno run does). */
export function mapsOnEveryRecord(run: RunData): boolean {
  return run.snapshots.length === run.days.length;
}

/**
 * The run as a CF-NetCDF file, written by the command line's writer. A run with maps for every
 * record has them on time; one with fewer has only its kept maps, on their own axis map_time.
 */
export async function toNetcdf(run: RunData, options: ExportOptions = {}): Promise<Uint8Array> {
  checkRun(run);
  const every = mapsOnEveryRecord(run);
  const d = runDescription(run);
  if (!every) d.mapRecords = run.snapshots.length;
  const sink = new MemorySink(1 << 16);
  const writer = new RunOutputWriter(d, sink);
  const total = run.days.length + (every ? 0 : run.fields.length);
  let done = 0;
  const step = async () => {
    done++;
    // Every record would be too often for a callback that yields: about a hundred calls in all.
    if (options.progress && (done === total || done % Math.max(1, Math.floor(total / 100)) === 0))
      await options.progress(done, total);
  };
  await writer.begin(
    every
      ? undefined
      : { days: run.snapshots.map((s) => s.day), fields: run.snapshots.map((s) => s.fields), progress: step },
  );
  const missing = new Float32Array(run.grid.nx * run.grid.ny).fill(NaN);
  const byIndex = new Map(run.snapshots.map((s) => [s.index, s]));
  for (let n = 0; n < run.days.length; n++) {
    await writer.append(runRecord(run, n, byIndex.get(n), missing));
    await step();
  }
  await writer.close();
  return sink.bytes().slice();
}

/** Bytes of the file toNetcdf writes for a run when every `snapshotEvery`-th map is kept, without writing it. */
export function netcdfBytes(run: RunData, snapshotEvery = 1): number {
  const kept = thinSnapshots(run, snapshotEvery).length;
  const d = runDescription(run);
  if (kept !== run.days.length) d.mapRecords = kept;
  return new NetcdfWriter(runOutputFile(d), new MemorySink(1)).bytesFor(run.days.length);
}
