// The command line: `pycno run` drives the engine in this process and streams every output
// interval into a NetCDF file; `pycno check` validates and prints the derived numbers.
// Exit codes: 0 done, 2 bad input (one clear line first), 1 the model blew up, the disk failed
// mid-run (or a failure of the program itself), 130 interrupted with Ctrl-C.
//
// The output goes to a temporary file beside --out (output-file.ts), renamed over it only when
// the run has finished healthy: a run that fails, blows up, is stopped or killed never touches an
// existing file of that name.

import { basename, resolve as resolvePath } from 'node:path';
import { BlowUpError } from '../../model/errors.ts';
import type { Integrals } from '../../model/diagnostics/integrals.ts';
import { RunOutputWriter, PYCNO_VERSION, type RunDescription } from '../../model/io/run-output.ts';
import { writeRestart } from '../../model/io/restart.ts';
import { derivedNumbers } from '../../model/scenario/derived.ts';
import { clipLine } from '../../model/scenario/errors.ts';
import { buildPrepared, loadInputs, parseScenario, resolveRelative } from '../../model/scenario/load-inputs.ts';
import { readJsonNumber } from '../../model/scenario/parse.ts';
import { describeLoadedRun } from '../run-description.ts';
import { Engine, toEngineError } from '../engine.ts';
import { nodeReader, readScenarioText, ReadRefused } from '../files-node.ts';
import { READ_LIMITS } from '../../model/io/read-limits.ts';
import { decodeUtf8Text, TextEncodingError } from '../../model/io/text-decode.ts';
import type { InputReader } from '../../model/scenario/load-inputs.ts';
import type { RunAllowance } from '../../model/scenario/run-size.ts';
import type { EngineError, LoadedScenario } from '../protocol.ts';
import {
  checkSpace,
  OutputFile,
  OutputRefused,
  OutputWriteError,
  planOutput,
  writeFailureLine,
  type ReadFile,
} from './output-file.ts';
import { compareCommand, COMPARE_USAGE } from './compare.ts';
import { Progress } from './progress.ts';
import { reportCommand, REPORT_USAGE } from './report-command.ts';
import { checkReport, runSummary } from './report.ts';
import { rerun, RERUN_HELP, RERUN_USAGE } from './rerun.ts';
import { sweep, SWEEP_HELP, SWEEP_USAGE } from './sweep.ts';
import { BATCH_HELP, BATCH_USAGE, batchSweep, isBatchSweep } from './sweep-batch.ts';
import { checkThreadsOption, type ThreadsOption } from '../../model/parallel/threads.ts';
import { nodeStripHost } from '../strips-node.ts';
import type { CliIO } from './io.ts';

