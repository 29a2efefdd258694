// pycno sweep on a Slurm cluster. Three modes of `pycno sweep`:
//
//   pycno sweep SCENARIO.json --vary ... --batch DIR [--submit] [resources]
//       writes the batch folder (batch-folder.ts): the member table, the exact scenario, the plan
//       and an sbatch job-array script with time, memory and CPUs estimated (batch-estimate.ts);
//       --submit hands the script to sbatch and prints the job id.
//   pycno sweep --task DIR N        one array task: runs its members (sweep-task.ts)
//   pycno sweep --gather DIR        checks every member and writes the summary (sweep-gather.ts)
//
// The one-machine sweep (sweep.ts) is unchanged; these options only route here.

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, isAbsolute, join, resolve as resolvePath } from 'node:path';
import { InputError } from '../../model/errors.ts';
import { scenarioHash } from '../../model/scenario/canonical-hash.ts';
import { derivedNumbers } from '../../model/scenario/derived.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { ScenarioError } from '../../model/scenario/errors.ts';
import {
  BATCH_FORMAT,
  BatchRefused,
  BatchUsage,
  printLines,
  PYCNO_BIN,
  LOGS_DIR,
  MEMBER_TABLE,
  PLAN_FILE,
  readPlan,
  RUNS_DIR,
  SCENARIO_FILE,
  SCRIPT_FILE,
  shellQuote,
  STATUS_DIR,
  type BatchMember,
  type BatchPlan,
} from './batch-folder.ts';
import { estimateTask, type Estimate } from './batch-estimate.ts';
import type { CliIO } from './io.ts';
import { OutputRefused, OutputWriteError, planOutput, writeWhole } from './output-file.ts';
import { gather } from './sweep-gather.ts';
import { runTask } from './sweep-task.ts';
import { parseSweep, SWEEP_HELP, SWEEP_USAGE, sweepRuns } from './sweep.ts';

export const BATCH_USAGE = `pycno sweep SCENARIO.json --vary path=v1,v2,... [--vary ...] --batch DIR [--submit] [--per-task N] [--threads N] [--task-time T] [--task-memory M] [--task-cpus N] [--at-once N] [--sbatch-option OPT ...]
  pycno sweep --task DIR N
  pycno sweep --gather DIR [--out SUMMARY.nc] [--spread-fields f1,f2,...]
`;

export const BATCH_HELP = `  --batch DIR            (sweep) instead of running here, write DIR for a Slurm job array: members.tsv
                         (one line per member: id, varied values, run file), scenario.json (the exact
                         scenario), batch.json (the plan) and sweep.sbatch (the array script, with
                         --time, --mem and --cpus-per-task estimated; its comment shows the sums)
  --submit               (sweep --batch) also run sbatch on the script and print the job id
  --per-task N           (sweep --batch) members per array task (default: enough for about 30 minutes)
  --threads N            (sweep --batch) threads of each member run (default: from the grid size)
  --task-time T          (sweep --batch) time limit of a task instead of the estimate: minutes, or
                         [D-]H:MM:SS
  --task-memory M        (sweep --batch) memory of a task instead of the estimate, e.g. 800M, 4G
  --task-cpus N          (sweep --batch) CPUs of a task instead of the threads of a member
  --at-once N            (sweep --batch) at most N array tasks running at the same time
  --sbatch-option OPT    (sweep --batch) one more #SBATCH line, e.g. --sbatch-option --partition=short
  sweep --task DIR N     run array task N of DIR (what sweep.sbatch does): each member not yet complete
                         is run; one that fails is recorded in DIR/status/ and the others go on
  sweep --gather DIR     check every member of DIR (complete, same scenario but the varied values), list
                         missing and failed ones with the command that reruns them, and write the
                         summary DIR/summary.nc (--out FILE.nc for another name): per member the varied
                         values and results; with --vary seed=..., the mean and standard deviation over
                         the seeds (--spread-fields chooses the fields; default all recorded)
`;

