// A one-node Slurm cluster on this machine, for the test of the cluster sweep: a munged of its
// own (own key, own socket), a slurmctld and a slurmd for the node "localhost" with 2 CPUs, all
// with their configuration, state, spool and logs in one temporary folder, on free ports. No
// cgroups (proctrack/linuxproc, task/none), no accounting database: job completions go to a text
// file (jobcomp/filetxt) that `sacct -c` reads. Nothing of the machine's own Slurm or munge is
// touched or used, and stop() ends exactly the daemons start() began, by their process ids.
//
// startLocalSlurm() gives { skip } where Slurm cannot run here (not Linux, not root, the Debian
// packages slurm-wlm / munge not installed); where they are installed and it is root, a daemon
// that does not come up is an error with its log, not a skip.

import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const PROGRAMS: Array<[string, string]> = [
  ['/usr/sbin/munged', 'munge'],
  ['/usr/sbin/mungekey', 'munge'],
  ['/usr/sbin/slurmctld', 'slurm-wlm (slurmctld)'],
  ['/usr/sbin/slurmd', 'slurm-wlm (slurmd)'],
  ['/usr/bin/sbatch', 'slurm-wlm (slurm-client)'],
  ['/usr/bin/squeue', 'slurm-wlm (slurm-client)'],
  ['/usr/bin/sacct', 'slurm-wlm (slurm-client)'],
  ['/usr/bin/sinfo', 'slurm-wlm (slurm-client)'],
  ['/usr/bin/scontrol', 'slurm-wlm (slurm-client)'],
];

export interface LocalSlurm {
  dir: string;
  /** The environment for sbatch, squeue, sacct and pycno sweep --submit (SLURM_CONF). */
  env: NodeJS.ProcessEnv;
  /** Run a Slurm client command; throws with its output when it fails. */
  client(program: string, args: string[]): string;
  /** The daemons' logs, for a failure message. */
  logs(): string;
  stop(): Promise<void>;
}

