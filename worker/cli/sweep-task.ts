// `pycno sweep --task DIR N`: array task N of a batch folder (what sweep.sbatch runs). Its members
// run one after another, each as its own `pycno run` process (a member that crashes or is killed
// takes nothing else with it). A member whose run file is already complete is skipped, so a
// resubmitted array finishes only what is missing. Each member's outcome goes into a small status
// file, written whole (output-file.ts): complete, or failed with its exit code and message.
// Exit code: 0 when every member of the task is complete, 1 when one failed, 2 bad input, 143
// when the task was told to stop (SIGTERM: scancel, or the time limit).

import { spawn } from 'node:child_process';
import { hostname } from 'node:os';
import { join, resolve as resolvePath } from 'node:path';
import {
  BatchUsage,
  PYCNO_BIN,
  printLines,
  readPlan,
  SCENARIO_FILE,
  shellQuote,
  statusFile,
  taskMembers,
  type BatchMember,
  type BatchPlan,
  type MemberStatus,
} from './batch-folder.ts';
import { checkMember } from './batch-member.ts';
import type { CliIO } from './io.ts';
import { OutputRefused, OutputWriteError, planOutput, writeWhole } from './output-file.ts';

/** The `pycno run` arguments of a member, run in the batch folder. */
export function memberRunArgs(plan: BatchPlan, m: BatchMember): string[] {
  return [
    'run',
    SCENARIO_FILE,
    '--out',
    m.file,
    ...m.sets.flatMap((s) => ['--set', s]),
    ...(plan.threads > 1 ? ['--threads', String(plan.threads)] : []),
  ];
}

/** The command that reruns one member by hand, from anywhere. */
export function memberRerunCommand(absDir: string, plan: BatchPlan, m: BatchMember): string {
  return `(cd ${shellQuote(absDir)} && pycno ${memberRunArgs(plan, m).map(shellQuote).join(' ')})`;
}

async function writeStatus(dir: string, m: BatchMember, status: MemberStatus): Promise<void> {
  const bytes = new TextEncoder().encode(JSON.stringify(status, null, 2) + '\n');
  try {
    await writeWhole(planOutput('status', join(dir, statusFile(m)), dir), (sink) => sink.write(0, bytes));
  } catch (e) {
    // A status that cannot be written must not stop the members: the run file is what counts.
    if (!(e instanceof OutputRefused || e instanceof OutputWriteError)) throw e;
  }
}

/** The error lines of a failed run's stderr (not its progress). */
export function errorMessage(stderr: string): string {
  const lines = stderr
    .split('\n')
    .map((l) => l.trimEnd())
    .filter((l) => l.startsWith('pycno: ') && !/^pycno: \d+%/.test(l) && !/^pycno: (writing|note:|warning:)/.test(l))
    .map((l) => l.slice('pycno: '.length));
  const text = lines.length ? lines.join('\n') : stderr.trim().split('\n').slice(-5).join('\n');
  return text.length > 4000 ? `${text.slice(0, 3997)}...` : text;
}

interface ChildEnd {
  code: number | null;
  signal: NodeJS.Signals | null;
  stderr: string;
}

function runMember(
  dir: string,
  args: string[],
  io: CliIO,
  onChild: (kill: (s: NodeJS.Signals) => void) => void,
): Promise<ChildEnd> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [PYCNO_BIN, ...args], { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] });
    onChild((s) => child.kill(s));
    let stderr = '';
    child.stdout.on('data', (b: Buffer) => io.stdout.write(b.toString()));
    child.stderr.on('data', (b: Buffer) => {
      const s = b.toString();
      io.stderr.write(s); // the task's log keeps the run's progress and messages
      stderr = (stderr + s).slice(-64_000);
    });
    child.on('error', (e) =>
      resolve({ code: null, signal: null, stderr: `could not start ${process.execPath}: ${e.message}` }),
    );
    child.on('close', (code, signal) => resolve({ code, signal, stderr }));
  });
}

