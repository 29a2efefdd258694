// Hostile but fair use of the command line's output files (issue 19, "Output files never destroy
// what was there"): every case is a real `pycno` invocation in a temporary folder. An existing
// file is replaced only by a complete, healthy run; an output never lands on an input; two runs
// never mix in one file; a full disk gives one line that says how much was needed and leaves no
// partial file unless asked.

import {
  chmodSync,
  copyFileSync,
  existsSync,
  linkSync,
  lstatSync,
  mkdtempSync,
  readFileSync,
  readdirSync,
  statSync,
  symlinkSync,
  utimesSync,
  writeFileSync,
} from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BLOW_UP_SETS } from '../support/engine-fixture.ts';
import {
  BIN,
  days,
  filesLike,
  folder,
  increasing,
  LONG,
  nc,
  noInternals,
  pycno,
  pycnoAsync,
  recordsIn,
  refusedWith,
  smallDisk,
  unmount,
  when,
} from '../support/cli-kit.ts';

let dir: string;
/** Bytes of a good earlier run of tiny.json (7 records), copied in as the file to protect. */
let good: Buffer;
const sets = (list: string[]) => list.flatMap((s) => ['--set', s]);

beforeAll(() => {
  dir = folder('out');
  const r = pycno(dir, ['run', 'tiny.json', '--out', 'first.nc', '--quiet']);
  expect(r.code).toBe(0);
  good = readFileSync(join(dir, 'first.nc'));
});

/** A fresh copy of the good run under `name`. */
function precious(name: string): string {
  writeFileSync(join(dir, name), good);
  return join(dir, name);
}