export const USAGE = `usage:
  pycno run SCENARIO.json [--out FILE.nc] [--days N] [--set path=value ...] [--restart-out FILE.nc] [--threads N|auto] [--keep-partial] [--allow-long-run] [--allow-large-output] [--quiet]
  pycno check SCENARIO.json [--days N] [--set path=value ...] [--allow-long-run] [--allow-large-output]
${RERUN_USAGE}  ${SWEEP_USAGE}  ${BATCH_USAGE}  ${COMPARE_USAGE}
  ${REPORT_USAGE}
  pycno --version | --help

  --out FILE.nc          output file (default: the scenario's name with .nc, in the current folder);
                         written as FILE.nc.part-PID and renamed to FILE.nc when the run has finished,
                         so an existing FILE.nc is replaced only by a complete run
  --days N               run length in days (the same as --set time.days=N); a decimal number, as in JSON
  --set path=value       change one scenario value, e.g. --set physics.reducedGravity=0.05
  --restart-out FILE.nc  also write a restart file of the end state (exact continuation)
  --threads N|auto       split the step (either mode) into N latitude strips on N threads (same results
                         for bit; auto: one per core on grids large enough to gain); default 1
  --keep-partial         keep the unfinished FILE.nc.part-PID when the run fails (blow-up, full disk)
  --allow-long-run       run (or check, sweep, rerun) beyond 10,000,000 time steps, which is refused otherwise
  --allow-large-output   the same beyond 8 GiB of output
  --quiet                no progress and no warnings on stderr (errors only)
${RERUN_HELP}${SWEEP_HELP}${BATCH_HELP}  compare A.nc B.nc      how run B differs from run A: scenario values, grid, common times, largest
                         difference per field, measured wave speeds beside theory (exit 2: no overlap)
  --out DIFF.nc          (compare) write B minus A as a NetCDF file in the layout of a run
  report RUN.nc          a one-page printable HTML report of a run; of a sweep summary (sweep --gather),
                         its spread plots
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
  keepPartial: boolean;
  threads?: ThreadsOption;
  allow: RunAllowance;
}

function parseArgs(argv: readonly string[]): Args | 'help' | 'version' {
  if (argv.length === 0)
    throw new UsageError('no command given; try pycno run SCENARIO.json or pycno check SCENARIO.json');
  const [command, ...rest] = argv;
  if (command === '--help' || command === '-h' || command === 'help') return 'help';
  if (command === '--version' || command === '-V') return 'version';
  if (command !== 'run' && command !== 'check')
    throw new UsageError(`unknown command '${command}'; the commands are run, check, rerun, sweep, compare and report`);
  const args: Args = { command, scenario: '', sets: [], quiet: false, keepPartial: false, allow: {} };
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
        const days = readJsonNumber(v);
        if (days === null || !(days > 0))
          throw new UsageError(
            `--days: expected a number of days > 0 (got '${clipLine(v)}'); write it as a scenario file writes numbers, e.g. 30, 2.5 or 1e2 (no hex, no leading '+' or zeros)`,
          );
        args.sets.push(`time.days=${days}`);
        break;
      }
      case '--allow-long-run':
        args.allow.longRun = true;
        break;
      case '--allow-large-output':
        args.allow.largeOutput = true;
        break;
      case '--threads': {
        runOnly();
        const v = value("a number of threads or 'auto'");
        try {
          args.threads = checkThreadsOption(v === 'auto' ? v : (readJsonNumber(v) ?? NaN), '--threads');
        } catch (e) {
          throw new UsageError((e as Error).message.replace(/\(got .*\)$/, `(got '${v}')`));
        }
        break;
      }
      case '--quiet':
        args.quiet = true;
        break;
      case '--keep-partial':
        runOnly();
        args.keepPartial = true;
        break;
      case '--help':
      case '-h':
        return 'help';
      default:
        if (a.startsWith('-') && a.length > 1) throw new UsageError(`unknown option ${a}; see pycno --help`);
        positional.push(a);
    }
  }
  if (positional.length === 0)
    throw new UsageError(`pycno ${command} needs a scenario file, e.g. pycno ${command} scenario.json`);
  if (positional.length > 1)
    throw new UsageError(`pycno ${command} takes one scenario file (got ${positional.join(', ')})`);
  args.scenario = positional[0];
  return args;
}

function printError(io: CliIO, message: string): void {
  for (const line of message.split('\n')) io.stderr.write(`pycno: ${clipLine(line)}\n`);
}

function exitCodeFor(e: EngineError): number {
  return e.kind === 'input' ? 2 : 1;
}

/** Run the command line; resolves to the exit code. */
export async function main(argv: readonly string[], io: CliIO): Promise<number> {
  if (argv[0] === 'rerun') return rerun(argv.slice(1), io);
  if (argv[0] === 'sweep')
    return isBatchSweep(argv.slice(1)) ? batchSweep(argv.slice(1), io) : sweep(argv.slice(1), io);
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
  // An empty argument is an empty path, not the current folder.
  const path = args.scenario === '' ? '' : resolvePath(io.cwd, args.scenario);
  let text: string;
  try {
    text = readScenarioText(path);
  } catch (e) {
    if (!(e instanceof ReadRefused || e instanceof TextEncodingError)) throw e;
    printError(
      io,
      `${args.scenario === '' ? "''" : args.scenario}: ${e instanceof ReadRefused ? 'cannot read the scenario file: ' : ''}${e.message}`,
    );
    return 2;
  }
  // Messages name the file as the user wrote it; inputs are found relative to its real place.
  const shown = args.scenario;
  const reader: InputReader = (p, limit) => nodeReader(p.startsWith('/') ? p : resolvePath(io.cwd, p), limit);
  return args.command === 'check' ? check(args, text, shown, reader, io) : run(args, text, shown, reader, io);
}

async function check(args: Args, text: string, shown: string, reader: InputReader, io: CliIO): Promise<number> {
  try {
    const parsed = parseScenario(text, shown, args.sets, { allow: args.allow });
    // A spin-up is not run by check: its file is validated, the start taken as rest.
    const notes: string[] = [];
    let forInputs = parsed;
    if (parsed.resolved.initial.kind === 'spinup') {
      const spinPath = resolveRelative(shown, parsed.resolved.initial.scenario);
      let spinText: string;
      try {
        spinText = decodeUtf8Text(await reader(spinPath, READ_LIMITS.scenario));
      } catch (e) {
        printError(
          io,
          `${shown}: initial.scenario: cannot read the spin-up scenario ${spinPath}: ${(e as Error).message}`,
        );
        return 2;
      }
      parseScenario(spinText, spinPath, [], { allow: args.allow });
      notes.push(`spin-up scenario ${spinPath} is valid (not run by check)`);
      forInputs = { ...parsed, resolved: { ...parsed.resolved, initial: { kind: 'rest' } } };
    }
    const inputs = await loadInputs(forInputs, reader);
    const { model } = buildPrepared(forInputs, inputs);
    const d = derivedNumbers(parsed.resolved, model.grid);
    io.stdout.write(
      checkReport(
        parsed.resolved.name,
        shown,
        d,
        parsed.resolved.outputFields,
        parsed.resolved.days,
        parsed.resolved.outputEveryDays,
        [...inputs.notes, ...notes],
      ),
    );
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

function describe(info: LoadedScenario, shown: string, argv: Args): RunDescription {
  return describeLoadedRun(info, shown, commandLine(argv, shown));
}

async function run(args: Args, text: string, shown: string, reader: InputReader, io: CliIO): Promise<number> {
  const engine = new Engine({ maxFramesPerSecond: 10, strips: { host: nodeStripHost(), threads: 1 } });
  try {
    return await runOn(engine, args, text, shown, reader, io);
  } finally {
    await engine.model?.close(); // the strip workers, if any
  }
}

async function runOn(
  engine: Engine,
  args: Args,
  text: string,
  shown: string,
  reader: InputReader,
  io: CliIO,
): Promise<number> {
  const quiet = args.quiet;
  // Every file the run reads, so that no output can land on one of them.
  const reads: ReadFile[] = [{ path: resolvePath(io.cwd, shown), what: `the scenario file ${shown}` }];
  const loaded = await engine.load(text, shown, {
    sets: args.sets,
    reader: (p, limit) => {
      reads.push({ path: p.startsWith('/') ? p : resolvePath(io.cwd, p), what: `${p}, an input of the scenario` });
      return reader(p, limit);
    },
    allow: args.allow,
    onSpinup: quiet ? undefined : spinupReporter(io),
    threads: args.threads,
  });
  if (!loaded.ok) {
    printError(io, loaded.error.message);
    return exitCodeFor(loaded.error);
  }
  const info = loaded.scenario;
  const outFile = args.out ?? `${basename(shown).replace(/\.json$/i, '')}.nc`;
  // The writer lays the file out at once, so its size is known before anything is written.
  let out: OutputFile | null = null;
  const writer = new RunOutputWriter(describe(info, shown, args), {
    write: (offset, bytes) => out!.write(offset, bytes),
  });
  let restart: OutputFile | null = null;
  // Both outputs are checked and locked before the run starts: a refusal costs nothing.
  try {
    const outPlan = planOutput('--out', outFile, io.cwd, reads);
    const restartPlan =
      args.restartOut !== undefined ? planOutput('--restart-out', args.restartOut, io.cwd, reads, [outPlan]) : null;
    checkSpace(outPlan, writer.bytesFor(info.derived.outputs));
    out = OutputFile.open(outPlan);
    try {
      restart = restartPlan ? OutputFile.open(restartPlan) : null;
      out.create();
    } catch (e) {
      out.discard(false);
      (restart as OutputFile | null)?.discard(false);
      throw e;
    }
  } catch (e) {
    if (e instanceof OutputRefused) {
      printError(io, e.message);
      return 2;
    }
    throw e;
  }
  try {
    return await runInto(engine, args, shown, info, writer, out, restart, io);
  } finally {
    // Whatever ended the run without a commit (an unexpected error included) leaves no lock.
    out.discard(args.keepPartial);
    restart?.discard(false);
  }
}

/** The integrals a finished run must have finite, or it did not finish healthy. */
const MUST_BE_FINITE = ['volume', 'energy', 'kinetic', 'potential', 'minThickness', 'maxSpeed'] as const;

async function runInto(
  engine: Engine,
  args: Args,
  shown: string,
  info: LoadedScenario,
  writer: RunOutputWriter,
  out: OutputFile,
  restart: OutputFile | null,
  io: CliIO,
): Promise<number> {
  const quiet = args.quiet;
  const outFile = out.plan.shown;
  const model = engine.model!;
  const outputs = info.derived.outputs;
  if (!quiet) {
    if (out.takenOver) io.stderr.write(`pycno: note: ${out.takenOver}\n`);
    if (!out.plan.device) {
      io.stderr.write(
        `pycno: writing ${out.tempShown}; it becomes ${outFile} when the run has finished${out.plan.replaces ? `, replacing the ${outFile} there now` : ''}\n`,
      );
    }
  }
  const keepHint = args.keepPartial ? '' : ' (--keep-partial keeps it)';
  const failWrite = (file: OutputFile, e: OutputWriteError, what: string, code: number) => {
    const free = file.freeBytes(); // before the unfinished file goes
    const kept = out.discard(args.keepPartial);
    restart?.discard(false);
    printError(io, writeFailureLine(file, e, what, free, file === out && kept, keepHint));
    if (file !== out && !out.plan.device)
      io.stderr.write(
        `pycno: ${kept ? `the run's output is kept as ${out.tempShown}` : `the run's output was not kept${keepHint}`}; ${out.targetState()}\n`,
      );
    return code;
  };
  /** What a failed or stopped run leaves, in one line. */
  const leftLine = (kept: boolean, records: number, done: string) => {
    const n = records === 1 ? 'the 1 record' : `the ${records} records`;
    if (out.plan.device) return `${n} ${done} went to ${outFile}`;
    if (kept) return `${n} ${done} ${records === 1 ? 'is' : 'are'} in ${out.tempShown}; ${out.targetState()}`;
    return `${n} ${done} ${records === 1 ? 'was' : 'were'} not kept (--keep-partial keeps ${records === 1 ? 'it' : 'them'}); ${out.targetState()}`;
  };

  try {
    await writer.begin();
  } catch (e) {
    if (e instanceof OutputWriteError) return failWrite(out, e, 'the header', 2);
    throw e;
  }
  let first: Integrals | null = null;
  let fastest: Integrals | null = null;
  let largestCourant = 0;
  let writeFailure: OutputWriteError | null = null;
  const coupled = model.coupledIndices()
    ? { days: [] as number[], eastSst: [] as number[], warmWater: [] as number[] }
    : undefined;
  engine.setRecorder(async (r) => {
    first ??= r.integrals;
    const c = coupled ? model.coupledIndices() : null;
    if (coupled && c) {
      coupled.days.push(r.day);
      coupled.eastSst.push(c.eastSst);
      coupled.warmWater.push(c.warmWater);
    }
    if (!fastest || r.integrals.maxSpeed > fastest.maxSpeed) fastest = r.integrals;
    largestCourant = Math.max(largestCourant, r.integrals.courant);
    try {
      await writer.append(r);
    } catch (e) {
      if (e instanceof OutputWriteError) writeFailure = e;
      throw e;
    }
  });
  const cells = info.grid.nx * info.grid.ny;
  const progress = new Progress(io.stderr, info.startDay ?? 0, (info.startDay ?? 0) + info.days, cells, info.dt);
  if (!quiet) engine.onFrame((f) => progress.update(f.day));
  let interrupted = false;
  const removeInterrupt = io.onInterrupt?.(() => {
    interrupted = true;
    engine.pause();
  });
  // Said as the run starts, not after it: a long run on an unresolved grid is worth stopping at once.
  if (info.derived.boundaryLayer.advice && !quiet)
    io.stderr.write(`pycno: warning: ${info.derived.boundaryLayer.advice}\n`);
  const stepsBefore = model.state.steps;
  const t0 = performance.now();
  engine.start();
  const end = await engine.idle();
  const wall = (performance.now() - t0) / 1000;
  removeInterrupt?.();
  if (!quiet) progress.done();
  const steps = model.state.steps - stepsBefore;
  if (writeFailure) return failWrite(out, writeFailure, `record ${writer.records + 1} of ${outputs}`, 1);
  if (end.status === 'failed' && end.error) {
    printError(io, end.error.message);
    const kept = out.discard(args.keepPartial);
    io.stderr.write(`pycno: ${leftLine(kept, writer.records, 'written before the failure')}\n`);
    return exitCodeFor(end.error);
  }
  if (interrupted || end.status !== 'finished') {
    // Stopped on purpose: like a kill, the days done stay in the temporary file.
    const kept = out.discard(true);
    io.stderr.write(`pycno: interrupted on day ${model.day.toFixed(2)}; ${leftLine(kept, writer.records, 'done')}\n`);
    return 130;
  }
  // The engine checked the state at every record; this is the last word before "done".
  const last = model.integrals();
  let unhealthy: string | null = null;
  try {
    model.checkHealth();
  } catch (e) {
    if (!(e instanceof BlowUpError)) throw e;
    unhealthy = e.message;
  }
  const bad = MUST_BE_FINITE.find((k) => !Number.isFinite(last[k]));
  unhealthy ??= bad
    ? `the run ended on day ${model.day.toFixed(2)} with a state that is not finite (${bad} = ${last[bad]}); shorten the time step or weaken the wind`
    : null;
  if (unhealthy) {
    printError(io, unhealthy);
    const kept = out.discard(args.keepPartial);
    io.stderr.write(`pycno: ${leftLine(kept, writer.records, 'written')}\n`);
    return 1;
  }
  try {
    await writer.close();
    out.sync();
  } catch (e) {
    if (e instanceof OutputWriteError) return failWrite(out, e, 'the end of the file', 1);
    throw e;
  }
  if (restart) {
    const bytes = await writeRestart(model, { scenarioJson: info.scenarioJson, command: commandLine(args, shown) });
    restart.plan.needBytes = bytes.length;
    try {
      restart.create();
      restart.write(0, bytes);
      restart.sync();
    } catch (e) {
      if (e instanceof OutputWriteError) return failWrite(restart, e, 'the restart file', 1);
      if (e instanceof OutputRefused) {
        printError(io, e.message);
        out.discard(args.keepPartial);
        return 2;
      }
      throw e;
    }
  }
  // Both files are complete and on disk: put them in place, the run output first.
  try {
    out.commit();
  } catch (e) {
    if (e instanceof OutputWriteError) return failWrite(out, e, 'the end of the file', 1);
    throw e;
  }
  if (restart) {
    try {
      restart.commit();
    } catch (e) {
      if (!(e instanceof OutputWriteError)) throw e;
      const free = restart.freeBytes();
      restart.discard(false);
      printError(
        io,
        `${writeFailureLine(restart, e, 'the restart file', free, false)}; the run's output ${outFile} is complete`,
      );
      return 1;
    }
  }
  for (const n of info.notes ?? []) io.stdout.write(`input           ${n}\n`);
  io.stdout.write(
    runSummary({
      wallSeconds: wall,
      steps,
      cells,
      first,
      last,
      fastest,
      largestCourant,
      records: writer.records,
      outFile,
      restartFile: args.restartOut,
      coupled,
    }),
  );
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
