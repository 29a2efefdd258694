// The batch folder of a cluster sweep (`pycno sweep --batch DIR`) and what lives in it:
//
//   DIR/batch.json     the plan the array tasks and --gather read (this file's BatchPlan)
//   DIR/members.tsv    the member table for people and scripts: id, varied values, run file
//   DIR/scenario.json  the exact scenario every member runs (common --set values in)
//   DIR/sweep.sbatch   the Slurm job-array script
//   DIR/runs/          the members' run files (run-001.nc, ...)
//   DIR/status/        one small JSON file per member that has run: state, exit code, message
//   DIR/logs/          the array tasks' Slurm output
//
// Paths inside batch.json and members.tsv are relative to DIR, so the folder can be moved.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { CliIO } from './io.ts';

export const BATCH_FORMAT = 'pycno-batch/1';
export const PLAN_FILE = 'batch.json';
export const MEMBER_TABLE = 'members.tsv';
export const SCENARIO_FILE = 'scenario.json';
export const SCRIPT_FILE = 'sweep.sbatch';
export const RUNS_DIR = 'runs';
export const STATUS_DIR = 'status';
export const LOGS_DIR = 'logs';
export const SUMMARY_FILE = 'summary.nc';

export interface BatchMember {
  /** 1, 2, ...: the row of members.tsv. */
  id: number;
  /** The varied values of this member, path -> value as given to --vary. */
  values: Record<string, string>;
  /** Its run file, relative to the folder. */
  file: string;
  /** The --set arguments of its `pycno run` (the varied values). */
  sets: string[];
  /** scenarioHash() of the scenario it runs (model/scenario/canonical-hash.ts). */
  scenarioHash: string;
  /** Output records a complete run file has, and the model day of its last (null: not known
   *  before the run, as for a start from a restart file, whose clock goes on from the file's). */
  records: number | null;
  lastDay: number | null;
}

export interface BatchPlan {
  format: typeof BATCH_FORMAT;
  /** The scenario name, for titles. */
  name: string;
  /** The scenario file as the user gave it when the folder was made, and the common --set values. */
  source: string;
  sets: string[];
  vary: Array<{ path: string; values: string[] }>;
  /** Canonical hash of scenario.json. */
  scenarioHash: string;
  /** Members per array task; array task k (1-based) runs members (k - 1) * perTask + 1 ... */
  perTask: number;
  tasks: number;
  /** Threads of each member run (pycno run --threads). */
  threads: number;
  members: BatchMember[];
  /** The command that made the folder. */
  command: string;
}

/** A batch folder, plan or member that cannot be used: one message, exit 2. */
export class BatchRefused extends Error {}

/** A command line of the cluster sweep that cannot be followed (exit 2, with the usage). */
export class BatchUsage extends Error {}

/** The launcher the array tasks run (and the member runs under them). */
export const PYCNO_BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));

export function printLines(io: Pick<CliIO, 'stderr'>, message: string): void {
  for (const line of message.split('\n')) io.stderr.write(`pycno sweep: ${line}\n`);
}

/** The members of array task `task` (1-based). */
export function taskMembers(plan: BatchPlan, task: number): BatchMember[] {
  return plan.members.slice((task - 1) * plan.perTask, task * plan.perTask);
}

/** The array task that runs a member. */
export function taskOf(plan: BatchPlan, member: BatchMember): number {
  return Math.floor((member.id - 1) / plan.perTask) + 1;
}

export function statusFile(member: BatchMember): string {
  return join(STATUS_DIR, `member-${String(member.id).padStart(3, '0')}.json`);
}

const isStringList = (x: unknown): x is string[] => Array.isArray(x) && x.every((s) => typeof s === 'string');

/** Read and check DIR/batch.json; a BatchRefused that says what is wrong otherwise. */
export function readPlan(dir: string, shown = dir): BatchPlan {
  const file = join(dir, PLAN_FILE);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new BatchRefused(
      code === 'ENOENT'
        ? `${shown}: not a Pycno batch folder (no ${PLAN_FILE}; make one with pycno sweep ... --batch ${shown})`
        : `${join(shown, PLAN_FILE)}: cannot read it: ${(e as Error).message}`,
    );
  }
  let p: Partial<BatchPlan>;
  try {
    p = JSON.parse(text);
  } catch (e) {
    throw new BatchRefused(`${join(shown, PLAN_FILE)}: damaged: not JSON (${(e as Error).message})`);
  }
  const bad = (what: string) => new BatchRefused(`${join(shown, PLAN_FILE)}: damaged: ${what}`);
  if (p?.format !== BATCH_FORMAT) throw bad(`format is ${JSON.stringify(p?.format)}, expected "${BATCH_FORMAT}"`);
  if (
    typeof p.name !== 'string' ||
    typeof p.source !== 'string' ||
    typeof p.command !== 'string' ||
    typeof p.scenarioHash !== 'string'
  )
    throw bad('name, source, command or scenarioHash is not text');
  if (!isStringList(p.sets)) throw bad('sets is not a list of text');
  if (!Array.isArray(p.vary) || !p.vary.every((v) => typeof v?.path === 'string' && isStringList(v.values)))
    throw bad('vary is not a list of { path, values }');
  for (const k of ['perTask', 'tasks', 'threads'] as const)
    if (!Number.isInteger(p[k]) || (p[k] as number) < 1) throw bad(`${k} is not a whole number >= 1`);
  if (!Array.isArray(p.members) || p.members.length === 0) throw bad('members is not a list of members');
  p.members.forEach((m, k) => {
    const ok =
      m?.id === k + 1 &&
      typeof m.file === 'string' &&
      m.file.startsWith(`${RUNS_DIR}/`) &&
      !m.file.includes('..') &&
      isStringList(m.sets) &&
      typeof m.scenarioHash === 'string' &&
      (m.records === null || Number.isInteger(m.records)) &&
      (m.lastDay === null || typeof m.lastDay === 'number') &&
      typeof m.values === 'object' &&
      m.values !== null &&
      Object.values(m.values).every((v) => typeof v === 'string');
    if (!ok)
      throw bad(
        `member ${k + 1} is not { id: ${k + 1}, values, file: "${RUNS_DIR}/...", sets, scenarioHash, records, lastDay }`,
      );
  });
  if (p.tasks !== Math.ceil(p.members.length / p.perTask!))
    throw bad(`tasks (${p.tasks}) does not match ${p.members.length} members at ${p.perTask} per task`);
  return p as BatchPlan;
}

/** A member's status file, as the array task writes it. */
export interface MemberStatus {
  member: number;
  state: 'running' | 'complete' | 'failed';
  /** Already complete when the task came to it (nothing was run). */
  skipped?: boolean;
  exit: number | null;
  signal?: string | null;
  message: string | null;
  scenarioHash: string;
  host: string;
  job: string | null;
  task: number | null;
  started: string;
  ended: string | null;
  seconds: number | null;
}

export function readStatus(dir: string, member: BatchMember): MemberStatus | null {
  try {
    const s = JSON.parse(readFileSync(join(dir, statusFile(member)), 'utf8')) as MemberStatus;
    return s && typeof s.state === 'string' ? s : null;
  } catch {
    return null;
  }
}

/** Quote one argument for a POSIX shell, only where needed. */
export function shellQuote(s: string): string {
  return /^[\w./=,:+@%-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`;
}