describe('an existing --out file is replaced only by a complete run', () => {
  it('a run that blows up leaves the old file as it was and no partial file', () => {
    const path = precious('blown.nc');
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'blown.nc', '--quiet', ...sets(BLOW_UP_SETS)]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^pycno: the run blew up on day/);
    expect(r.stderr).toMatch(/not kept \(--keep-partial keeps (it|them)\); blown\.nc is as it was\n$/);
    expect(readFileSync(path).equals(good)).toBe(true);
    expect(filesLike(dir, 'blown.nc')).toEqual(['blown.nc']);
    noInternals(r);
  });

  it('with --keep-partial the records before the blow-up stay under the temporary name, a valid file', () => {
    const path = precious('kept.nc');
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'kept.nc', '--quiet', '--keep-partial', ...sets(BLOW_UP_SETS)]);
    expect(r.code).toBe(1);
    const m =
      /the (\d+) records? written before the failure (?:is|are) in (kept\.nc\.part-\d+); kept\.nc is as it was/.exec(
        r.stderr,
      );
    expect(m, r.stderr).not.toBeNull();
    expect(nc(join(dir, m![2])).numRecords).toBe(Number(m![1]));
    expect(readFileSync(path).equals(good)).toBe(true);
    expect(filesLike(dir, 'kept.nc')).toEqual(['kept.nc', m![2]]);
  });

  it('a run killed with SIGKILL leaves the old file as it was; the temporary file holds the records done', async () => {
    const path = precious('killed.nc');
    const { child, done } = pycnoAsync(dir, ['run', 'tiny.json', '--out', 'killed.nc', ...LONG]);
    const temp = join(dir, `killed.nc.part-${child.pid}`);
    await when(child, () => recordsIn(temp) >= 2);
    child.kill('SIGKILL');
    const r = await done;
    expect(child.signalCode).toBe('SIGKILL');
    // The temporary name was printed as the run started, for watching the file grow.
    expect(r.stderr).toContain(
      `pycno: writing killed.nc.part-${child.pid}; it becomes killed.nc when the run has finished, replacing the killed.nc there now`,
    );
    expect(readFileSync(path).equals(good)).toBe(true);
    const f = nc(temp);
    expect(f.numRecords).toBeGreaterThanOrEqual(2);
    expect(increasing(days(f))).toBe(true);
    // The stale lock is taken over by the next run, which says so and replaces the file.
    expect(existsSync(join(dir, 'killed.nc.lock'))).toBe(true);
    const next = pycno(dir, ['run', 'tiny.json', '--out', 'killed.nc']);
    expect(next.code).toBe(0);
    expect(next.stderr).toMatch(
      new RegExp(
        `pycno: note: a run that stopped without finishing \\(process ${child.pid}, started [^)]+\\) left its lock`,
      ),
    );
    expect(nc(path).numRecords).toBe(7);
    expect(filesLike(dir, 'killed.nc')).toEqual(['killed.nc', `killed.nc.part-${child.pid}`]);
  }, 60_000);

  it('a run stopped with Ctrl-C (SIGINT): exit 130, the old file as it was, the records done kept and named', async () => {
    const path = precious('stopped.nc');
    const { child, done } = pycnoAsync(dir, ['run', 'tiny.json', '--out', 'stopped.nc', '--quiet', ...LONG]);
    const temp = `stopped.nc.part-${child.pid}`;
    await when(child, () => recordsIn(join(dir, temp)) >= 2);
    child.kill('SIGINT');
    const r = await done;
    expect(r.code).toBe(130);
    const m = new RegExp(
      `^pycno: interrupted on day [\\d.]+; the (\\d+) records done are in ${temp.replace(/\./g, '\\.')}; stopped\\.nc is as it was$`,
    ).exec(r.stderr.trimEnd());
    expect(m, r.stderr).not.toBeNull();
    expect(nc(join(dir, temp)).numRecords).toBe(Number(m![1]));
    expect(readFileSync(path).equals(good)).toBe(true);
    expect(filesLike(dir, 'stopped.nc')).toEqual(['stopped.nc', temp]);
  }, 60_000);

  it('a valid run replaces it whole (atomic rename), says so as it starts, and leaves no lock or temporary file', () => {
    writeFileSync(join(dir, 'again.nc'), 'an old file of another run');
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'again.nc', '--days', '3']);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(
      /^pycno: writing again\.nc\.part-\d+; it becomes again\.nc when the run has finished, replacing the again\.nc there now$/m,
    );
    expect(days(nc(join(dir, 'again.nc')))).toEqual([0, 1, 2, 3]);
    expect(filesLike(dir, 'again.nc')).toEqual(['again.nc']);
  });

  it('the replacement keeps the permission bits of the file it replaces', () => {
    const path = precious('mode.nc');
    spawnSync('chmod', ['640', path]);
    expect(pycno(dir, ['run', 'tiny.json', '--out', 'mode.nc', '--quiet']).code).toBe(0);
    expect(statSync(path).mode & 0o777).toBe(0o640);
  });

  it('a file made read-only is not replaced (as cp would refuse); checked as an ordinary user', (ctx) => {
    if (process.getuid?.() !== 0) return ctx.skip(true, 'running the command as another user needs root');
    // A folder of its own: the test folder is private to root (0700).
    const sub = mkdtempSync(join(tmpdir(), 'pycno-read-only-'));
    chmodSync(sub, 0o777);
    copyFileSync(join(dir, 'tiny.json'), join(sub, 'tiny.json'));
    writeFileSync(join(sub, 'kept-safe.nc'), good, { mode: 0o444 });
    const r = spawnSync(process.execPath, [BIN, 'run', 'tiny.json', '--out', 'kept-safe.nc'], {
      cwd: sub,
      encoding: 'utf8',
      uid: 65534,
      gid: 65534,
    });
    refusedWith(
      { code: r.status, stdout: r.stdout, stderr: r.stderr, ms: 0 },
      /^pycno: --out kept-safe\.nc: is read-only \(you cannot write it\); an existing file is replaced only when you could write it$/,
    );
    expect(readFileSync(join(sub, 'kept-safe.nc')).equals(good)).toBe(true);
  });

  it('an --out that is a symbolic link to an earlier run is written through: the link stays, the file it leads to is replaced', () => {
    precious('real.nc');
    symlinkSync('real.nc', join(dir, 'alias.nc'));
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'alias.nc', '--quiet', '--days', '2']);
    expect(r.code).toBe(0);
    expect(lstatSync(join(dir, 'alias.nc')).isSymbolicLink()).toBe(true);
    expect(days(nc(join(dir, 'real.nc')))).toEqual([0, 1, 2]);
  });
});

