// `pycno compare A.nc B.nc [--out diff.nc]`: the summary of two runs side by side (scenario
// differences, common times, grid used, largest difference per field, measured Kelvin and long
// Rossby speeds beside theory), and optionally the difference fields B minus A as a CF-NetCDF
// file in the layout of a run, with attributes that name both runs. Exit codes: 0 done, 2 bad
// input (unreadable or foreign files, no common times or area).

import { basename, resolve as resolvePath } from 'node:path';
import { compareRuns, type RunComparison } from '../../model/compare/compare.ts';
import { showValue } from '../../model/compare/scenario-diff.ts';
import { FIELD_INFO } from '../../model/diagnostics/fields.ts';
import { NC_FILL_FLOAT, type NcAttributeInput } from '../../model/io/netcdf-format.ts';
import { NetcdfWriter, type ByteSink } from '../../model/io/netcdf-writer.ts';
import { RunFileError, type RunData } from '../../model/io/run-data.ts';
import { readRun } from '../../model/io/run-import.ts';
import { RUN_PHYSICS_ATTRIBUTES } from '../../model/io/run-physics-file.ts';
import {
  INTEGRAL_VARIABLES,
  PYCNO_VERSION,
  probeVariableName,
  runOutputFile,
  writeRunFixed,
  type RunDescription,
} from '../../model/io/run-output.ts';
import { isMeasured, measureWaves, type NotMeasured, type SpeedMeasure } from '../../model/report/measure.ts';
import { READ_LIMITS } from '../../model/io/read-limits.ts';
import { clipLine } from '../../model/scenario/errors.ts';
import { readBounded, ReadRefused } from '../files-node.ts';
import {
  OutputRefused,
  OutputWriteError,
  planOutput,
  writeWhole,
  type OutputFile,
  type OutputPlan,
  type ReadFile,
} from './output-file.ts';
import { formatBytes, type ProgressStream } from './progress.ts';

export interface CommandIO {
  stdout: { write(s: string): unknown };
  stderr: ProgressStream;
  cwd: string;
}

export class CommandInputError extends Error {}

export function printError(io: CommandIO, message: string): void {
  for (const line of message.split('\n')) io.stderr.write(`pycno: ${clipLine(line)}\n`);
}

/** Read and check a run file; a clear CommandInputError naming the file otherwise. */
export function readRunFile(io: CommandIO, file: string): RunData {
  let bytes: Uint8Array;
  try {
    bytes = readBounded(file === '' ? '' : resolvePath(io.cwd, file), READ_LIMITS.runFile);
  } catch (e) {
    if (!(e instanceof ReadRefused)) throw e;
    throw new CommandInputError(`${file === '' ? "''" : file}: cannot read the run file: ${e.message}`);
  }
  try {
    return readRun(bytes, file);
  } catch (e) {
    if (e instanceof RunFileError) throw new CommandInputError(e.message);
    throw e;
  }
}

/**
 * Write a command's output file whole (output-file.ts): checked against the files the command
 * reads, locked, written under a temporary name and renamed when complete, so a failure or a kill
 * never leaves a half-written file under the name asked for nor replaces an input. Refusals and
 * write failures come back as CommandInputError lines ("--out X: ...").
 */
export async function writeComplete(
  io: CommandIO,
  out: string,
  reads: readonly ReadFile[],
  what: string,
  write: (sink: OutputFile) => Promise<void>,
): Promise<void> {
  let plan: OutputPlan;
  try {
    plan = planOutput('--out', out, io.cwd, reads);
  } catch (e) {
    if (e instanceof OutputRefused) throw new CommandInputError(e.message);
    throw e;
  }
  try {
    await writeWhole(plan, write);
  } catch (e) {
    if (e instanceof OutputRefused) throw new CommandInputError(e.message);
    if (e instanceof OutputWriteError)
      throw new CommandInputError(
        `--out ${out}: cannot write ${what}: ${e.reason} (${formatBytes(e.written)} were written); ${plan.replaces ? `${out} is as it was` : `${out} was not written`}`,
      );
    throw e;
  }
}

