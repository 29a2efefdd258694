// For tests that compare output records: run a scenario through the engine into a NetCDF file in
// memory (as `pycno run` writes it), and compare two records of two files bit for bit.

import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import { MemorySink } from '../../model/io/netcdf-writer.ts';
import { RunOutputWriter } from '../../model/io/run-output.ts';
import { Engine } from '../../worker/engine.ts';
import { describeLoadedRun } from '../../worker/run-description.ts';
import type { Model } from '../../model/model.ts';
import { fakeHost } from './engine-fixture.ts';

export interface RunInMemory {
  bytes: Uint8Array;
  file: NcFile;
  /** The model at the end of the run (closed for stepping: read it only). */
  model: Model;
}

/**
 * Load, run to the end and write the file, all in memory. `files` holds the inputs by resolved
 * path (a restart written by an earlier run, for example). Throws with the engine's message on
 * a failed load or run.
 */
export async function runInMemory(
  text: string,
  fileName: string,
  options: { sets?: string[]; files?: Map<string, Uint8Array | string> } = {},
): Promise<RunInMemory> {
  const engine = new Engine({ host: fakeHost(2) });
  const loaded = await engine.load(text, fileName, { sets: options.sets ?? [], files: options.files });
  if (!loaded.ok) throw new Error(loaded.error.message);
  const d = describeLoadedRun(loaded.scenario, fileName, `test run of ${fileName}`);
  d.createdAt = new Date('2030-01-01T00:00:00Z');
  const sink = new MemorySink();
  const writer = new RunOutputWriter(d, sink);
  await writer.begin();
  engine.setRecorder((r) => writer.append(r));
  engine.start();
  const end = await engine.idle();
  await writer.close();
  if (end.status !== 'finished') throw new Error(`the run did not finish: ${end.status} ${end.error?.message ?? ''}`);
  const bytes = sink.bytes().slice();
  return { bytes, file: readNetcdf(bytes), model: engine.model! };
}

/** The record variables of a file (first dimension time). */
export function recordVariables(f: NcFile): string[] {
  return f.variables.filter((v) => v.dimensions[0] === 'time').map((v) => v.name);
}

/** Times of a file's records, days. */
export function recordDays(f: NcFile): number[] {
  return Array.from(f.variable('time').values as Float64Array);
}

/**
 * Record variables whose values in record i of a and record j of b differ in any bit (NaN
 * payloads and -0 included), or that only one file has.
 */
export function recordDifferences(a: NcFile, i: number, b: NcFile, j: number): string[] {
  const out: string[] = [];
  const names = new Set([...recordVariables(a), ...recordVariables(b)]);
  for (const name of names) {
    const va = a.variables.find((v) => v.name === name);
    const vb = b.variables.find((v) => v.name === name);
    if (!va || !vb || typeof va.values === 'string' || typeof vb.values === 'string') {
      out.push(name);
      continue;
    }
    const size = va.shape.slice(1).reduce((p, n) => p * n, 1);
    const x = new Float64Array((va.values as Float64Array).subarray(i * size, (i + 1) * size));
    const y = new Float64Array((vb.values as Float64Array).subarray(j * size, (j + 1) * size));
    if (x.length !== y.length || !Buffer.from(x.buffer).equals(Buffer.from(y.buffer))) out.push(name);
  }
  return out;
}
