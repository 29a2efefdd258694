// `pycno rerun FILE.nc [--out NEW.nc]`: run a Pycno run output's embedded scenario again and say
// whether every value of every variable comes out bit for bit the same.
//
// The embedded scenario (pycno_scenario) is the scenario as it was run: defaults filled in and the
// --set and --days values of the original command already applied, so it is run as it stands,
// with no overrides. A run file may come from anyone, so the files its scenario names (wind
// files, restart files, spin-up scenarios) are read only from the folder the user gives with
// --inputs DIR, relative to it, and only when they are regular files inside it (input-policy.ts);
// without --inputs none is read. --out is written like pycno run's output (output-file.ts).
// Exit codes: 0 every value matches, 1 a value differs (or the run failed), 2 bad input.

import { dirname, join, resolve as resolvePath } from 'node:path';
import { readNetcdf, NetcdfReadError, type NcFile, type NcReadVariable } from '../../model/io/netcdf-read.ts';
import { MemorySink } from '../../model/io/netcdf-writer.ts';
import { PYCNO_VERSION, RunOutputWriter } from '../../model/io/run-output.ts';
import { RUN_PHYSICS_ATTRIBUTES } from '../../model/io/run-physics-file.ts';
import { sha256Hex } from '../../model/io/sha256.ts';
import { Engine } from '../engine.ts';
import { describeLoadedRun } from '../run-description.ts';
import { nodeReader, readBounded, ReadRefused } from '../files-node.ts';
import { READ_LIMITS } from '../../model/io/read-limits.ts';
import { clipLine } from '../../model/scenario/errors.ts';
import { RunFileError } from '../../model/io/run-data.ts';
import { readRun } from '../../model/io/run-import.ts';
import type { RunAllowance } from '../../model/scenario/run-size.ts';
import { allowedInputs } from './input-policy.ts';
import {
  checkSpace,
  OutputFile,
  OutputRefused,
  OutputWriteError,
  planOutput,
  writeFailureLine,
  type ReadFile,
} from './output-file.ts';

export interface RerunIO {
  stdout: { write(s: string): unknown };
  stderr: { write(s: string): unknown };
  cwd: string;
}

export const RERUN_USAGE = `  pycno rerun FILE.nc [--out NEW.nc] [--inputs DIR] [--allow-long-run] [--allow-large-output]
`;

export const RERUN_HELP = `  rerun FILE.nc          run the scenario embedded in a Pycno run output again and compare every
                         value bit for bit (exit 0 all match, 1 a difference, 2 bad input)
  --out NEW.nc           (rerun) keep the new run's file; without it the new run stays in memory
  --inputs DIR           (rerun) allow the regular files inside DIR as the inputs the embedded
                         scenario names (wind, restart, spin-up files; paths relative to DIR);
                         without it, a scenario that names a file is refused
`;

/** The first difference between two run files, or null when every value is the same. */
export interface Difference {
  variable: string;
  /** Flat index in file order (records first), -1 for a difference of shape or presence. */
  index: number;
  was: string;
  now: string;
}

function textAttribute(f: NcFile, name: string): string | undefined {
  const a = f.attributes[name];
  return a && typeof a.value === 'string' ? a.value : undefined;
}

/** Same bits, so NaN equals NaN and -0 differs from +0. */
function sameNumber(a: number, b: number): boolean {
  return Object.is(a, b) || (Number.isNaN(a) && Number.isNaN(b));
}

function describeShape(v: NcReadVariable): string {
  return `${v.type} [${v.dimensions.join(', ')}] = [${v.shape.join(', ')}]`;
}

/** Compare every variable's values (and the attributes that describe the run, not when it ran). */
export function firstDifference(was: NcFile, now: NcFile): Difference | null {
  for (const att of [
    'pycno_scenario_sha256',
    'pycno_bursts',
    'pycno_time_step_seconds',
    ...RUN_PHYSICS_ATTRIBUTES.map((a) => a.name),
  ]) {
    const a = was.attributes[att];
    const b = now.attributes[att];
    const sa = a === undefined ? '(none)' : typeof a.value === 'string' ? a.value : Array.from(a.value).join(',');
    const sb = b === undefined ? '(none)' : typeof b.value === 'string' ? b.value : Array.from(b.value).join(',');
    if (sa !== sb) return { variable: `global attribute ${att}`, index: -1, was: sa, now: sb };
  }
  const names = new Set([...was.variables.map((v) => v.name), ...now.variables.map((v) => v.name)]);
  for (const name of names) {
    const a = was.variables.find((v) => v.name === name);
    const b = now.variables.find((v) => v.name === name);
    if (!a || !b)
      return {
        variable: name,
        index: -1,
        was: a ? describeShape(a) : '(absent)',
        now: b ? describeShape(b) : '(absent)',
      };
    if (describeShape(a) !== describeShape(b))
      return { variable: name, index: -1, was: describeShape(a), now: describeShape(b) };
    if (typeof a.values === 'string' || typeof b.values === 'string') {
      if (a.values !== b.values)
        return { variable: name, index: 0, was: JSON.stringify(a.values), now: JSON.stringify(b.values) };
      continue;
    }
    const n = Math.max(a.values.length, b.values.length);
    for (let k = 0; k < n; k++) {
      if (!sameNumber(a.values[k], b.values[k]))
        return { variable: name, index: k, was: String(a.values[k]), now: String(b.values[k]) };
    }
  }
  return null;
}