/** Refuse an --out that names one of the command's inputs, before any work is done. */
export function checkOut(io: CommandIO, out: string | undefined, reads: readonly ReadFile[]): void {
  if (out === undefined) return;
  try {
    planOutput('--out', out, io.cwd, reads);
  } catch (e) {
    if (e instanceof OutputRefused) throw new CommandInputError(e.message);
    throw e;
  }
}

export function parseFilesAndOut(
  args: readonly string[],
  command: string,
  count: number,
  usage: string,
): { files: string[]; out?: string } | 'help' {
  const files: string[] = [];
  let out: string | undefined;
  for (let k = 0; k < args.length; k++) {
    const a = args[k];
    if (a === '--help' || a === '-h') return 'help';
    if (a === '--out' || a.startsWith('--out=')) {
      const v = a === '--out' ? args[++k] : a.slice('--out='.length);
      if (v === undefined || v === '' || (v.startsWith('--') && v.length > 2))
        throw new CommandInputError('--out needs a file name');
      out = v;
      continue;
    }
    if (a.startsWith('-') && a.length > 1)
      throw new CommandInputError(`unknown option ${a} for pycno ${command}; see pycno --help`);
    files.push(a);
  }
  if (files.length !== count)
    throw new CommandInputError(
      `pycno ${command} takes ${count === 1 ? 'one run file' : `${count} run files`} (got ${files.length}${files.length ? `: ${files.join(', ')}` : ''}); usage: ${usage}`,
    );
  return { files, out };
}

const p3 = (x: number) => (Number.isFinite(x) ? Number(x.toPrecision(3)).toString() : '-');

function rows(list: Array<[string, string]>): string {
  const w = Math.max(...list.map(([k]) => k.length));
  return list.map(([k, v]) => `${k.padEnd(w)}  ${v}`).join('\n') + '\n';
}

export function speedLine(m: SpeedMeasure | NotMeasured | null, theoryName: string, theory: number): string {
  if (m === null) return `not measured (no off-equatorial Hovmoller section); ${theoryName} = ${p3(theory)} m/s`;
  if (!isMeasured(m)) return `not measured (${m.reason}); ${theoryName} = ${p3(theory)} m/s`;
  return `${p3(m.speed)} ± ${p3(m.standardError)} m/s at ${p3(m.lat)}°; ${theoryName} = ${p3(theory)} m/s (${m.speed >= theory ? '+' : ''}${((100 * (m.speed - theory)) / theory).toFixed(1)} %)`;
}

export function compareSummary(
  c: RunComparison,
  fileA: string,
  fileB: string,
  extra: Array<[string, string]> = [],
): string {
  const { a, b } = c;
  const list: Array<[string, string]> = [
    ['A', `${fileA}: ${a.name} (scenario ${a.scenarioSha256.slice(0, 12)}, Pycno ${a.version})`],
    ['B', `${fileB}: ${b.name} (scenario ${b.scenarioSha256.slice(0, 12)}, Pycno ${b.version})`],
  ];
  if (c.scenario.length === 0) list.push(['scenario', 'the same scenario values']);
  else {
    list.push(['scenario', `${c.scenario.length} value${c.scenario.length > 1 ? 's differ' : ' differs'} (A -> B):`]);
    const w = Math.max(...c.scenario.map((d) => d.path.length));
    for (const d of c.scenario) list.push(['', `${d.path.padEnd(w)}  ${showValue(d.a)} -> ${showValue(d.b)}`]);
  }
  list.push(['grid', c.grid ? c.grid.note : '-']);
  const t = c.commonTimes;
  list.push([
    'common times',
    t.length
      ? `${t.length} (days ${p3(t[0].day)} to ${p3(t[t.length - 1].day)}, matched within ${p3(c.toleranceDays)} days); ${c.fieldTimes.length} with fields in both`
      : 'none',
  ]);
  if (c.status === 'ok') {
    const fw = Math.max(...c.fields.map((f) => f.length));
    if (!c.fieldTimes.length) list.push(['max |B - A|', 'no common times with fields in both']);
    c.fieldTimes.length &&
      c.fields.forEach((f, k) =>
        list.push([
          k === 0 ? 'max |B - A|' : '',
          `${f.padEnd(fw)}  ${p3(c.maxAbsDifference[f]!)} ${FIELD_INFO[f].units}`,
        ]),
      );
  }
  const wa = measureWaves(a);
  const wb = measureWaves(b);
  list.push(['Kelvin speed A', speedLine(wa.kelvin, 'c', wa.c)]);
  list.push(['Kelvin speed B', speedLine(wb.kelvin, 'c', wb.c)]);
  list.push(['long Rossby A', speedLine(wa.rossby, 'c/3', wa.rossbyTheory)]);
  list.push(['long Rossby B', speedLine(wb.rossby, 'c/3', wb.rossbyTheory)]);
  for (const p of c.probes) {
    const ar = wa.arrivals.find((x) => x.probe === p.name)?.day ?? null;
    const br = wb.arrivals.find((x) => x.probe === p.name)?.day ?? null;
    list.push([`arrival ${p.name}`, `A day ${ar === null ? '-' : p3(ar)}, B day ${br === null ? '-' : p3(br)}`]);
  }
  return rows([...list, ...extra]);
}