/** Why Slurm cannot run here, or null. */
export function slurmMissing(): string | null {
  if (process.platform !== 'linux') return `Slurm runs on Linux only (this is ${process.platform})`;
  if (typeof process.getuid === 'function' && process.getuid() !== 0)
    return 'starting slurmctld, slurmd and munged for one node needs root (the daemons run as root here)';
  const missing = PROGRAMS.filter(([p]) => !existsSync(p));
  if (missing.length)
    return `${missing.map(([p]) => p).join(', ')} not installed (Debian packages slurm-wlm and munge: apt-get install slurm-wlm munge)`;
  return null;
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.unref();
    s.on('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function exited(child: ChildProcess): boolean {
  return child.exitCode !== null || child.signalCode !== null;
}

async function stopChild(child: ChildProcess): Promise<void> {
  if (exited(child)) return;
  child.kill('SIGTERM');
  for (let k = 0; k < 100 && !exited(child); k++) await sleep(100);
  if (!exited(child)) {
    child.kill('SIGKILL');
    for (let k = 0; k < 50 && !exited(child); k++) await sleep(100);
  }
}

export async function startLocalSlurm(): Promise<LocalSlurm | { skip: string }> {
  const why = slurmMissing();
  if (why) return { skip: why };
  const dir = mkdtempSync(join(tmpdir(), 'pycno-slurm-'));
  // munged wants every directory above its socket searchable by all, and none writable by others.
  chmodSync(dir, 0o755);
  for (const d of ['state', 'spool']) mkdirSync(join(dir, d), { mode: 0o700 });
  const conf = join(dir, 'slurm.conf');
  const socket = join(dir, 'munge.socket');
  const env: NodeJS.ProcessEnv = { ...process.env, SLURM_CONF: conf };
  const children: ChildProcess[] = [];
  const output = new Map<string, string>();
  const start = (name: string, program: string, args: string[], env: NodeJS.ProcessEnv) => {
    const child = spawn(program, args, { env, stdio: ['ignore', 'pipe', 'pipe'] });
    output.set(name, '');
    const keep = (b: Buffer) => output.set(name, (output.get(name)! + b.toString()).slice(-20_000));
    child.stdout!.on('data', keep);
    child.stderr!.on('data', keep);
    child.on('error', (e) => keep(Buffer.from(`could not start: ${e.message}\n`)));
    children.push(child);
    return child;
  };
  const logs = () => {
    const parts = [...output].map(([name, text]) => `--- ${name} ---\n${text.trim()}`);
    for (const f of ['slurmctld.log', 'slurmd.log', 'munged.log'])
      if (existsSync(join(dir, f)))
        parts.push(`--- ${f} ---\n${readFileSync(join(dir, f), 'utf8').trim().split('\n').slice(-40).join('\n')}`);
    return parts.join('\n');
  };
  const stop = async () => {
    // Jobs first (their steps are children of slurmd), then the daemons in reverse order.
    if (existsSync(conf)) spawnSync('/usr/bin/scancel', ['--full', '--user=root'], { env, timeout: 20_000 });
    for (const c of [...children].reverse()) await stopChild(c);
  };
  const client = (program: string, args: string[]) => {
    const r = spawnSync(program, args, { env, encoding: 'utf8', timeout: 60_000 });
    if (r.status !== 0)
      throw new Error(
        `${program} ${args.join(' ')}: exit ${r.status}${r.error ? ` (${r.error.message})` : ''}: ${(r.stderr || r.stdout).trim()}`,
      );
    return r.stdout;
  };
  try {
    const key = spawnSync('/usr/sbin/mungekey', ['--create', `--keyfile=${join(dir, 'munge.key')}`], {
      encoding: 'utf8',
    });
    if (key.status !== 0) throw new Error(`mungekey could not make a key: ${key.stderr}`);
    start(
      'munged',
      '/usr/sbin/munged',
      [
        '-F',
        `--socket=${socket}`,
        `--key-file=${join(dir, 'munge.key')}`,
        `--log-file=${join(dir, 'munged.log')}`,
        `--pid-file=${join(dir, 'munged.pid')}`,
        `--seed-file=${join(dir, 'munged.seed')}`,
      ],
      process.env,
    );
    for (let k = 0; k < 100 && !existsSync(socket); k++) await sleep(100);
    if (!existsSync(socket)) throw new Error('munged did not create its socket within 10 s');

    const [ctldPort, dPort] = [await freePort(), await freePort()];
    writeFileSync(
      conf,
      [
        '# A one-node cluster for the test of pycno sweep --batch (test/support/slurm-cluster.ts).',
        'ClusterName=pycnotest',
        'SlurmctldHost=localhost(127.0.0.1)',
        'SlurmUser=root',
        'SlurmdUser=root',
        `SlurmctldPort=${ctldPort}`,
        `SlurmdPort=${dPort}`,
        'AuthType=auth/munge',
        'CredType=cred/munge',
        `AuthInfo=socket=${socket}`,
        `StateSaveLocation=${join(dir, 'state')}`,
        `SlurmdSpoolDir=${join(dir, 'spool')}`,
        `SlurmctldPidFile=${join(dir, 'slurmctld.pid')}`,
        `SlurmdPidFile=${join(dir, 'slurmd.pid')}`,
        `SlurmctldLogFile=${join(dir, 'slurmctld.log')}`,
        `SlurmdLogFile=${join(dir, 'slurmd.log')}`,
        'ProctrackType=proctrack/linuxproc',
        'TaskPlugin=task/none',
        'JobAcctGatherType=jobacct_gather/none',
        'AccountingStorageType=accounting_storage/none',
        'JobCompType=jobcomp/filetxt',
        `JobCompLoc=${join(dir, 'jobcomp.txt')}`,
        'SelectType=select/cons_tres',
        'SelectTypeParameters=CR_Core',
        'MpiDefault=none',
        'SwitchType=switch/none',
        'SchedulerType=sched/backfill',
        'ReturnToService=2',
        'MinJobAge=3600',
        'NodeName=localhost NodeAddr=127.0.0.1 CPUs=2 RealMemory=4000 State=UNKNOWN',
        'PartitionName=test Nodes=localhost Default=YES MaxTime=INFINITE State=UP',
        '',
      ].join('\n'),
    );
    const ctld = start('slurmctld', '/usr/sbin/slurmctld', ['-D', '-c', '-f', conf], env);
    // The controller answers before the node registers.
    let up = false;
    for (let k = 0; k < 120 && !up && !exited(ctld); k++) {
      await sleep(250);
      up =
        spawnSync('/usr/bin/scontrol', ['ping'], { env, encoding: 'utf8', timeout: 10_000 }).stdout?.includes('UP') ??
        false;
    }
    if (!up) throw new Error('slurmctld did not answer scontrol ping within 30 s');
    const slurmd = start('slurmd', '/usr/sbin/slurmd', ['-D', '-N', 'localhost', '-f', conf], env);
    let state = '';
    for (let k = 0; k < 480 && !exited(slurmd); k++) {
      await sleep(250);
      state =
        spawnSync('/usr/bin/sinfo', ['-h', '-n', 'localhost', '-o', '%T'], {
          env,
          encoding: 'utf8',
          timeout: 10_000,
        }).stdout?.trim() ?? '';
      if (state === 'idle') break;
      // A node left down or drained by an earlier controller state is put back.
      if (/down|drain/.test(state) && k % 8 === 7)
        spawnSync('/usr/bin/scontrol', ['update', 'nodename=localhost', 'state=resume'], { env, timeout: 10_000 });
    }
    if (state !== 'idle') throw new Error(`the node localhost is '${state || 'unknown'}', not idle, after 120 s`);
    return { dir, env, client, logs, stop };
  } catch (e) {
    const text = logs();
    await stop();
    throw new Error(`${(e as Error).message}\n${text}`);
  }
}
