// The command line: `pycno run` drives the engine in this process and streams every output
// interval into a NetCDF file; `pycno check` validates and prints the derived numbers.
// Exit codes: 0 done, 2 bad input (one clear line first), 1 the model blew up (or a failure
// of the program itself), 130 interrupted with Ctrl-C (the file then holds the days done).

import { writeFileSync } from 'node:fs';
import { basename, resolve as resolvePath } from 'node:path';
import type { Integrals } from '../../model/diagnostics/integrals.ts';
import { RunOutputWriter, PYCNO_VERSION, type RunDescription } from '../../model/io/run-output.ts';
import { writeRestart } from '../../model/io/restart.ts';
import { derivedNumbers } from '../../model/scenario/derived.ts';
import { buildPrepared, loadInputs, parseScenario, resolveRelative } from '../../model/scenario/load-inputs.ts';
import { describeLoadedRun } from '../run-description.ts';
import { Engine, toEngineError } from '../engine.ts';
import { FileSink, nodeReader } from '../files-node.ts';
import type { EngineError, LoadedScenario } from '../protocol.ts';
import { compareCommand, COMPARE_USAGE } from './compare.ts';
import { Progress, type ProgressStream } from './progress.ts';
import { reportCommand, REPORT_USAGE } from './report-command.ts';
import { checkReport, runSummary } from './report.ts';
import { rerun, RERUN_HELP, RERUN_USAGE } from './rerun.ts';
import { sweep, SWEEP_HELP, SWEEP_USAGE } from './sweep.ts';
import { checkThreadsOption, type ThreadsOption } from '../../model/parallel/threads.ts';
import { nodeStripHost } from '../strips-node.ts';
import type { CliIO } from './io.ts';

export const USAGE = `usage:
  pycno run SCENARIO.json [--out FILE.nc] [--days N] [--set path=value ...] [--restart-out FILE.nc] [--threads N|auto] [--quiet]
  pycno check SCENARIO.json [--set path=value ...]
${RERUN_USAGE}  ${SWEEP_USAGE}  ${COMPARE_USAGE}
  ${REPORT_USAGE}
  pycno --version | --help

  --out FILE.nc          output file (default: the scenario's name with .nc, in the current folder)
  --days N               run length in days (the same as --set time.days=N)
  --set path=value       change one scenario value, e.g. --set physics.reducedGravity=0.05
  --restart-out FILE.nc  also write a restart file of the end state (exact continuation)
  --threads N|auto       split the linear step into N latitude strips on N threads (same results bit
                         for bit; auto: one per core on grids large enough to gain); default 1
  --quiet                no progress and no warnings on stderr (errors only)
${RERUN_HELP}${SWEEP_HELP}  compare A.nc B.nc      how run B differs from run A: scenario values, grid, common times, largest
                         difference per field, measured wave speeds beside theory (exit 2: no overlap)
  --out DIFF.nc          (compare) write B minus A as a NetCDF file in the layout of a run
  report RUN.nc          a one-page printable HTML report of a run
  --out REPORT.html      (report) the report file (default: the run file's name with .html)
`;

class UsageError extends Error {}

interface Args {
  command: 'run' | 'check';
  scenario: string;
  out?: string;
  restartOut?: string;
  sets: string[];
  quiet: boolean;
  threads?: ThreadsOption;
}

function parseArgs(argv: readonly string[]): Args | 'help' | 'version' {
  if (argv.length === 0) throw new UsageError('no command given; try pycno run SCENARIO.json or pycno check SCENARIO.json');
  const [command, ...rest] = argv;
  if (command === '--help' || command === '-h' || command === 'help') return 'help';
  if (command === '--version' || command === '-V') return 'version';
  if (command !== 'run' && command !== 'check') throw new UsageError(`unknown command '${command}'; the commands are run, check, rerun, sweep, compare and report`);
  const args: Args = { command, scenario: '', sets: [], quiet: false };
  const positional: string[] = [];
  for (let k = 0; k < rest.length; k++) {
    let a = rest[k];
    let inline: string | undefined;
    if (a.startsWith('--') && a.includes('=')) {
      inline = a.slice(a.indexOf('=') + 1);
      a = a.slice(0, a.indexOf('='));
    }
    const value = (what: string): string => {
      if (inline !== undefined) return inline;
      const v = rest[++k];
      if (v === undefined || (v.startsWith('--') && v.length > 2)) throw new UsageError(`${a} needs ${what}`);
      return v;
    };
    const runOnly = () => {
      if (command !== 'run') throw new UsageError(`${a} applies to pycno run only`);
    };
    switch (a) {
      case '--set':
        args.sets.push(value('path=value, e.g. --set physics.reducedGravity=0.05'));
        break;
      case '--out':
        runOnly();
        args.out = value('a file name');
        break;
      case '--restart-out':
        runOnly();
        args.restartOut = value('a file name');
        break;
      case '--days': {
        const v = value('a number of days');
        const days = Number(v);
        if (v.trim() === '' || !(days > 0) || !Number.isFinite(days)) throw new UsageError(`--days: expected a number of days > 0 (got '${v}')`);
        args.sets.push(`time.days=${days}`);
        break;
      }
      case '--threads': {
        runOnly();
        const v = value("a number of threads or 'auto'");
        try {
          args.threads = checkThreadsOption(v === 'auto' ? v : v.trim() === '' ? NaN : Number(v), '--threads');
        } catch (e) {
          throw new UsageError((e as Error).message.replace(/\(got .*\)$/, `(got '${v}')`));
        }
        break;
      }
      case '--quiet':
        args.quiet = true;
        break;
      case '--help':
      case '-h':
        return 'help';
      default:
        if (a.startsWith('-') && a.length > 1) throw new UsageError(`unknown option ${a}; see pycno --help`);
        positional.push(a);
    }
  }
  if (positional.length === 0) throw new UsageError(`pycno ${command} needs a scenario file, e.g. pycno ${command} scenario.json`);
  if (positional.length > 1) throw new UsageError(`pycno ${command} takes one scenario file (got ${positional.join(', ')})`);
  args.scenario = positional[0];
  return args;
}

