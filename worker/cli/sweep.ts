// pycno sweep: every combination of the --vary values, as separate `pycno run` invocations of
// the same code, run in parallel on this machine's cores (worker threads), each writing its own
// NetCDF; then an index of the runs (index.csv and index.json) with the values and the final
// diagnostics. --list prints the equivalent `pycno run` lines instead, for a batch scheduler
// (job arrays, GNU parallel) on more than one machine.

import { mkdirSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join, resolve as resolvePath } from 'node:path';
import { Worker } from 'node:worker_threads';
import type { CliIO } from './io.ts';
import { clipLine } from '../../model/scenario/errors.ts';
import { readJsonNumber } from '../../model/scenario/parse.ts';
import type { RunAllowance } from '../../model/scenario/run-size.ts';
import { OutputRefused, OutputWriteError, planOutput, writeWhole } from './output-file.ts';
import { interruptedIndex, memberProblems, memberStatus, outFolderProblem } from './sweep-checks.ts';

export const SWEEP_USAGE = `pycno sweep SCENARIO.json --vary path=v1,v2,... [--vary ...] --out DIR [--set path=value ...] [--days N] [--jobs N] [--list] [--allow-long-run] [--allow-large-output]
`;
export const SWEEP_HELP = `  sweep                  every combination of the --vary values: one run (DIR/run-NNN.nc) each, in
                         parallel on the local cores (--jobs N, default the number of cores), and
                         DIR/index.csv + DIR/index.json with the values and the final diagnostics;
                         Ctrl-C stops it (exit 130) with the index and each member's status
  --list                 (sweep) print one 'pycno run' line per combination instead, for a job array
                         or GNU parallel; every member is checked first, and none is run or listed
                         when one cannot run
`;

export interface SweepPlan {
  scenario: string;
  outDir: string;
  vary: Array<{ path: string; values: string[] }>;
  sets: string[];
  jobs: number;
  list: boolean;
  /** --allow-long-run, --allow-large-output: passed to every member. */
  allow: RunAllowance;
}

export interface SweepRun {
  file: string;
  values: Record<string, string>;
  argv: string[];
}

class SweepUsage extends Error {}

export function parseSweep(argv: readonly string[]): SweepPlan {
  const plan: SweepPlan = {
    scenario: '',
    outDir: '',
    vary: [],
    sets: [],
    jobs: availableParallelism(),
    list: false,
    allow: {},
  };
  for (let k = 0; k < argv.length; k++) {
    const a = argv[k];
    const next = () => {
      const v = argv[++k];
      if (v === undefined) throw new SweepUsage(`${a} needs a value`);
      return v;
    };
    if (a === '--vary') {
      const spec = next();
      const eq = spec.indexOf('=');
      const values =
        eq > 0
          ? spec
              .slice(eq + 1)
              .split(',')
              .filter((s) => s.length > 0)
          : [];
      if (eq <= 0 || values.length === 0) throw new SweepUsage(`--vary needs path=v1,v2,... (got '${spec}')`);
      const path = spec.slice(0, eq);
      if (plan.vary.some((v) => v.path === path)) throw new SweepUsage(`--vary ${path} is given twice`);
      plan.vary.push({ path, values });
    } else if (a === '--set') plan.sets.push(next());
    else if (a === '--days') plan.sets.push(`time.days=${next()}`);
    else if (a === '--out') plan.outDir = next();
    else if (a === '--allow-long-run') plan.allow.longRun = true;
    else if (a === '--allow-large-output') plan.allow.largeOutput = true;
    else if (a === '--jobs') {
      const n = readJsonNumber(next()) ?? NaN;
      if (!(Number.isInteger(n) && n >= 1)) throw new SweepUsage('--jobs needs a whole number >= 1');
      plan.jobs = n;
    } else if (a === '--list') plan.list = true;
    else if (a.startsWith('--')) throw new SweepUsage(`unknown option ${a}`);
    else if (!plan.scenario) plan.scenario = a;
    else throw new SweepUsage(`more than one scenario file given ('${plan.scenario}', '${a}')`);
  }
  if (!plan.scenario) throw new SweepUsage('no scenario file given');
  if (plan.vary.length === 0) throw new SweepUsage('nothing to vary: give at least one --vary path=v1,v2');
  if (!plan.outDir) throw new SweepUsage('--out DIR is needed (the folder for the runs and the index)');
  return plan;
}

/** The combinations, the first --vary changing slowest; files run-001.nc, run-002.nc, ... */
export function sweepRuns(plan: SweepPlan): SweepRun[] {
  let combos: Array<Record<string, string>> = [{}];
  for (const { path, values } of plan.vary) combos = combos.flatMap((c) => values.map((v) => ({ ...c, [path]: v })));
  const width = Math.max(3, String(combos.length).length);
  return combos.map((values, n) => {
    const file = join(plan.outDir, `run-${String(n + 1).padStart(width, '0')}.nc`);
    const sets = [...plan.sets, ...Object.entries(values).map(([p, v]) => `${p}=${v}`)];
    const allow = [
      ...(plan.allow.longRun ? ['--allow-long-run'] : []),
      ...(plan.allow.largeOutput ? ['--allow-large-output'] : []),
    ];
    return {
      file,
      values,
      argv: ['run', plan.scenario, '--out', file, ...sets.flatMap((s) => ['--set', s]), ...allow],
    };
  });
}

