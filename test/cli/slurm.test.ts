// The cluster sweep against a real Slurm: a one-node cluster on this machine
// (test/support/slurm-cluster.ts: munged, slurmctld and slurmd from Debian's slurm-wlm and munge),
// a 6-member job array made and submitted by `pycno sweep --batch DIR --submit` with one member
// that blows up, waited for with squeue and checked with sacct, gathered, and held bit for bit
// against the same sweep run on this machine; then a resubmission that finishes only the member
// whose file was removed. Skips, saying why, where Slurm cannot run (not root, not installed);
// CI installs both packages (.ci/run) and runs as root, so there it runs.

import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memberResults } from '../../model/ensemble/member-results.ts';
import { MEMBER_SCALARS } from '../../model/ensemble/summary-file.ts';
import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import { readRun } from '../../model/io/run-import.ts';
import { FIXTURE } from '../support/engine-fixture.ts';
import { sameBits } from '../support/bits.ts';
import { startLocalSlurm, type LocalSlurm } from '../support/slurm-cluster.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const VALUES = ['0.05', '0.1', '0.15', '0.2', '0.25', '5']; // 5 N m-2 outcrops the layer: the run blows up
const VARY = ['--vary', `wind.parts[0].source.x=${VALUES.join(',')}`];
// Generous: six runs of about 2 s each on 2 shared cores; only a hung cluster gets near it.
const WAIT_MS = 600_000;

let slurm: LocalSlurm | null = null;
let skip = '';
let dir = '';