/** The options that make `pycno sweep` a cluster sweep. */
export function isBatchSweep(argv: readonly string[]): boolean {
  return argv.some(
    (a) =>
      a === '--batch' ||
      a === '--task' ||
      a === '--gather' ||
      a.startsWith('--batch=') ||
      a.startsWith('--gather=') ||
      a === '--help' ||
      a === '-h',
  );
}

export async function batchSweep(argv: readonly string[], io: CliIO): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    io.stdout.write(`usage: ${SWEEP_USAGE}  ${BATCH_USAGE}\n${SWEEP_HELP}${BATCH_HELP}`);
    return 0;
  }
  try {
    if (argv.includes('--task')) return await runTask(argv, io);
    if (argv.some((a) => a === '--gather' || a.startsWith('--gather='))) return await gather(argv, io);
    return await makeBatch(argv, io);
  } catch (e) {
    if (e instanceof BatchUsage) {
      printLines(io, e.message);
      io.stderr.write(`usage: ${BATCH_USAGE}`);
      return 2;
    }
    if (e instanceof BatchRefused || e instanceof ScenarioError || e instanceof InputError) {
      printLines(io, e.message);
      return 2;
    }
    throw e;
  }
}

// --- making the folder ---------------------------------------------------------------------------

interface BatchOptions {
  dir: string;
  submit: boolean;
  perTask: number | null;
  threads: number | null;
  time: string | null;
  memory: string | null;
  cpus: number | null;
  atOnce: number | null;
  sbatch: string[];
}

function wholeNumber(option: string, v: string, max = 1_000_000): number {
  const n = Number(v);
  if (v.trim() === '' || !Number.isInteger(n) || n < 1 || n > max)
    throw new BatchUsage(`${option} needs a whole number from 1 to ${max} (got '${v}')`);
  return n;
}

/** A Slurm time limit: minutes, or [D-]H:MM:SS. */
export function parseTaskTime(v: string): string {
  if (/^\d+$/.test(v) && Number(v) >= 1) return v;
  if (/^(\d+-)?\d+:[0-5]\d:[0-5]\d$/.test(v)) return v;
  throw new BatchUsage(`--task-time needs minutes (e.g. 90) or [D-]H:MM:SS (e.g. 1:30:00, 2-00:00:00) (got '${v}')`);
}

/** A Slurm memory size: a number with an optional unit K, M, G or T (M when none). */
export function parseTaskMemory(v: string): string {
  if (/^[1-9]\d*[KMGT]?$/i.test(v)) return v.toUpperCase();
  throw new BatchUsage(`--task-memory needs a size such as 800M or 4G (units K, M, G, T; got '${v}')`);
}

