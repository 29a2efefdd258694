// pycno sweep --batch / --task / --gather without a scheduler: the folder and its script, the
// refusals before anything is written, array tasks run by hand (skip what is complete, record a
// blow-up and go on, refuse a file of another scenario), and what --gather lists and writes.
// The same against a real Slurm is test/cli/slurm.test.ts.

import { spawnSync } from 'node:child_process';
import {
  copyFileSync,
  existsSync,
  mkdirSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { scenarioHash } from '../../model/scenario/canonical-hash.ts';
import { estimateTask, slurmTime } from '../../worker/cli/batch-estimate.ts';
import { FIXTURE } from '../support/engine-fixture.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
let dir = '';

function pycno(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 170_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-batch-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
});

const VARY = ['--vary', 'wind.parts[0].source.x=0.05,5,0.1', '--vary', 'physics.layerThickness=120,150'];

describe('pycno sweep --batch DIR', () => {
  it('writes the member table, the exact scenario, the plan and an sbatch array script with the estimate explained', () => {
    const r = pycno(['sweep', 'tiny.json', ...VARY, '--days', '5', '--batch', 'b1', '--per-task', '2']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/members +6 \(members\.tsv\), 3 array tasks of up to 2/);
    expect(r.stdout).toMatch(/next +sbatch b1\/sweep\.sbatch/);
    const b = join(dir, 'b1');
    expect(readdirSync(b).sort()).toEqual([
      'batch.json',
      'logs',
      'members.tsv',
      'runs',
      'scenario.json',
      'status',
      'sweep.sbatch',
    ]);
    const table = readFileSync(join(b, 'members.tsv'), 'utf8')
      .trimEnd()
      .split('\n')
      .map((l) => l.split('\t'));
    expect(table[0]).toEqual([
      'member',
      'wind.parts[0].source.x',
      'physics.layerThickness',
      'run_file',
      'array_task',
      'scenario_sha256',
    ]);
    expect(table.slice(1).map((row) => row.slice(0, 5))).toEqual([
      ['1', '0.05', '120', 'runs/run-001.nc', '1'],
      ['2', '0.05', '150', 'runs/run-002.nc', '1'],
      ['3', '5', '120', 'runs/run-003.nc', '2'],
      ['4', '5', '150', 'runs/run-004.nc', '2'],
      ['5', '0.1', '120', 'runs/run-005.nc', '3'],
      ['6', '0.1', '150', 'runs/run-006.nc', '3'],
    ]);
    // The scenario is the resolved one with the common --set values in (--days 5 here).
    const scenario = JSON.parse(readFileSync(join(b, 'scenario.json'), 'utf8'));
    expect(scenario.time.days).toBe(5);
    expect(scenario.physics.density).toBe(1025); // a default, filled in
    const plan = JSON.parse(readFileSync(join(b, 'batch.json'), 'utf8'));
    expect(plan.members[3].sets).toEqual(['wind.parts[0].source.x=5', 'physics.layerThickness=150']);
    expect(plan.members[3].scenarioHash).toBe(table[4][5]);
    // 6 members have 6 different scenarios, and member 6 is the fixture with --days 5 only.
    expect(new Set(plan.members.map((m: { scenarioHash: string }) => m.scenarioHash)).size).toBe(6);
    expect(plan.members[5].scenarioHash).toBe(scenarioHash(readFileSync(join(b, 'scenario.json'), 'utf8')));
    const script = readFileSync(join(b, 'sweep.sbatch'), 'utf8');
    for (const line of [
      '#SBATCH --array=1-3',
      '#SBATCH --ntasks=1',
      '#SBATCH --cpus-per-task=1',
      '#SBATCH --mem=256M',
      '#SBATCH --time=0:10:00',
      `#SBATCH --chdir=${b}`,
      `#SBATCH --output=${join(b, 'logs', 'task-%a-job-%A.out')}`,
    ]) {
      expect(script.split('\n')).toContain(line);
    }
    expect(script).toMatch(
      /^# +grid 40 x 20 = 800 cells, 15 steps, 6 records of 10 fields, linear dynamics, 1 thread per member$/m,
    );
    expect(script).toMatch(/sweep --task .*b1 "\$\{SLURM_ARRAY_TASK_ID:\?/);
    expect(script.startsWith('#!/bin/bash\n')).toBe(true);
    expect(spawnSync('bash', ['-n', join(b, 'sweep.sbatch')]).status).toBe(0);
  });

  it('takes the resources given instead of the estimate, and more #SBATCH lines', () => {
    const r = pycno([
      'sweep',
      'tiny.json',
      ...VARY,
      '--batch',
      'b2',
      '--task-time',
      '1:30:00',
      '--task-memory',
      '2g',
      '--task-cpus',
      '3',
      '--threads',
      '2',
      '--at-once',
      '2',
      '--sbatch-option',
      '--partition=short',
      '--sbatch-option',
      '--account=ocean',
    ]);
    expect(r.code, r.stderr).toBe(0);
    const script = readFileSync(join(dir, 'b2', 'sweep.sbatch'), 'utf8').split('\n');
    for (const line of [
      '#SBATCH --time=1:30:00',
      '#SBATCH --mem=2G',
      '#SBATCH --cpus-per-task=3',
      '#SBATCH --partition=short',
      '#SBATCH --account=ocean',
    ])
      expect(script).toContain(line);
    expect(script.find((l) => l.startsWith('#SBATCH --array='))).toMatch(/^#SBATCH --array=1-\d+%2$/);
    expect(JSON.parse(readFileSync(join(dir, 'b2', 'batch.json'), 'utf8')).threads).toBe(2);
  });

  it('refuses bad options and bad members before writing anything (exit 2, one clear line)', () => {
    for (const [args, re] of [
      [['--task-time', '90min'], /--task-time needs minutes \(e\.g\. 90\) or \[D-\]H:MM:SS/],
      [['--task-memory', 'lots'], /--task-memory needs a size such as 800M or 4G/],
      [['--task-cpus', '0'], /--task-cpus needs a whole number from 1/],
      [['--threads', '4', '--task-cpus', '2'], /--task-cpus 2 is fewer than the --threads 4/],
      [['--sbatch-option', 'partition short'], /--sbatch-option needs one sbatch option/],
      [['--out', 'x'], /--out does not go with --batch/],
      [['--jobs', '2'], /--jobs does not go with --batch/],
      [['--batch', 'a b'], /--batch a b: the folder's path \(.*\) must have no spaces, quotes, backslashes or %/],
    ] as const) {
      const r = pycno(['sweep', 'tiny.json', ...VARY, '--batch', 'never', ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.split('\n')[0], args.join(' ')).toMatch(re);
    }
    // A member that is no valid scenario: named, with the scenario's own message.
    const r = pycno(['sweep', 'tiny.json', '--vary', 'physics.reducedGravity=0.03,-1', '--batch', 'never']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /^pycno sweep: member 2 \(physics\.reducedGravity=-1\) is not a valid scenario; nothing was written/,
    );
    expect(r.stderr).toMatch(/physics\.reducedGravity: must be > 0/);
    expect(existsSync(join(dir, 'never'))).toBe(false);
  });

  it('regenerates the same sweep in its folder; refuses another sweep there and a folder with other things in it', () => {
    const runs = join(dir, 'b1', 'runs');
    writeFileSync(join(runs, 'keep.txt'), 'x');
    const same = pycno([
      'sweep',
      'tiny.json',
      ...VARY,
      '--days',
      '5',
      '--batch',
      'b1',
      '--per-task',
      '3',
      '--task-time',
      '20',
    ]);
    expect(same.code, same.stderr).toBe(0);
    expect(same.stdout).toMatch(/the same sweep: script and tables written anew, runs kept/);
    expect(readFileSync(join(dir, 'b1', 'sweep.sbatch'), 'utf8')).toMatch(
      /#SBATCH --array=1-2\n[\s\S]*#SBATCH --time=20\n/,
    );
    expect(existsSync(join(runs, 'keep.txt'))).toBe(true);
    const other = pycno(['sweep', 'tiny.json', ...VARY, '--days', '6', '--batch', 'b1']);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(
      /--batch b1: the folder holds another sweep \(6 members of "Tiny westerly patch", made by: pycno sweep tiny\.json/,
    );
    mkdirSync(join(dir, 'busy'));
    writeFileSync(join(dir, 'busy', 'notes.txt'), 'mine');
    const busy = pycno(['sweep', 'tiny.json', ...VARY, '--batch', 'busy']);
    expect(busy.code).toBe(2);
    expect(busy.stderr).toMatch(/--batch busy: the folder is not empty and holds no Pycno batch/);
    expect(readdirSync(join(dir, 'busy'))).toEqual(['notes.txt']);
  });

  it('--submit where there is no sbatch: the folder is made and the message says how to submit', () => {
    const r = spawnSync(process.execPath, [BIN, 'sweep', 'tiny.json', ...VARY, '--batch', 'b3', '--submit'], {
      cwd: dir,
      encoding: 'utf8',
      env: { ...process.env, PATH: '/nonexistent' },
    });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(
      /could not submit: sbatch was not found: is this a machine of a Slurm cluster \(a login node\)\?; the folder is ready, submit it with: sbatch .*b3\/sweep\.sbatch/,
    );
    expect(existsSync(join(dir, 'b3', 'batch.json'))).toBe(true);
  });
});

describe('pycno sweep --task DIR N and --gather DIR', () => {
  it('runs the members of a task, records the blow-up and goes on; runs again only what is not complete; gather lists it with the rerun commands', () => {
    const t1 = pycno(['sweep', '--task', 'b1', '1']);
    expect(t1.code, t1.stderr).toBe(1); // member 3 (5 N m-2 on a 120 m layer) blows up
    expect(t1.stdout).toMatch(/member 1: complete/);
    expect(t1.stdout).toMatch(/member 3: failed \(exit 1\): the run blew up on day/);
    expect(t1.stdout).toMatch(/member 2: complete/);
    const s3 = JSON.parse(readFileSync(join(dir, 'b1', 'status', 'member-003.json'), 'utf8'));
    expect(s3).toMatchObject({ member: 3, state: 'failed', exit: 1, task: 1, job: null });
    expect(s3.message).toMatch(/^the run blew up on day/);
    expect(existsSync(join(dir, 'b1', 'runs', 'run-003.nc'))).toBe(false);
    const mtime = statSync(join(dir, 'b1', 'runs', 'run-001.nc')).mtimeMs;

    const again = pycno(['sweep', '--task', 'b1', '1']);
    expect(again.stdout).toMatch(/member 1: runs\/run-001\.nc is already complete; skipped/);
    expect(again.stdout).toMatch(/member 2: runs\/run-002\.nc is already complete; skipped/);
    expect(again.stdout).toMatch(/member 3: pycno run scenario\.json/); // run again, and fails again
    expect(statSync(join(dir, 'b1', 'runs', 'run-001.nc')).mtimeMs).toBe(mtime);

    // A file of another scenario where member 5's belongs: not taken for done.
    copyFileSync(join(dir, 'b1', 'runs', 'run-002.nc'), join(dir, 'b1', 'runs', 'run-005.nc'));
    const g = pycno(['sweep', '--gather', 'b1']);
    expect(g.code).toBe(1);
    const out = g.stdout;
    expect(out).toMatch(/gathered +b1: 6 members: 2 complete, 2 failed, 2 missing/);
    expect(out).toMatch(
      /failed +member 3 \(wind\.parts\[0\]\.source\.x=5 physics\.layerThickness=120\), exit 1: the run blew up/,
    );
    expect(out).toMatch(
      /failed +member 5 .*runs\/run-005\.nc holds another scenario than member 5 runs .*: physics\.layerThickness is 150, the member's is 120; wind\.parts\[0\]\.source\.x is 0\.05, the member's is 0\.1/,
    );
    expect(out).toMatch(/missing +member 4 \(wind\.parts\[0\]\.source\.x=5 physics\.layerThickness=150\): never ran/);
    expect(out).toContain(
      `rerun       (cd ${join(dir, 'b1')} && pycno run scenario.json --out runs/run-004.nc --set 'wind.parts[0].source.x=5' --set physics.layerThickness=150)`,
    );
    expect(out).toMatch(/resubmit +sbatch --array=1,2 .*b1\/sweep\.sbatch/);
    expect(out).toMatch(/summary +b1\/summary\.nc/);
    const f = readNetcdf(readFileSync(join(dir, 'b1', 'summary.nc')));
    expect(Array.from(f.variable('member_state').values as Float64Array)).toEqual([0, 0, 1, 2, 1, 2]);
    expect(Array.from(f.variable('vary_physics_layerThickness').values as Float64Array)).toEqual([
      120, 150, 120, 150, 120, 150,
    ]);
    const speed = f.variable('kelvin_speed_theory').values as Float64Array;
    expect(speed[0]).toBeCloseTo(Math.sqrt(0.03 * 120), 12);
    expect(speed[2]).toBeGreaterThan(9e36); // fill: no result

    // The exact rerun command works: member 6 by hand, then gathered as complete.
    const rerun = spawnSync(
      'bash',
      ['-c', out.match(/rerun +(\(cd .*run-006\.nc.*\))/)![1].replace(/&& pycno /, `&& ${process.execPath} ${BIN} `)],
      { encoding: 'utf8', timeout: 170_000 },
    );
    expect(rerun.status, rerun.stderr).toBe(0);
    rmSync(join(dir, 'b1', 'runs', 'run-005.nc'));
    const g2 = pycno(['sweep', '--gather', 'b1', '--out', 'other-summary.nc']);
    expect(g2.stdout).toMatch(/6 members: 3 complete, 1 failed, 2 missing/);
    expect(existsSync(join(dir, 'other-summary.nc'))).toBe(true);
  });

  it('refuses what it cannot use: a folder without a plan, a task number out of range, a changed scenario.json, an output on an input', () => {
    mkdirSync(join(dir, 'empty'), { recursive: true });
    for (const [args, re] of [
      [['sweep', '--gather', 'empty'], /^pycno sweep: empty: not a Pycno batch folder \(no batch\.json/],
      [['sweep', '--task', 'b1', '9'], /^pycno sweep: --task b1 9: the array task must be a whole number from 1 to 2/],
      [['sweep', '--task', 'b1'], /^pycno sweep: --task needs the batch folder and the array task number/],
      [
        ['sweep', '--gather', 'b1', '--out', 'b1/runs/run-001.nc'],
        /that is the run file of member 1; an output never replaces an input/,
      ],
      [
        ['sweep', '--gather', 'b1', '--spread-fields', 'h_anom,temperature'],
        /--spread-fields: unknown field temperature; the fields are h_anom, ssh/,
      ],
    ] as const) {
      const r = pycno([...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.split('\n')[0], args.join(' ')).toMatch(re);
    }
    const plan = join(dir, 'b1', 'scenario.json');
    const text = readFileSync(plan, 'utf8');
    writeFileSync(plan, text.replace('"frictionDays": 365', '"frictionDays": 300'));
    const r = pycno(['sweep', '--gather', 'b1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/b1\/scenario\.json was changed after the batch was made/);
    writeFileSync(plan, text);
  });
});

describe('pycno sweep --help', () => {
  it('prints the usage and options of both sweeps, as docs/ensembles.md repeats them', () => {
    const r = pycno(['sweep', '--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^usage: pycno sweep SCENARIO\.json --vary .* --out DIR/);
    for (const o of [
      '--batch DIR',
      '--submit',
      '--per-task N',
      '--task-time T',
      '--task-memory M',
      '--task-cpus N',
      '--at-once N',
      '--sbatch-option OPT',
      'sweep --task DIR N',
      'sweep --gather DIR',
      '--list',
    ])
      expect(r.stdout).toContain(o);
    const doc = readFileSync(fileURLToPath(new URL('../../docs/ensembles.md', import.meta.url)), 'utf8');
    const block = /## `pycno sweep --help`\n\n```\n([\s\S]*?)\n```/.exec(doc);
    expect(block, 'the --help block of docs/ensembles.md').not.toBeNull();
    expect(block![1]).toBe(r.stdout.trimEnd());
  });
});

describe('the resource estimate', () => {
  it('adds up as the script says, and formats Slurm times', () => {
    // 1120 x 400 cells, 186 steps, 7 records of 10 fields, 59 MiB of model arrays (the 0.125 degree
    // westerly-burst measured in worker/cli/batch-estimate.ts).
    const e = estimateTask({
      nx: 1120,
      ny: 400,
      steps: 186,
      outputs: 7,
      fields: 10,
      memoryBytes: 59 * 2 ** 20,
      mode: 'linear',
      perTask: 3,
      threads: null,
    });
    expect(e.threads).toBe(4); // 448000 cells: 11 strips of 40000 could run; at most 4
    const step = (186 * 448000 * 25e-9) / (4 * 0.7);
    const out = 7 * 448000 * 10 * 150e-9;
    expect(e.memberSeconds).toBeCloseTo(20 + step + out, 9);
    expect(e.timeMinutes).toBe(Math.max(10, Math.ceil(((20 + step + out) * 3 * 2) / 60)));
    expect(e.memMiB).toBe(Math.ceil(((160 + 4 * 59 + 3 * 40) * 1.5) / 64) * 64);
    expect(e.cpus).toBe(4);
    expect(e.explain.join('\n')).toContain(`${e.timeMinutes} min`);
    const nl = estimateTask({
      nx: 1120,
      ny: 400,
      steps: 186,
      outputs: 7,
      fields: 10,
      memoryBytes: 59 * 2 ** 20,
      mode: 'nonlinear',
      perTask: 1,
      threads: null,
    });
    expect(nl.threads).toBe(1);
    expect(slurmTime(10)).toBe('0:10:00');
    expect(slurmTime(125)).toBe('2:05:00');
    expect(slurmTime(1440 + 61)).toBe('1-01:01:00');
  });
});