describe('an output never lands on an input', () => {
  const scenarioText = () => readFileSync(join(dir, 'tiny.json'), 'utf8');

  it('--out a symbolic link to the scenario: exit 2, the scenario as it was', () => {
    const before = scenarioText();
    symlinkSync('tiny.json', join(dir, 'sym-to-scenario.nc'));
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'sym-to-scenario.nc']),
      /^pycno: --out sym-to-scenario\.nc: that is the scenario file tiny\.json \(the same file under another name\); an output never replaces an input/,
    );
    expect(scenarioText()).toBe(before);
  });

  it('--out a hard link to the scenario: exit 2, the scenario as it was', () => {
    const before = scenarioText();
    linkSync(join(dir, 'tiny.json'), join(dir, 'hard-to-scenario.nc'));
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'hard-to-scenario.nc']),
      /^pycno: --out hard-to-scenario\.nc: that is the scenario file tiny\.json \(the same file under another name\)/,
    );
    expect(scenarioText()).toBe(before);
  });

  it('--out the scenario by its absolute path with ./ in it: exit 2', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', `${dir}/./tiny.json`]),
      /: that is the scenario file tiny\.json/,
    );
  });

  it('--out the restart file the scenario starts from: exit 2, the restart as it was', () => {
    expect(
      pycno(dir, ['run', 'tiny.json', '--out', 'r0.nc', '--restart-out', 'start.nc', '--quiet', '--days', '2']).code,
    ).toBe(0);
    const sc = JSON.parse(scenarioText());
    sc.initial = { kind: 'restart', path: 'start.nc' };
    writeFileSync(join(dir, 'from-restart.json'), JSON.stringify(sc));
    const before = readFileSync(join(dir, 'start.nc'));
    refusedWith(
      pycno(dir, ['run', 'from-restart.json', '--out', 'start.nc']),
      /^pycno: --out start\.nc: that is start\.nc, an input of the scenario/,
    );
    refusedWith(
      pycno(dir, ['run', 'from-restart.json', '--out', 'cont.nc', '--restart-out', 'start.nc']),
      /^pycno: --restart-out start\.nc: that is start\.nc, an input of the scenario/,
    );
    expect(readFileSync(join(dir, 'start.nc')).equals(before)).toBe(true);
  });

  it('--restart-out equal to --out, by name, by another spelling and by a link: exit 2', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'same.nc', '--restart-out', 'same.nc']),
      /^pycno: --restart-out same\.nc: is the same file as --out same\.nc; give the two outputs different names$/,
    );
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'same.nc', '--restart-out', './same.nc']),
      /^pycno: --restart-out \.\/same\.nc: is the same file as --out same\.nc/,
    );
    precious('linked-out.nc');
    symlinkSync('linked-out.nc', join(dir, 'linked-restart.nc'));
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'linked-out.nc', '--restart-out', 'linked-restart.nc']),
      /^pycno: --restart-out linked-restart\.nc: is the same file as --out linked-out\.nc/,
    );
    expect(existsSync(join(dir, 'same.nc'))).toBe(false);
    expect(readFileSync(join(dir, 'linked-out.nc')).equals(good)).toBe(true);
  });

  it('--restart-out the scenario: exit 2', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'x1.nc', '--restart-out', 'tiny.json']),
      /^pycno: --restart-out tiny\.json: that is the scenario file tiny\.json/,
    );
    expect(existsSync(join(dir, 'x1.nc'))).toBe(false);
  });

  it('compare --out naming run A, run B, or a link to one: exit 2, both as they were', () => {
    precious('a.nc');
    precious('b.nc');
    symlinkSync('b.nc', join(dir, 'b-link.nc'));
    refusedWith(
      pycno(dir, ['compare', 'a.nc', 'b.nc', '--out', 'a.nc']),
      /^pycno: --out a\.nc: that is run A \(a\.nc\); an output never replaces an input/,
    );
    refusedWith(
      pycno(dir, ['compare', 'a.nc', 'b.nc', '--out', 'b.nc']),
      /^pycno: --out b\.nc: that is run B \(b\.nc\)/,
    );
    refusedWith(
      pycno(dir, ['compare', 'a.nc', 'b.nc', '--out', 'b-link.nc']),
      /^pycno: --out b-link\.nc: that is run B \(b\.nc\) \(the same file under another name\)/,
    );
    expect(readFileSync(join(dir, 'a.nc')).equals(good) && readFileSync(join(dir, 'b.nc')).equals(good)).toBe(true);
  });

  it('report --out naming the run file or a hard link to it: exit 2, the run as it was', () => {
    precious('rep.nc');
    linkSync(join(dir, 'rep.nc'), join(dir, 'rep-hard.html'));
    refusedWith(
      pycno(dir, ['report', 'rep.nc', '--out', 'rep.nc']),
      /^pycno: --out rep\.nc: that is the run file rep\.nc; an output never replaces an input/,
    );
    refusedWith(
      pycno(dir, ['report', 'rep.nc', '--out', 'rep-hard.html']),
      /^pycno: --out rep-hard\.html: that is the run file rep\.nc \(the same file under another name\)/,
    );
    expect(readFileSync(join(dir, 'rep.nc')).equals(good)).toBe(true);
  });

  it('rerun --out naming the run file being checked: exit 2, the run as it was', () => {
    precious('check.nc');
    refusedWith(
      pycno(dir, ['rerun', 'check.nc', '--out', 'check.nc']),
      /^pycno: --out check\.nc: that is the run file check\.nc; an output never replaces an input/,
    );
    expect(readFileSync(join(dir, 'check.nc')).equals(good)).toBe(true);
  });

  it('--out a folder, a named pipe, a dangling link: exit 2 with what it is', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', '.']),
      /^pycno: --out \.: is a folder; the output must be a regular file$/,
    );
    const fifo = spawnSync('mkfifo', [join(dir, 'pipe.nc')]);
    if (fifo.status === 0)
      refusedWith(
        pycno(dir, ['run', 'tiny.json', '--out', 'pipe.nc']),
        /^pycno: --out pipe\.nc: is a named pipe; the output must be a regular file$/,
      );
    symlinkSync('nowhere/at/all.nc', join(dir, 'dangling.nc'));
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'dangling.nc']),
      /^pycno: --out dangling\.nc: is a symbolic link to a file that does not exist/,
    );
  });
});