export async function runTask(argv: readonly string[], io: CliIO): Promise<number> {
  const k = argv.indexOf('--task');
  const rest = argv.filter((_, i) => i !== k && i !== k + 1 && i !== k + 2);
  const dirArg = argv[k + 1];
  const taskArg = argv[k + 2];
  if (dirArg === undefined || taskArg === undefined)
    throw new BatchUsage('--task needs the batch folder and the array task number, e.g. --task DIR 3');
  if (rest.length > 0) throw new BatchUsage(`--task takes no other arguments (got ${rest.join(' ')})`);
  const dir = resolvePath(io.cwd, dirArg);
  const plan = readPlan(dir, dirArg);
  const task = Number(taskArg);
  if (!Number.isInteger(task) || task < 1 || task > plan.tasks)
    throw new BatchUsage(`--task ${dirArg} ${taskArg}: the array task must be a whole number from 1 to ${plan.tasks}`);
  const members = taskMembers(plan, task);
  const job = process.env.SLURM_ARRAY_JOB_ID ?? process.env.SLURM_JOB_ID ?? null;
  io.stdout.write(
    `pycno sweep: task ${task} of ${plan.tasks} in ${dirArg}: members ${members[0].id}-${members[members.length - 1].id}${job ? ` (job ${job})` : ''} on ${hostname()}\n`,
  );

  let stopping = null as NodeJS.Signals | null;
  let killChild = null as ((s: NodeJS.Signals) => void) | null;
  const onSignal = (s: NodeJS.Signals) => {
    stopping = s;
    killChild?.(s);
  };
  const onTerm = () => onSignal('SIGTERM');
  const onInt = () => onSignal('SIGINT');
  process.on('SIGTERM', onTerm);
  process.on('SIGINT', onInt);
  let failed = 0;
  try {
    for (const m of members) {
      if (stopping) break;
      const started = new Date();
      const base = {
        member: m.id,
        scenarioHash: m.scenarioHash,
        host: hostname(),
        job,
        task,
        started: started.toISOString(),
      };
      if (checkMember(dir, m).ok) {
        io.stdout.write(`pycno sweep: member ${m.id}: ${m.file} is already complete; skipped\n`);
        await writeStatus(dir, m, {
          ...base,
          state: 'complete',
          skipped: true,
          exit: 0,
          message: null,
          ended: new Date().toISOString(),
          seconds: 0,
        });
        continue;
      }
      io.stdout.write(`pycno sweep: member ${m.id}: pycno ${memberRunArgs(plan, m).map(shellQuote).join(' ')}\n`);
      await writeStatus(dir, m, { ...base, state: 'running', exit: null, message: null, ended: null, seconds: null });
      const end = await runMember(dir, memberRunArgs(plan, m), io, (kill) => (killChild = kill));
      killChild = null;
      const seconds = (Date.now() - started.getTime()) / 1000;
      // Done only when the file is there and right: the exit code alone is not trusted.
      const check = end.code === 0 ? checkMember(dir, m) : null;
      if (check?.ok) {
        await writeStatus(dir, m, {
          ...base,
          state: 'complete',
          exit: 0,
          message: null,
          ended: new Date().toISOString(),
          seconds,
        });
        io.stdout.write(`pycno sweep: member ${m.id}: complete (${seconds.toFixed(1)} s)\n`);
        continue;
      }
      failed++;
      const signal = end.signal ?? stopping;
      let message =
        end.code === 0 && check && !check.ok
          ? `the run ended with exit 0 but its file is not right: ${check.reason}`
          : errorMessage(end.stderr);
      const why =
        signal === 'SIGTERM'
          ? ' (scancel, or the task reached its --time limit)'
          : signal === 'SIGKILL'
            ? ' (out of memory? the task may need more --task-memory)'
            : '';
      if (signal) message = `stopped by ${signal}${why}${message ? `; ${message}` : ''}`;
      await writeStatus(dir, m, {
        ...base,
        state: 'failed',
        exit: end.code,
        signal,
        message,
        ended: new Date().toISOString(),
        seconds,
      });
      io.stdout.write(
        `pycno sweep: member ${m.id}: failed (${end.code !== null ? `exit ${end.code}` : `signal ${signal}`}): ${message.split('\n')[0]}\n`,
      );
    }
  } finally {
    process.off('SIGTERM', onTerm);
    process.off('SIGINT', onInt);
  }
  if (stopping) {
    printLines(io, `task ${task} stopped by ${stopping}; the members not yet run are left for the next submission`);
    return stopping === 'SIGINT' ? 130 : 143;
  }
  return failed > 0 ? 1 : 0;
}