function fill(values: ArrayLike<number>): Float32Array {
  const out = Float32Array.from(values);
  for (let k = 0; k < out.length; k++) if (Number.isNaN(out[k])) out[k] = NC_FILL_FLOAT;
  return out;
}

/** The difference file: a run's layout on the common grid, values B minus A, both runs named. */
export async function writeDifference(c: RunComparison, fileA: string, fileB: string, sink: ByteSink): Promise<number> {
  const { a, b } = c;
  const g = c.grid!;
  const d: RunDescription = {
    name: `${b.name} minus ${a.name}`,
    description: `Difference B minus A of two Pycno runs: B = ${fileB}, A = ${fileA}`,
    scenarioJson: b.scenarioJson,
    grid: g,
    fields: c.fields,
    hovmollerLats: c.hovmoller.map((h) => h.requestedLat),
    hovmollerRowLats: c.hovmoller.map((h) => h.rowLatA),
    probes: c.probes.map((p) => ({ name: p.name, lon: p.lonA, lat: p.latA })),
    bursts: [],
    dt: a.dt,
    physics: a.physics,
    command: `pycno compare ${fileA} ${fileB}`,
  };
  const file = runOutputFile(d);
  for (const v of file.variables) {
    if (
      c.fields.includes(v.name as never) ||
      v.name === 'hovmoller_h_anom' ||
      (v.name.startsWith('probe_') && v.name !== 'probe_name' && v.name !== 'probe_lon' && v.name !== 'probe_lat') ||
      INTEGRAL_VARIABLES.some((iv) => iv.name === v.name)
    ) {
      const atts = { ...(v.attributes ?? {}) } as Record<string, NcAttributeInput>;
      atts.long_name = `difference B minus A of the ${String(atts.long_name)}`;
      delete atts.standard_name; // a difference is not the quantity CF names
      v.attributes = atts;
    }
    if (v.name === 'step') v.attributes = { ...(v.attributes ?? {}), long_name: 'model time steps taken by run A' };
    if (v.name === 'time')
      v.attributes = {
        ...(v.attributes ?? {}),
        comment: `run A's model day; run B's record within ${c.toleranceDays} days of it`,
      };
  }
  const atts = { ...file.attributes } as Record<string, NcAttributeInput>;
  // Neither run's scenario nor physics describes a difference of two runs.
  for (const k of [
    'pycno_scenario',
    'pycno_scenario_sha256',
    'pycno_bursts',
    'pycno_time_step_seconds',
    ...RUN_PHYSICS_ATTRIBUTES.map((a) => a.name),
  ])
    delete atts[k];
  Object.assign(atts, {
    title: `Difference B minus A: ${b.name} minus ${a.name}`,
    summary: `Fields, integrals, Hovmoller rows and probe series of run B minus those of run A at matching model times (B = ${basename(fileB)}, A = ${basename(fileA)})`,
    pycno_file: 'run-difference',
    pycno_version: PYCNO_VERSION,
    pycno_difference: 'B minus A',
    pycno_run_a_file: fileA,
    pycno_run_b_file: fileB,
    pycno_run_a_scenario_sha256: a.scenarioSha256,
    pycno_run_b_scenario_sha256: b.scenarioSha256,
    pycno_run_a_scenario: a.scenarioJson,
    pycno_run_b_scenario: b.scenarioJson,
    pycno_grid: g.note,
    pycno_hovmoller_requested_lat: c.hovmoller.length ? c.hovmoller.map((h) => h.requestedLat) : 'none',
  });
  file.attributes = atts;
  const w = new NetcdfWriter(file, sink);
  await w.writeHeader();
  await writeRunFixed(w, d);
  const missing = new Float32Array(g.nx * g.ny).fill(NC_FILL_FLOAT);
  for (let n = 0; n < c.commonTimes.length; n++) {
    const t = c.commonTimes[n];
    const values: Record<string, ArrayLike<number> | number> = { time: t.day, step: a.steps[t.indexA] };
    for (const f of c.fields) {
      const diff = c.difference(n, f);
      values[f] = diff ? fill(diff) : missing; // no fields kept at this time: missing, as in a run
    }
    for (const iv of INTEGRAL_VARIABLES) values[iv.name] = c.integrals[iv.key as keyof typeof c.integrals]!.diff[n];
    if (c.hovmoller.length) {
      const rowsOut = new Float32Array(c.hovmoller.length * g.nx);
      c.hovmoller.forEach((h, q) => rowsOut.set(fill(h.diff.subarray(n * g.nx, (n + 1) * g.nx)), q * g.nx));
      values.hovmoller_h_anom = rowsOut;
    }
    if (c.probes.length)
      for (const f of c.fields) values[probeVariableName(f)] = fill(c.probes.map((p) => p.series[f]!.diff[n]));
    await w.appendRecord(values);
  }
  await w.close();
  return c.commonTimes.length;
}