describe('two runs writing the same --out', () => {
  /** Several seconds of run, 20 MB of output (h_anom only). */
  const LONG_H = [...LONG, '--set', 'output.fields=["h_anom"]'];

  it('the second while the first runs: refused with the first one named; the file is the first run, whole', async () => {
    const first = pycnoAsync(dir, ['run', 'tiny.json', '--out', 'shared.nc', '--quiet', ...LONG_H]);
    await when(first.child, () => recordsIn(join(dir, `shared.nc.part-${first.child.pid}`)) >= 1);
    const second = pycno(dir, ['run', 'tiny.json', '--out', 'shared.nc', '--quiet', '--days', '3']);
    refusedWith(
      second,
      new RegExp(
        `^pycno: --out shared\\.nc: another pycno run is writing this file \\(process ${first.child.pid}, started [^)]+\\); wait for it to end or choose another name`,
      ),
    );
    const r = await first.done;
    expect(r.code).toBe(0);
    const f = nc(join(dir, 'shared.nc'));
    expect(days(f)).toEqual(Array.from({ length: 61 }, (_, k) => k));
    expect(filesLike(dir, 'shared.nc')).toEqual(['shared.nc']);
  }, 90_000);

  it('both started at the same moment: one writes, the other is refused; never a mix', async () => {
    const runs = [0, 1].map(() => pycnoAsync(dir, ['run', 'tiny.json', '--out', 'race.nc', '--quiet', ...LONG_H]));
    const results = await Promise.all(runs.map((r) => r.done));
    expect(results.map((r) => r.code).sort()).toEqual([0, 2]);
    expect(results.find((r) => r.code === 2)!.stderr).toMatch(
      /^pycno: --out race\.nc: another pycno run is writing this file/,
    );
    expect(days(nc(join(dir, 'race.nc')))).toEqual(Array.from({ length: 61 }, (_, k) => k));
    expect(filesLike(dir, 'race.nc')).toEqual(['race.nc']);
  }, 90_000);

  it('a lock of a live process on this machine, or of another machine, is respected; an old unreadable one is taken over', () => {
    const lock = join(dir, 'locked.nc.lock');
    writeFileSync(
      lock,
      JSON.stringify({ pid: process.pid, thread: 99, host: hostname(), started: 'then', token: 't' }),
    );
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'locked.nc']),
      new RegExp(
        `another pycno run is writing this file \\(process ${process.pid}, started then\\).*delete locked\\.nc\\.lock`,
      ),
    );
    writeFileSync(lock, JSON.stringify({ pid: 1, thread: 0, host: 'elsewhere.example', started: 'then', token: 't' }));
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'locked.nc']),
      /another pycno run is writing this file \(process 1 on elsewhere\.example, started then\)/,
    );
    writeFileSync(lock, 'not a lock');
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', 'locked.nc']),
      /another pycno run is writing this file \(its lock is being written\)/,
    );
    utimesSync(lock, new Date(Date.now() - 60_000), new Date(Date.now() - 60_000));
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'locked.nc']);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/pycno: note: an unreadable old lock was removed/);
    expect(filesLike(dir, 'locked.nc')).toEqual(['locked.nc']);
  });

  it('a lock left by a process that is gone is taken over', () => {
    const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    writeFileSync(
      join(dir, 'orphan.nc.lock'),
      JSON.stringify({ pid: Number(gone.stdout), thread: 0, host: hostname(), started: 'earlier', token: 't' }),
    );
    const r = pycno(dir, ['run', 'tiny.json', '--out', 'orphan.nc']);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain(
      `pycno: note: a run that stopped without finishing (process ${gone.stdout}, started earlier) left its lock`,
    );
    expect(filesLike(dir, 'orphan.nc')).toEqual(['orphan.nc']);
  });
});