function printError(io: CliIO, message: string): void {
  for (const line of message.split('\n')) io.stderr.write(`pycno: ${line}\n`);
}

function exitCodeFor(e: EngineError): number {
  return e.kind === 'input' ? 2 : 1;
}

/** Run the command line; resolves to the exit code. */
export async function main(argv: readonly string[], io: CliIO): Promise<number> {
  if (argv[0] === 'rerun') return rerun(argv.slice(1), io);
  if (argv[0] === 'sweep') return sweep(argv.slice(1), io);
  if (argv[0] === 'compare') return compareCommand(argv.slice(1), io);
  if (argv[0] === 'report') return reportCommand(argv.slice(1), io);
  let args: ReturnType<typeof parseArgs>;
  try {
    args = parseArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      printError(io, e.message);
      return 2;
    }
    throw e;
  }
  if (args === 'help') {
    io.stdout.write(USAGE);
    return 0;
  }
  if (args === 'version') {
    io.stdout.write(`pycno ${PYCNO_VERSION}\n`);
    return 0;
  }
  const path = resolvePath(io.cwd, args.scenario);
  let text: string;
  try {
    text = new TextDecoder('utf-8').decode(await nodeReader(path));
  } catch (e) {
    printError(io, `${args.scenario}: cannot read the scenario file: ${(e as Error).message}`);
    return 2;
  }
  // Messages name the file as the user wrote it; inputs are found relative to its real place.
  const shown = args.scenario;
  const reader = (p: string) => nodeReader(p.startsWith('/') ? p : resolvePath(io.cwd, p));
  return args.command === 'check' ? check(args, text, shown, reader, io) : run(args, text, shown, reader, io);
}

async function check(args: Args, text: string, shown: string, reader: (p: string) => Promise<Uint8Array>, io: CliIO): Promise<number> {
  try {
    const parsed = parseScenario(text, shown, args.sets);
    // A spin-up is not run by check: its file is validated, the start taken as rest.
    const notes: string[] = [];
    let forInputs = parsed;
    if (parsed.resolved.initial.kind === 'spinup') {
      const spinPath = resolveRelative(shown, parsed.resolved.initial.scenario);
      let spinText: string;
      try {
        spinText = new TextDecoder().decode(await reader(spinPath));
      } catch (e) {
        printError(io, `${shown}: initial.scenario: cannot read the spin-up scenario ${spinPath}: ${(e as Error).message}`);
        return 2;
      }
      parseScenario(spinText, spinPath);
      notes.push(`spin-up scenario ${spinPath} is valid (not run by check)`);
      forInputs = { ...parsed, resolved: { ...parsed.resolved, initial: { kind: 'rest' } } };
    }
    const inputs = await loadInputs(forInputs, reader);
    const { model } = buildPrepared(forInputs, inputs);
    const d = derivedNumbers(parsed.resolved, model.grid);
    io.stdout.write(checkReport(parsed.resolved.name, shown, d, parsed.resolved.outputFields, parsed.resolved.days, parsed.resolved.outputEveryDays, [...inputs.notes, ...notes]));
    return 0;
  } catch (e) {
    const err = toEngineError(e);
    printError(io, err.message);
    return exitCodeFor(err);
  }
}

/** The command as the files' history records it: the scenario and every --set (--days as its --set). */
function commandLine(argv: Args, shown: string): string {
  return ['pycno', argv.command, shown, ...argv.sets.flatMap((s) => ['--set', s])].join(' ');
}

function describe(info: LoadedScenario, shown: string, argv: Args, engine: Engine): RunDescription {
  return describeLoadedRun(info, engine.model!, shown, commandLine(argv, shown));
}