export const COMPARE_USAGE = 'pycno compare A.nc B.nc [--out DIFF.nc]';

export async function compareCommand(args: readonly string[], io: CommandIO): Promise<number> {
  try {
    const parsed = parseFilesAndOut(args, 'compare', 2, COMPARE_USAGE);
    if (parsed === 'help') {
      io.stdout.write(`usage: ${COMPARE_USAGE}\n`);
      return 0;
    }
    const [fileA, fileB] = parsed.files;
    const reads = [
      { path: resolvePath(io.cwd, fileA), what: `run A (${fileA})` },
      { path: resolvePath(io.cwd, fileB), what: `run B (${fileB})` },
    ];
    checkOut(io, parsed.out, reads);
    const a = readRunFile(io, fileA);
    const b = readRunFile(io, fileB);
    const c = compareRuns(a, b);
    if (c.status !== 'ok') {
      io.stdout.write(compareSummary(c, fileA, fileB));
      printError(io, `${c.message}${parsed.out ? `; ${parsed.out} not written` : ''}`);
      return 2;
    }
    const extra: Array<[string, string]> = [];
    let failure: string | null = null;
    if (parsed.out) {
      const out = parsed.out;
      try {
        let records = 0;
        await writeComplete(io, out, reads, 'the difference file', async (sink) => {
          records = await writeDifference(c, fileA, fileB, sink);
        });
        extra.push(['output', `${out} (${records} records, B minus A)`]);
      } catch (e) {
        if (!(e instanceof CommandInputError)) throw e;
        failure = e.message;
      }
    }
    io.stdout.write(compareSummary(c, fileA, fileB, extra));
    if (failure) {
      printError(io, failure);
      return 2;
    }
    return 0;
  } catch (e) {
    if (e instanceof CommandInputError) {
      printError(io, e.message);
      return 2;
    }
    throw e;
  }
}