describe('a full disk', () => {
  const mounts: string[] = [];
  afterAll(() => mounts.forEach(unmount));

  it('--out /dev/full: one line (what, where, how much), exit 2, no stack', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--out', '/dev/full']),
      /^pycno: --out \/dev\/full: no space left on the device while writing the header \(the file needs about 242\.4 KiB, 0 bytes were written\)$/,
    );
    refusedWith(
      pycno(dir, ['report', 'first.nc', '--out', '/dev/full']),
      /^pycno: --out \/dev\/full: cannot write the report: no space left on the device/,
    );
    const c = pycno(dir, ['compare', 'first.nc', 'first.nc', '--out', '/dev/full']);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(
      /^pycno: --out \/dev\/full: cannot write the difference file: no space left on the device/,
    );
    noInternals(c);
  });

  it('--out /dev/null: a run whose output is thrown away, exit 0', () => {
    const r = pycno(dir, ['run', 'tiny.json', '--out', '/dev/null', '--quiet']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/output +\/dev\/null \(7 records\)/);
  });

  it('too little space from the start: refused before the run with the size needed and the space free; nothing left', (ctx) => {
    const disk = smallDisk(dir, 200);
    if ('skip' in disk) return ctx.skip(true, disk.skip);
    mounts.push(disk.path);
    copyFileSync(join(dir, 'tiny.json'), join(disk.path, 'tiny.json'));
    writeFileSync(join(disk.path, 'filler'), new Uint8Array(100 * 1024));
    refusedWith(
      pycno(disk.path, ['run', 'tiny.json', '--out', 'run.nc']),
      /^pycno: --out run\.nc: not enough space: the file needs about 242\.4 KiB, \d+\.\d KiB are free there$/,
    );
    expect(filesLike(disk.path, 'run.nc')).toEqual([]);
  });

  it('the disk fills up in the middle of a run: exit 1, one line with the sizes, the partial file removed, the old file as it was', async (ctx) => {
    const disk = smallDisk(dir, 4096);
    if ('skip' in disk) return ctx.skip(true, disk.skip);
    mounts.push(disk.path);
    copyFileSync(join(dir, 'tiny.json'), join(disk.path, 'tiny.json'));
    writeFileSync(join(disk.path, 'old.nc'), good);
    // h_anom only: 80 KB a record on 200 x 100 cells, 31 records, 2.5 MB in all: it fits at first.
    const { child, done } = pycnoAsync(disk.path, [
      'run',
      'tiny.json',
      '--out',
      'old.nc',
      '--quiet',
      '--set',
      'basin.resolution=0.2',
      '--set',
      'output.fields=["h_anom"]',
      '--days',
      '30',
    ]);
    const temp = join(disk.path, `old.nc.part-${child.pid}`);
    await when(child, () => recordsIn(temp) >= 1, 1);
    // Someone else fills the disk.
    spawnSync('dd', ['if=/dev/zero', `of=${join(disk.path, 'filler')}`, 'bs=64k'], { stdio: 'ignore' });
    const r = await done;
    expect(r.code, r.stderr).toBe(1);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(
      /^pycno: --out old\.nc: no space left on the device while writing record \d+ of 31 \(the file needs about 2\.\d MiB, [\d.]+ (KiB|MiB) were written, [\d.]+ (bytes|KiB) were free\); the unfinished file was removed \(--keep-partial keeps it\); old\.nc is as it was$/,
    );
    noInternals(r);
    expect(readFileSync(join(disk.path, 'old.nc')).equals(good)).toBe(true);
    expect(filesLike(disk.path, 'old.nc')).toEqual(['old.nc']);
  }, 60_000);
});

describe('pycno sweep writes its members through the same code', () => {
  it('a sweep run twice into the same folder replaces its members and index whole, nothing else left', () => {
    const args = [
      'sweep',
      'tiny.json',
      '--vary',
      'physics.reducedGravity=0.02,0.04',
      '--days',
      '2',
      '--out',
      'sw',
      '--jobs',
      '2',
    ];
    expect(pycno(dir, args).code).toBe(0);
    const first = readFileSync(join(dir, 'sw', 'index.csv'), 'utf8');
    const again = pycno(dir, args);
    expect(again.code).toBe(0);
    expect(readdirSync(join(dir, 'sw')).sort()).toEqual(['index.csv', 'index.json', 'run-001.nc', 'run-002.nc']);
    expect(readFileSync(join(dir, 'sw', 'index.csv'), 'utf8').split('\n')[0]).toBe(first.split('\n')[0]);
    expect(days(nc(join(dir, 'sw', 'run-002.nc')))).toEqual([0, 1, 2]);
  }, 90_000);
});