/** Take the batch options out of argv; the rest is an ordinary sweep's. */
function splitOptions(argv: readonly string[]): { options: BatchOptions; rest: string[] } {
  const o: BatchOptions = {
    dir: '',
    submit: false,
    perTask: null,
    threads: null,
    time: null,
    memory: null,
    cpus: null,
    atOnce: null,
    sbatch: [],
  };
  const rest: string[] = [];
  for (let k = 0; k < argv.length; k++) {
    let a = argv[k];
    let inline: string | undefined;
    if (a.startsWith('--') && a.includes('=') && !a.startsWith('--vary') && !a.startsWith('--set')) {
      inline = a.slice(a.indexOf('=') + 1);
      a = a.slice(0, a.indexOf('='));
    }
    const value = () => {
      if (inline !== undefined) return inline;
      const v = argv[++k];
      if (v === undefined) throw new BatchUsage(`${a} needs a value`);
      return v;
    };
    switch (a) {
      case '--batch':
        o.dir = value();
        break;
      case '--submit':
        o.submit = true;
        break;
      case '--per-task':
        o.perTask = wholeNumber(a, value());
        break;
      case '--threads':
        o.threads = wholeNumber(a, value(), 64);
        break;
      case '--task-time':
        o.time = parseTaskTime(value());
        break;
      case '--task-memory':
        o.memory = parseTaskMemory(value());
        break;
      case '--task-cpus':
        o.cpus = wholeNumber(a, value(), 1024);
        break;
      case '--at-once':
        o.atOnce = wholeNumber(a, value());
        break;
      case '--sbatch-option': {
        const v = value();
        if (!/^--?[A-Za-z][\w-]*(=[^\n\r]*)?$/.test(v))
          throw new BatchUsage(`--sbatch-option needs one sbatch option such as --partition=short (got '${v}')`);
        o.sbatch.push(v);
        break;
      }
      case '--out':
        throw new BatchUsage(`--out does not go with --batch: the runs go into ${join(o.dir || 'DIR', RUNS_DIR)}`);
      case '--jobs':
      case '--list':
        throw new BatchUsage(`${a} does not go with --batch (it is for the sweep on this machine)`);
      default:
        rest.push(argv[k]);
    }
  }
  if (!o.dir) throw new BatchUsage('--batch needs a folder');
  if (o.cpus !== null && o.threads !== null && o.cpus < o.threads)
    throw new BatchUsage(`--task-cpus ${o.cpus} is fewer than the --threads ${o.threads} of each member run`);
  return { options: o, rest };
}

/** Relative input paths of a scenario (wind files, restart, spin-up) made absolute: the tasks run in DIR. */
function absoluteInputs(scenarioJson: string, scenarioDir: string): { json: string; changed: string[] } {
  const s = JSON.parse(scenarioJson) as {
    initial?: { kind?: string; path?: string; scenario?: string };
    wind?: { parts?: Array<{ source?: { kind?: string; path?: string } }> };
  };
  const changed: string[] = [];
  const fix = (p: string, where: string) => {
    if (isAbsolute(p)) return p;
    const abs = resolvePath(scenarioDir, p);
    changed.push(`${where}: ${p} -> ${abs}`);
    return abs;
  };
  if (s.initial?.kind === 'restart' && typeof s.initial.path === 'string')
    s.initial.path = fix(s.initial.path, 'initial.path');
  if (s.initial?.kind === 'spinup' && typeof s.initial.scenario === 'string')
    s.initial.scenario = fix(s.initial.scenario, 'initial.scenario');
  (s.wind?.parts ?? []).forEach((part, k) => {
    if (part.source?.kind === 'file' && typeof part.source.path === 'string')
      part.source.path = fix(part.source.path, `wind.parts[${k}].source.path`);
  });
  return { json: changed.length ? JSON.stringify(s, null, 2) : scenarioJson, changed };
}

interface MemberPlan {
  member: BatchMember;
  estimate: Estimate;
}

function tsvCell(s: string): string {
  return s.replace(/[\t\n\r]/g, ' ');
}

export function memberTable(plan: BatchPlan): string {
  const paths = plan.vary.map((v) => v.path);
  const head = ['member', ...paths, 'run_file', 'array_task', 'scenario_sha256'];
  const rows = plan.members.map((m) => [
    String(m.id),
    ...paths.map((p) => m.values[p] ?? ''),
    m.file,
    String(Math.floor((m.id - 1) / plan.perTask) + 1),
    m.scenarioHash,
  ]);
  return [head, ...rows].map((r) => r.map(tsvCell).join('\t')).join('\n') + '\n';
}