const quote = (s: string) => (/^[\w./=,:+-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);

export async function sweep(argv: readonly string[], io: CliIO): Promise<number> {
  let plan: SweepPlan;
  try {
    plan = parseSweep(argv);
  } catch (e) {
    if (!(e instanceof SweepUsage)) throw e;
    io.stderr.write(`pycno sweep: ${clipLine(e.message)}\nusage: ${SWEEP_USAGE}`);
    return 2;
  }
  const runs = sweepRuns(plan);
  // Nothing is launched (or listed) when a member cannot run: a bad --vary path would fail them all.
  const problems = memberProblems(plan.scenario, io.cwd, runs, plan.allow);
  if (problems.length) {
    for (const line of problems) io.stderr.write(`pycno sweep: ${line}\n`);
    return 2;
  }
  if (plan.list) {
    for (const r of runs) io.stdout.write(`pycno ${r.argv.map(quote).join(' ')}\n`);
    return 0;
  }
  const notFolder = outFolderProblem(plan.outDir, io.cwd);
  try {
    if (!notFolder) mkdirSync(resolvePath(io.cwd, plan.outDir), { recursive: true });
  } catch (e) {
    io.stderr.write(
      `pycno sweep: --out ${plan.outDir}: cannot make the folder: ${(e as NodeJS.ErrnoException).code === 'EACCES' ? 'permission denied' : (e as Error).message}\n`,
    );
    return 2;
  }
  if (notFolder) {
    io.stderr.write(`pycno sweep: ${notFolder}\n`);
    return 2;
  }
  const results = new Array<{ code: number; stdout: string; stderr: string } | undefined>(runs.length);
  let next = 0;
  let done = 0;
  const threads = Math.min(plan.jobs, runs.length);
  io.stderr.write(`pycno sweep: ${runs.length} runs on ${threads} worker thread${threads > 1 ? 's' : ''}\n`);
  // Ctrl-C: no member is started any more, and the running ones stop as pycno run stops (130).
  let interrupted = false;
  const workers: Worker[] = [];
  const removeInterrupt = io.onInterrupt?.(() => {
    interrupted = true;
    for (const w of workers) w.postMessage({ interrupt: true });
  });
  await Promise.all(
    Array.from({ length: threads }, async () => {
      const worker = new Worker(new URL('./sweep-worker.mjs', import.meta.url), { workerData: { cwd: io.cwd } });
      workers.push(worker);
      try {
        while (next < runs.length && !interrupted) {
          const n = next++;
          results[n] = await new Promise((resolve, reject) => {
            worker.once('message', resolve);
            worker.once('error', reject);
            worker.postMessage({ argv: [...runs[n].argv, '--quiet'] });
          });
          done++;
          const r = results[n]!;
          io.stderr.write(
            `  [${done}/${runs.length}] ${runs[n].file} ${r.code === 0 ? 'done' : r.code === 130 ? 'stopped' : `failed (exit ${r.code}): ${r.stderr.trim().split('\n')[0]}`}\n`,
          );
        }
      } finally {
        await worker.terminate();
      }
    }),
  );
  removeInterrupt?.();
  const index = runs.map((r, n) => ({
    file: r.file,
    ...r.values,
    exit: results[n]?.code ?? '',
    ...(interrupted ? { status: memberStatus(results[n]) } : {}),
    ...summaryFields(results[n]?.stdout ?? ''),
  }));
  const columns = [...new Set(index.flatMap((row) => Object.keys(row)))];
  const csv =
    [
      columns.join(','),
      ...index.map((row) => columns.map((c) => csvCell(String((row as Record<string, unknown>)[c] ?? ''))).join(',')),
    ].join('\n') + '\n';
  // The index files as whole files too: a sweep stopped while writing them leaves the old ones.
  const json =
    JSON.stringify({ scenario: plan.scenario, vary: plan.vary, sets: plan.sets, runs: index }, null, 2) + '\n';
  const reads = [{ path: resolvePath(io.cwd, plan.scenario), what: `the scenario file ${plan.scenario}` }];
  try {
    for (const [name, text] of [
      ['index.csv', csv],
      ['index.json', json],
    ]) {
      const bytes = new TextEncoder().encode(text);
      await writeWhole(planOutput('--out', join(plan.outDir, name), io.cwd, reads), (sink) => sink.write(0, bytes));
    }
  } catch (e) {
    if (!(e instanceof OutputRefused || e instanceof OutputWriteError)) throw e;
    io.stderr.write(`pycno sweep: cannot write the index: ${e.message}\n`);
    if (interrupted)
      for (const line of interruptedIndex(runs, results, null)) io.stderr.write(`pycno sweep: ${line}\n`);
    return interrupted ? 130 : 1;
  }
  if (interrupted) {
    for (const line of interruptedIndex(runs, results, join(plan.outDir, 'index.csv')))
      io.stderr.write(`pycno sweep: ${line}\n`);
    return 130;
  }
  io.stdout.write(
    `sweep index   ${join(plan.outDir, 'index.csv')} (${runs.length} runs, ${index.filter((r) => r.exit !== 0).length} failed)\n`,
  );
  return index.every((r) => r.exit === 0) ? 0 : 1;
}

/** The run summary's final diagnostics (lines "name   value unit ..."), as numbers by column. */
function summaryFields(stdout: string): Record<string, number> {
  const keep: Record<string, string> = {
    'final day': 'final_day',
    'volume change': 'volume_change',
    energy: 'energy_J',
    'thinnest layer': 'thinnest_layer_m',
    'fastest flow': 'fastest_flow_m_s',
    'Courant number': 'courant',
  };
  const out: Record<string, number> = {};
  for (const line of stdout.split('\n')) {
    const m = /^\s*(\S.*?)\s{2,}(\S+)/.exec(line);
    if (m && keep[m[1]]) out[keep[m[1]]] = Number(m[2]);
  }
  return out;
}

function csvCell(s: string): string {
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