function pycno(args: string[], env?: NodeJS.ProcessEnv) {
  const r = spawnSync(process.execPath, [BIN, ...args], {
    cwd: dir,
    encoding: 'utf8',
    timeout: 300_000,
    env: env ?? process.env,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Wait until squeue no longer lists the job; then each array task's state and exit code, from
 * scontrol (finished jobs are kept an hour, MinJobAge) and the same from sacct's job-completion
 * records (`sacct -c`; without a slurmdbd there is no accounting database, and the completion
 * log knows jobs by their own ids, not as array tasks, so the two are matched by job id).
 */
async function waitFor(job: string, tasks: number): Promise<Map<number, { state: string; exit: string }>> {
  const s = slurm!;
  const t0 = Date.now();
  while (s.client('/usr/bin/squeue', ['-h', '-j', job, '-o', '%i']).trim() !== '') {
    if (Date.now() - t0 > WAIT_MS)
      throw new Error(
        `job ${job} still queued or running after ${WAIT_MS / 1000} s:\n${s.client('/usr/bin/squeue', ['-j', job])}\n${s.logs()}`,
      );
    await sleep(1000);
  }
  const states = new Map<number, { state: string; exit: string; id: string }>();
  for (const line of s.client('/usr/bin/scontrol', ['show', 'job', job, '-o']).split('\n')) {
    const f = (k: string) => new RegExp(`(?:^| )${k}=(\\S+)`).exec(line)?.[1];
    if (f('ArrayJobId') === job && f('ArrayTaskId'))
      states.set(Number(f('ArrayTaskId')), { state: f('JobState')!, exit: f('ExitCode')!, id: f('JobId')! });
  }
  expect(states.size, `array tasks of job ${job}`).toBe(tasks);
  // The completion records are written as the jobs end; give the last one a moment.
  let records = new Map<string, { state: string; exit: string }>();
  for (let k = 0; k < 30; k++) {
    records = new Map();
    for (const line of s.client('/usr/bin/sacct', ['-c', '-n', '-P', '--format=JobID,State,ExitCode']).split('\n')) {
      const [id, state, exit] = line.trim().split('|');
      if (id) records.set(id, { state, exit });
    }
    if ([...states.values()].every((t) => records.has(t.id))) break;
    await sleep(1000);
  }
  for (const [task, t] of states)
    expect(records.get(t.id), `sacct -c for array task ${task} (job ${t.id})`).toEqual({
      state: t.state,
      exit: t.exit,
    });
  return new Map([...states].map(([k, t]) => [k, { state: t.state, exit: t.exit }]));
}

/** Every variable of two files, value for value, bit for bit; the attributes but the history. */
function expectSameRun(a: NcFile, b: NcFile, what: string): void {
  expect(
    b.variables.map((v) => v.name),
    what,
  ).toEqual(a.variables.map((v) => v.name));
  for (const v of a.variables) {
    const x = a.variable(v.name).values;
    const y = b.variable(v.name).values;
    if (typeof x === 'string' || typeof y === 'string') expect(y, `${what}: ${v.name}`).toEqual(x);
    else
      expect(
        sameBits(Float64Array.from(x as ArrayLike<number>), Float64Array.from(y as ArrayLike<number>)),
        `${what}: ${v.name}`,
      ).toBe(true);
  }
  for (const [k, att] of Object.entries(a.attributes))
    if (k !== 'history') expect(b.attributes[k]?.value, `${what}: attribute ${k}`).toEqual(att.value);
}

beforeAll(async () => {
  const started = await startLocalSlurm();
  if ('skip' in started) {
    skip = started.skip;
    if (process.env.CI === 'true')
      throw new Error(
        `CI must run the Slurm test (.ci/run installs slurm-wlm and munge and runs as root), but: ${skip}`,
      );
    return;
  }
  slurm = started;
  dir = mkdtempSync(join(tmpdir(), 'pycno-slurm-sweep-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
}, 240_000);

afterAll(async () => {
  await slurm?.stop();
}, 120_000);

describe('pycno sweep --batch on a real Slurm', () => {
  it(
    'submits a 6-member array, records the member that blows up, gathers a summary equal bit for bit to the sweep run here, and a resubmission finishes only what is missing',
    async (ctx) => {
      if (!slurm) {
        console.log(`Slurm test skipped: ${skip}`);
        ctx.skip();
        return;
      }
      const s = slurm;
      const made = pycno(['sweep', 'tiny.json', ...VARY, '--batch', 'batch', '--per-task', '1', '--submit'], s.env);
      expect(made.stderr).toBe('');
      expect(made.code, made.stdout).toBe(0);
      const job = /submitted +job (\d+)/.exec(made.stdout)?.[1];
      expect(job, made.stdout).toBeDefined();
      expect(readFileSync(join(dir, 'batch', 'sweep.sbatch'), 'utf8')).toMatch(/#SBATCH --array=1-6\n/);

      const states = await waitFor(job!, 6);
      for (let t = 1; t <= 5; t++)
        expect(states.get(t), `task ${t}: ${s.logs()}`).toEqual({ state: 'COMPLETED', exit: '0:0' });
      expect(states.get(6)?.state, 'task 6 ran the member that blows up').toBe('FAILED');
      expect(states.get(6)?.exit).toBe('1:0');
      const status6 = JSON.parse(readFileSync(join(dir, 'batch', 'status', 'member-006.json'), 'utf8'));
      expect(status6).toMatchObject({ member: 6, state: 'failed', exit: 1, job, task: 6 });
      expect(status6.message).toMatch(/blew up on day/);

      const gathered = pycno(['sweep', '--gather', 'batch']);
      expect(gathered.code, gathered.stderr).toBe(1); // a member failed: the summary is written all the same
      expect(gathered.stdout).toMatch(/6 members: 5 complete, 1 failed, 0 missing/);
      expect(gathered.stdout).toMatch(
        /rerun +\(cd .*batch && pycno run scenario\.json --out runs\/run-006\.nc --set 'wind\.parts\[0\]\.source\.x=5'\)/,
      );
      expect(gathered.stdout).toMatch(/resubmit +sbatch --array=6 .*sweep\.sbatch/);

      // The same sweep on this machine.
      const local = pycno(['sweep', 'tiny.json', ...VARY, '--out', 'local', '--jobs', '2']);
      expect(local.code).toBe(1); // member 6 blows up here too
      const summary = readNetcdf(readFileSync(join(dir, 'batch', 'summary.nc')));
      expect(Array.from(summary.variable('member_state').values as ArrayLike<number>)).toEqual([0, 0, 0, 0, 0, 1]);
      expect(Array.from(summary.variable('vary_wind_parts_0_source_x').values as ArrayLike<number>)).toEqual(
        VALUES.map(Number),
      );
      const np = 2;
      for (let k = 1; k <= 5; k++) {
        const name = `run-00${k}.nc`;
        const clusterBytes = readFileSync(join(dir, 'batch', 'runs', name));
        const localBytes = readFileSync(join(dir, 'local', name));
        expectSameRun(readNetcdf(localBytes), readNetcdf(clusterBytes), `member ${k}`);
        const r = memberResults(readRun(new Uint8Array(localBytes), name));
        for (const m of MEMBER_SCALARS) {
          const got = (summary.variable(m.name).values as ArrayLike<number>)[k - 1];
          expect(
            sameBits(Float64Array.of(got), Float64Array.of(r[m.key] as number)),
            `member ${k}: ${m.name} ${got} vs ${r[m.key]}`,
          ).toBe(true);
        }
        const arrivals = Array.from(summary.variable('kelvin_arrival_day').values as ArrayLike<number>).slice(
          (k - 1) * np,
          k * np,
        );
        expect(sameBits(Float64Array.from(arrivals), Float64Array.from(r.arrivalDay))).toBe(true);
      }
      expect(existsSync(join(dir, 'batch', 'runs', 'run-006.nc'))).toBe(false);

      // Resubmission: member 3's file removed; the whole array goes again, only member 3 runs.
      const before = statSync(join(dir, 'batch', 'runs', 'run-001.nc')).mtimeMs;
      const logsBefore = readdirSync(join(dir, 'batch', 'logs')).length;
      rmSync(join(dir, 'batch', 'runs', 'run-003.nc'));
      const again = pycno(['sweep', 'tiny.json', ...VARY, '--batch', 'batch', '--per-task', '1', '--submit'], s.env);
      expect(again.code, again.stderr).toBe(0);
      expect(again.stdout).toMatch(/the same sweep: script and tables written anew, runs kept/);
      const job2 = /submitted +job (\d+)/.exec(again.stdout)![1];
      const states2 = await waitFor(job2, 6);
      for (const t of [1, 2, 3, 4, 5]) expect(states2.get(t)?.state, `task ${t} of the resubmission`).toBe('COMPLETED');
      expect(readdirSync(join(dir, 'batch', 'logs')).length).toBe(logsBefore + 6);
      const log = (t: number) => readFileSync(join(dir, 'batch', 'logs', `task-${t}-job-${job2}.out`), 'utf8');
      for (const t of [1, 2, 4, 5])
        expect(log(t)).toMatch(new RegExp(`member ${t}: runs/run-00${t}\\.nc is already complete; skipped`));
      expect(log(3)).toMatch(/member 3: complete/);
      expect(statSync(join(dir, 'batch', 'runs', 'run-001.nc')).mtimeMs).toBe(before);
      expectSameRun(
        readNetcdf(readFileSync(join(dir, 'local', 'run-003.nc'))),
        readNetcdf(readFileSync(join(dir, 'batch', 'runs', 'run-003.nc'))),
        'member 3 run again',
      );
    },
    WAIT_MS * 2 + 300_000,
  );
});