/** The place of a flat index in a variable, e.g. "time 3, lat 2, lon 17". */
export function placeOf(v: NcReadVariable, index: number): string {
  if (index < 0 || v.shape.length === 0) return '';
  const parts: string[] = [];
  let rest = index;
  for (let d = v.shape.length - 1; d >= 0; d--) {
    const n = Math.max(1, v.shape[d]);
    parts.unshift(`${v.dimensions[d]} ${rest % n}`);
    rest = Math.floor(rest / n);
  }
  return parts.join(', ');
}

class RerunInputError extends Error {}

function parseRerunArgs(argv: readonly string[]): { file: string; out?: string; inputs?: string; allow: RunAllowance } {
  const positional: string[] = [];
  let out: string | undefined;
  let inputs: string | undefined;
  const allow: RunAllowance = {};
  for (let k = 0; k < argv.length; k++) {
    let a = argv[k];
    let inline: string | undefined;
    if (a.startsWith('--') && a.includes('=')) {
      inline = a.slice(a.indexOf('=') + 1);
      a = a.slice(0, a.indexOf('='));
    }
    const value = (what: string) => {
      if (inline !== undefined) return inline;
      const v = argv[++k];
      if (v === undefined || v.startsWith('--')) throw new RerunInputError(`${a} needs ${what}`);
      return v;
    };
    if (a === '--out') out = value('a file name');
    else if (a === '--inputs') inputs = value('a folder');
    else if (a === '--quiet') continue;
    else if (a === '--allow-long-run') allow.longRun = true;
    else if (a === '--allow-large-output') allow.largeOutput = true;
    else if (a.startsWith('-') && a.length > 1)
      throw new RerunInputError(`unknown option ${a} for pycno rerun; see pycno --help`);
    else positional.push(a);
  }
  if (positional.length !== 1)
    throw new RerunInputError(`pycno rerun takes one run file, e.g. pycno rerun run.nc (got ${positional.length})`);
  return { file: positional[0], out, inputs, allow };
}