async function run(args: Args, text: string, shown: string, reader: (p: string) => Promise<Uint8Array>, io: CliIO): Promise<number> {
  const engine = new Engine({ maxFramesPerSecond: 10, strips: { host: nodeStripHost(), threads: 1 } });
  try {
    return await runOn(engine, args, text, shown, reader, io);
  } finally {
    await engine.model?.close(); // the strip workers, if any
  }
}

async function runOn(engine: Engine, args: Args, text: string, shown: string, reader: (p: string) => Promise<Uint8Array>, io: CliIO): Promise<number> {
  const quiet = args.quiet;
  // Every file the run reads, so that --out can never overwrite one of them.
  const inputs = new Set([resolvePath(io.cwd, shown)]);
  const loaded = await engine.load(text, shown, {
    sets: args.sets,
    reader: (p) => {
      inputs.add(p.startsWith('/') ? p : resolvePath(io.cwd, p));
      return reader(p);
    },
    onSpinup: quiet ? undefined : spinupReporter(io),
    threads: args.threads,
  });
  if (!loaded.ok) {
    printError(io, loaded.error.message);
    return exitCodeFor(loaded.error);
  }
  const info = loaded.scenario;
  const outFile = args.out ?? `${basename(shown).replace(/\.json$/i, '')}.nc`;
  const outPath = resolvePath(io.cwd, outFile);
  if (inputs.has(outPath)) {
    printError(io, `--out ${outFile}: that is a file this run reads (the scenario or one of its inputs); write the output under another name`);
    return 2;
  }
  let sink: FileSink;
  try {
    sink = new FileSink(outPath);
  } catch (e) {
    printError(io, `--out ${outFile}: cannot write the output file: ${(e as Error).message}`);
    return 2;
  }
  const writer = new RunOutputWriter(describe(info, shown, args, engine), sink);
  await writer.begin();
  let first: Integrals | null = null;
  let fastest: Integrals | null = null;
  let largestCourant = 0;
  engine.setRecorder(async (r) => {
    first ??= r.integrals;
    if (!fastest || r.integrals.maxSpeed > fastest.maxSpeed) fastest = r.integrals;
    largestCourant = Math.max(largestCourant, r.integrals.courant);
    await writer.append(r);
  });
  const model = engine.model!;
  const cells = info.grid.nx * info.grid.ny;
  const progress = new Progress(io.stderr, info.startDay ?? 0, (info.startDay ?? 0) + info.days, cells, info.dt);
  if (!quiet) engine.onFrame((f) => progress.update(f.day));
  let interrupted = false;
  const removeInterrupt = io.onInterrupt?.(() => {
    interrupted = true;
    engine.pause();
  });
  // Said as the run starts, not after it: a long run on an unresolved grid is worth stopping at once.
  if (info.derived.boundaryLayer.advice && !quiet) io.stderr.write(`pycno: warning: ${info.derived.boundaryLayer.advice}\n`);
  const stepsBefore = model.state.steps;
  const t0 = performance.now();
  engine.start();
  const end = await engine.idle();
  const wall = (performance.now() - t0) / 1000;
  removeInterrupt?.();
  if (!quiet) progress.done();
  await writer.close();
  sink.close();
  const steps = model.state.steps - stepsBefore;
  if (end.status === 'failed' && end.error) {
    printError(io, end.error.message);
    io.stderr.write(`pycno: ${outFile} holds the ${writer.records} records written before the failure\n`);
    return exitCodeFor(end.error);
  }
  if (interrupted || end.status !== 'finished') {
    io.stderr.write(`pycno: interrupted on day ${model.day.toFixed(2)}; ${outFile} holds ${writer.records} records\n`);
    return 130;
  }
  let restartFile: string | undefined;
  if (args.restartOut) {
    try {
      writeFileSync(resolvePath(io.cwd, args.restartOut), await writeRestart(model, { scenarioJson: info.scenarioJson, command: commandLine(args, shown) }));
      restartFile = args.restartOut;
    } catch (e) {
      printError(io, `--restart-out ${args.restartOut}: cannot write the restart file: ${(e as Error).message}`);
      return 2;
    }
  }
  for (const n of info.notes ?? []) io.stdout.write(`input           ${n}\n`);
  io.stdout.write(runSummary({ wallSeconds: wall, steps, cells, first, last: model.integrals(), fastest, largestCourant, records: writer.records, outFile, restartFile }));
  return 0;
}

function spinupReporter(io: CliIO): (file: string, day: number, endDay: number) => void {
  let last = -Infinity;
  return (file, day, endDay) => {
    const t = performance.now();
    if (t - last < (io.stderr.isTTY ? 100 : 5000) && day < endDay) return;
    last = t;
    const line = `spin-up ${basename(file)}: day ${day.toFixed(1)} of ${endDay.toFixed(0)}`;
    io.stderr.write(io.stderr.isTTY ? `\r${line}\x1b[K${day >= endDay ? '\n' : ''}` : `pycno: ${line}\n`);
  };
}