export function sbatchScript(
  plan: BatchPlan,
  absDir: string,
  e: { time: string; mem: string; cpus: number; explain: string[]; given: string[] },
  options: { atOnce: number | null; sbatch: string[] },
): string {
  const array = `1-${plan.tasks}${options.atOnce ? `%${options.atOnce}` : ''}`;
  const jobName = `pycno-${
    plan.name
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '')
      .slice(0, 40) || 'sweep'
  }`;
  const lines = [
    '#!/bin/bash',
    `# Pycno sweep "${plan.name}": ${plan.members.length} members in ${plan.tasks} array task${plan.tasks > 1 ? 's' : ''} of up to ${plan.perTask} member${plan.perTask > 1 ? 's' : ''}.`,
    `# Made by: ${plan.command}`,
    '# Each array task runs its members one after another with pycno run; a member whose run file is',
    '# already complete (same scenario) is skipped, so submitting this script again finishes only what',
    '# is missing (sbatch --array=3,7 sweep.sbatch reruns just those tasks). Then: pycno sweep --gather DIR.',
    '#',
    '# Resources, estimated by pycno (worker/cli/batch-estimate.ts; docs/ensembles.md):',
    ...e.explain.map((l) => `#   ${l}`),
    ...e.given.map((l) => `#   ${l}`),
    '# Change them with pycno sweep ... --task-time / --task-memory / --task-cpus, or edit the lines below.',
    `#SBATCH --job-name=${jobName}`,
    `#SBATCH --array=${array}`,
    '#SBATCH --ntasks=1',
    `#SBATCH --cpus-per-task=${e.cpus}`,
    `#SBATCH --mem=${e.mem}`,
    `#SBATCH --time=${e.time}`,
    `#SBATCH --chdir=${absDir}`,
    `#SBATCH --output=${join(absDir, LOGS_DIR, 'task-%a-job-%A.out')}`,
    ...options.sbatch.map((o) => `#SBATCH ${o}`),
    'set -eu',
    '# The Node and the Pycno that made this folder; set PYCNO_NODE / PYCNO_BIN where the nodes differ.',
    `PYCNO_NODE="\${PYCNO_NODE:-${process.execPath}}"`,
    `PYCNO_BIN="\${PYCNO_BIN:-${PYCNO_BIN}}"`,
    `exec "$PYCNO_NODE" "$PYCNO_BIN" sweep --task ${shellQuote(absDir)} "\${SLURM_ARRAY_TASK_ID:?submit this script with sbatch: it is a job array}"`,
    '',
  ];
  return lines.join('\n');
}

/** A folder that may receive the batch: new, empty, or holding this very plan (regenerated). */
function checkFolder(absDir: string, shown: string, plan: BatchPlan): 'new' | 'same' {
  if (!existsSync(absDir)) return 'new';
  if (!statSync(absDir).isDirectory()) throw new BatchUsage(`--batch ${shown}: it is not a folder`);
  if (!existsSync(join(absDir, PLAN_FILE))) {
    if (readdirSync(absDir).length === 0) return 'new';
    throw new BatchUsage(
      `--batch ${shown}: the folder is not empty and holds no Pycno batch (${PLAN_FILE}); give a new or empty folder`,
    );
  }
  const old = readPlan(absDir, shown);
  const same =
    old.members.length === plan.members.length &&
    old.members.every((m, k) => m.scenarioHash === plan.members[k].scenarioHash && m.file === plan.members[k].file);
  if (!same) {
    throw new BatchUsage(
      `--batch ${shown}: the folder holds another sweep (${old.members.length} members of "${old.name}", made by: ${old.command}); give a new folder, or remove this one if its runs are not needed`,
    );
  }
  return 'same';
}

async function writeText(
  absDir: string,
  name: string,
  text: string,
  reads: Array<{ path: string; what: string }>,
): Promise<void> {
  const bytes = new TextEncoder().encode(text);
  await writeWhole(planOutput('--batch', join(absDir, name), absDir, reads), (sink) => sink.write(0, bytes));
}