/** Run `pycno rerun`; resolves to the exit code. argv holds what follows the word rerun. */
export async function rerun(argv: readonly string[], io: RerunIO): Promise<number> {
  const say = (text: string) => {
    for (const line of text.split('\n')) io.stderr.write(`pycno: ${clipLine(line)}\n`);
  };
  let args: ReturnType<typeof parseRerunArgs>;
  try {
    args = parseRerunArgs(argv);
  } catch (e) {
    if (e instanceof RerunInputError) {
      say(e.message);
      return 2;
    }
    throw e;
  }
  const path = args.file === '' ? '' : resolvePath(io.cwd, args.file);
  let oldBytes: Uint8Array;
  let old: NcFile;
  try {
    oldBytes = readBounded(path, READ_LIMITS.runFile);
    old = readNetcdf(oldBytes);
  } catch (e) {
    if (!(e instanceof ReadRefused || e instanceof NetcdfReadError)) throw e;
    say(`${args.file === '' ? "''" : args.file}: cannot read the run file: ${e.message}`);
    return 2;
  }
  if (textAttribute(old, 'pycno_file') !== 'run-output') {
    say(
      `${args.file}: is not a Pycno run output (no pycno_file = "run-output" attribute); rerun needs the file a pycno run wrote`,
    );
    return 2;
  }
  const scenarioJson = textAttribute(old, 'pycno_scenario');
  if (!scenarioJson) {
    say(`${args.file}: holds no embedded scenario (global attribute pycno_scenario)`);
    return 2;
  }
  const hash = textAttribute(old, 'pycno_scenario_sha256');
  if (hash !== sha256Hex(scenarioJson)) {
    say(
      `${args.file}: the embedded scenario does not match its hash (pycno_scenario_sha256 ${hash ?? 'missing'}, the text hashes to ${sha256Hex(scenarioJson)}): it was changed after the run`,
    );
    return 2;
  }
  // Every variable a run file must have, with its type and shape: a damaged file is bad input
  // (exit 2, naming the variable), not a run that "differs" from the rerun.
  try {
    readRun(oldBytes, args.file);
  } catch (e) {
    if (!(e instanceof RunFileError)) throw e;
    say(e.message);
    return 2;
  }
  const version = textAttribute(old, 'pycno_version');
  if (version !== PYCNO_VERSION)
    io.stdout.write(
      `note            the file was written by Pycno ${version ?? '(unknown)'}, this is ${PYCNO_VERSION}: values may differ\n`,
    );

  // The scenario's relative input paths resolve against the allowed folder (or, to say which
  // file it names, the run file's folder); nothing outside the allowed folder is read.
  const base = args.inputs ? resolvePath(io.cwd, args.inputs) : dirname(path);
  let allow: (p: string) => string;
  try {
    allow = allowedInputs(args.inputs ? base : null, args.inputs);
  } catch (e) {
    say((e as Error).message);
    return 2;
  }
  const reads: ReadFile[] = [{ path, what: `the run file ${args.file}` }];
  const shown = `${args.file}#pycno_scenario`;
  const engine = new Engine({ maxFramesPerSecond: 1 });
  const loaded = await engine.load(scenarioJson, join(base, 'pycno_scenario'), {
    reader: async (p, limit) => {
      const real = allow(p.startsWith('/') ? p : resolvePath(base, p));
      reads.push({ path: real, what: `${real}, an input of the run file's scenario` });
      return nodeReader(real, limit);
    },
    allow: args.allow,
  });
  if (!loaded.ok) {
    say(`${shown}: ${loaded.error.message.replaceAll(`${join(base, 'pycno_scenario')}: `, '')}`);
    return loaded.error.kind === 'input' ? 2 : 1;
  }
  const info = loaded.scenario;
  if (info.scenarioJson !== scenarioJson) {
    // Reading the scenario again changed it (a default or a rounding): not the same run.
    say(
      `${shown}: the scenario reads back differently from the text embedded in the file; it cannot be repeated exactly`,
    );
    return 1;
  }
  const d = describeLoadedRun(info, args.file, `pycno rerun ${args.file}`);
  const memory = args.out ? null : new MemorySink();
  let file: OutputFile | null = null;
  const writer = new RunOutputWriter(d, memory ?? { write: (offset, bytes) => file!.write(offset, bytes) });
  if (args.out !== undefined) {
    try {
      const plan = planOutput('--out', args.out, io.cwd, reads);
      checkSpace(plan, writer.bytesFor(info.derived.outputs));
      file = OutputFile.open(plan);
      file.create();
    } catch (e) {
      file?.discard(false);
      if (e instanceof OutputRefused) {
        say(e.message);
        return 2;
      }
      throw e;
    }
  }
  let now: NcFile;
  try {
    let failure: OutputWriteError | null = null;
    try {
      await writer.begin();
    } catch (e) {
      if (e instanceof OutputWriteError && file) {
        say(writeFailureLine(file, e, 'the header', file.freeBytes(), false));
        return 2;
      }
      throw e;
    }
    engine.setRecorder(async (r) => {
      try {
        await writer.append(r);
      } catch (e) {
        if (e instanceof OutputWriteError) failure = e;
        throw e;
      }
    });
    engine.start();
    const end = await engine.idle();
    if (failure && file) {
      say(
        writeFailureLine(
          file,
          failure,
          `record ${writer.records + 1} of ${info.derived.outputs}`,
          file.freeBytes(),
          false,
        ),
      );
      return 1;
    }
    if (end.status === 'failed' && end.error) {
      say(`the rerun failed: ${end.error.message}`);
      return end.error.kind === 'input' ? 2 : 1;
    }
    try {
      await writer.close();
      file?.sync();
    } catch (e) {
      if (e instanceof OutputWriteError && file) {
        say(writeFailureLine(file, e, 'the end of the file', file.freeBytes(), false));
        return 1;
      }
      throw e;
    }
    try {
      now = readNetcdf(memory ? memory.bytes() : readBounded(file!.temp, READ_LIMITS.runFile));
    } catch (e) {
      if (e instanceof NetcdfReadError) {
        say(`internal error: the rerun's own file cannot be read: ${e.message}`);
        return 1;
      }
      throw e;
    }
    // Kept whether it matches or not: the new run's file is what --out asked for.
    if (file) {
      try {
        file.commit();
      } catch (e) {
        if (e instanceof OutputWriteError) {
          say(writeFailureLine(file, e, 'the end of the file', file.freeBytes(), false));
          return 1;
        }
        throw e;
      }
    }
  } finally {
    file?.discard(false);
  }
  const diff = firstDifference(old, now);
  if (!diff) {
    const values = now.variables.reduce((s, v) => s + v.values.length, 0);
    io.stdout.write(
      `match           every value of ${now.variables.length} variables (${values} values, ${now.numRecords} records) is bit for bit the same as in ${args.file}\n`,
    );
    return 0;
  }
  const v = old.variables.find((x) => x.name === diff.variable);
  const where = v && diff.index >= 0 ? ` at index ${diff.index} (${placeOf(v, diff.index)})` : '';
  io.stdout.write(`differs         ${diff.variable}${where}: ${args.file} has ${diff.was}, the rerun ${diff.now}\n`);
  return 1;
}