async function makeBatch(argv: readonly string[], io: CliIO): Promise<number> {
  const { options, rest } = splitOptions(argv);
  let sweepPlan: ReturnType<typeof parseSweep>;
  try {
    sweepPlan = parseSweep([...rest, '--out', RUNS_DIR]);
  } catch (e) {
    throw new BatchUsage((e as Error).message);
  }
  const absDir = resolvePath(io.cwd, options.dir);
  // sbatch reads an #SBATCH line word by word and takes % in --output as a pattern.
  if (/[\s%'"\\]/.test(absDir))
    throw new BatchUsage(
      `--batch ${options.dir}: the folder's path (${absDir}) must have no spaces, quotes, backslashes or %: Slurm's #SBATCH lines cannot hold them`,
    );
  const scenarioPath = resolvePath(io.cwd, sweepPlan.scenario);
  let text: string;
  try {
    text = readFileSync(scenarioPath, 'utf8');
  } catch (e) {
    throw new BatchUsage(`${sweepPlan.scenario}: cannot read the scenario file: ${(e as Error).message}`);
  }
  const common = parseScenario(text, sweepPlan.scenario, sweepPlan.sets);
  const { json: batchScenario, changed } = absoluteInputs(common.scenarioJson, dirname(scenarioPath));
  const batchScenarioText = batchScenario.endsWith('\n') ? batchScenario : `${batchScenario}\n`;
  const shownScenario = join(options.dir, SCENARIO_FILE);

  // Every member is parsed and validated now: a bad value is refused before anything is written.
  const members: MemberPlan[] = sweepRuns(sweepPlan).map((r, n) => {
    const sets = Object.entries(r.values).map(([p, v]) => `${p}=${v}`);
    let parsed: ReturnType<typeof parseScenario>;
    try {
      parsed = parseScenario(batchScenarioText, shownScenario, sets);
    } catch (e) {
      if (e instanceof ScenarioError || e instanceof InputError) {
        throw new BatchRefused(
          `member ${n + 1} (${sets.join(', ')}) is not a valid scenario; nothing was written:\n${e.message}`,
        );
      }
      throw e;
    }
    const d = derivedNumbers(parsed.resolved);
    const known = parsed.resolved.initial.kind !== 'restart';
    const member: BatchMember = {
      id: n + 1,
      values: r.values,
      file: r.file,
      sets,
      scenarioHash: scenarioHash(parsed.scenarioJson),
      records: known ? d.outputs : null,
      lastDay: known ? (d.steps * d.dt) / 86400 : null,
    };
    const estimate = estimateTask({
      nx: d.nx,
      ny: d.ny,
      steps: d.steps,
      outputs: d.outputs,
      fields: parsed.resolved.outputFields.length,
      memoryBytes: d.memoryBytes,
      mode: parsed.resolved.model.physics.mode,
      perTask: 1,
      threads: options.threads,
    });
    return { member, estimate };
  });

  // The costliest member sets the task's needs (a --vary of the resolution changes the grid).
  const worst = members.reduce((a, b) => (b.estimate.memberSeconds > a.estimate.memberSeconds ? b : a));
  const perTask =
    options.perTask ??
    Math.max(1, Math.min(members.length, Math.floor((30 * 60) / (worst.estimate.memberSeconds * 2))));
  const first = JSON.parse(common.scenarioJson) as { name?: string };
  const plan: BatchPlan = {
    format: BATCH_FORMAT,
    name: typeof first.name === 'string' ? first.name : 'sweep',
    source: sweepPlan.scenario,
    sets: sweepPlan.sets,
    vary: sweepPlan.vary,
    scenarioHash: scenarioHash(batchScenarioText),
    perTask,
    tasks: Math.ceil(members.length / perTask),
    threads: worst.estimate.threads,
    members: members.map((m) => m.member),
    command: ['pycno', 'sweep', ...argv].map(shellQuote).join(' '),
  };
  const worstParsed = parseScenario(batchScenarioText, shownScenario, worst.member.sets);
  const wd = derivedNumbers(worstParsed.resolved);
  const est = estimateTask({
    nx: wd.nx,
    ny: wd.ny,
    steps: wd.steps,
    outputs: wd.outputs,
    fields: worstParsed.resolved.outputFields.length,
    memoryBytes: wd.memoryBytes,
    mode: worstParsed.resolved.model.physics.mode,
    perTask,
    threads: options.threads,
  });
  const memMiB = Math.max(est.memMiB, ...members.map((m) => m.estimate.memMiB));
  const given: string[] = [];
  if (members.length > 1 && worst !== members[0])
    given.push(`(the sums are for member ${worst.member.id}, the costliest)`);
  if (options.time) given.push(`time given with --task-time: ${options.time}`);
  if (options.memory) given.push(`memory given with --task-memory: ${options.memory}`);
  if (options.cpus) given.push(`cpus given with --task-cpus: ${options.cpus}`);
  const resources = {
    time: options.time ?? est.time,
    mem: options.memory ?? `${memMiB}M`,
    cpus: options.cpus ?? est.cpus,
    explain: est.explain,
    given,
  };

  const state = checkFolder(absDir, options.dir, plan);
  for (const sub of ['', RUNS_DIR, STATUS_DIR, LOGS_DIR]) mkdirSync(join(absDir, sub), { recursive: true });
  const reads = [{ path: scenarioPath, what: `the scenario file ${sweepPlan.scenario}` }];
  try {
    await writeText(absDir, SCENARIO_FILE, batchScenarioText, reads);
    await writeText(absDir, MEMBER_TABLE, memberTable(plan), reads);
    await writeText(absDir, SCRIPT_FILE, sbatchScript(plan, absDir, resources, options), reads);
    // The plan last: a folder with batch.json is complete.
    await writeText(absDir, PLAN_FILE, JSON.stringify(plan, null, 2) + '\n', reads);
  } catch (e) {
    if (e instanceof OutputRefused || e instanceof OutputWriteError) {
      printLines(io, `cannot write the batch folder: ${e.message}`);
      return 1;
    }
    throw e;
  }
  const script = join(options.dir, SCRIPT_FILE);
  const out = [
    `batch         ${options.dir}${state === 'same' ? ' (the same sweep: script and tables written anew, runs kept)' : ''}`,
    `members       ${plan.members.length} (${MEMBER_TABLE}), ${plan.tasks} array task${plan.tasks > 1 ? 's' : ''} of up to ${perTask}`,
    `scenario      ${SCENARIO_FILE} (canonical SHA-256 ${plan.scenarioHash.slice(0, 12)}...)`,
    ...changed.map((c) => `input path    ${c}`),
    `per task      --time=${resources.time} --mem=${resources.mem} --cpus-per-task=${resources.cpus}; member runs on ${plan.threads} thread${plan.threads > 1 ? 's' : ''}`,
    `script        ${script}`,
  ];
  io.stdout.write(out.join('\n') + '\n');
  if (!options.submit) {
    io.stdout.write(`next          sbatch ${script}   (then: pycno sweep --gather ${options.dir})\n`);
    return 0;
  }
  return submit(io, join(absDir, SCRIPT_FILE), options.dir);
}

/** sbatch the script; prints the job id. */
export function submit(io: CliIO, absScript: string, shownDir: string, extra: string[] = []): number {
  const r = spawnSync('sbatch', ['--parsable', ...extra, absScript], { encoding: 'utf8', timeout: 120_000 });
  if (r.error) {
    const why =
      (r.error as NodeJS.ErrnoException).code === 'ENOENT'
        ? 'sbatch was not found: is this a machine of a Slurm cluster (a login node)?'
        : r.error.message;
    printLines(io, `could not submit: ${why}; the folder is ready, submit it with: sbatch ${absScript}`);
    return 1;
  }
  if (r.status !== 0) {
    printLines(io, `sbatch refused the script (exit ${r.status}): ${(r.stderr || r.stdout).trim()}`);
    return 1;
  }
  const id = r.stdout.trim().split(';')[0];
  io.stdout.write(
    `submitted     job ${id}\nnext          squeue -j ${id}; when it has ended: pycno sweep --gather ${shownDir}\n`,
  );
  return 0;
}
