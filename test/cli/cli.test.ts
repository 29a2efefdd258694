// The command line end to end, as a user runs it: node bin/pycno.js in a child process.

import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import { Engine } from '../../worker/engine.ts';
import { BLOW_UP_SETS, FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
let dir: string;

function pycno(args: string[], cwd = dir) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const sets = (list: string[]) => list.flatMap((s) => ['--set', s]);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-cli-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
});

describe('pycno check', () => {
  it('prints the derived numbers', () => {
    const r = pycno(['check', 'tiny.json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/c = sqrt\(g' H\) = 2\.121 m\/s/); // sqrt(0.03 x 150)
    expect(r.stdout).toMatch(/L = sqrt\(c \/ beta\) = 304 km/);
    expect(r.stdout).toMatch(/Kelvin crossing +\d+\.\d days/);
    expect(r.stdout).toMatch(/time step +dt = [\d.]+ s \(auto\); limit [\d.]+ s, set by gravity-wave/);
    // Automatic dt: 0.8 of the limit, shortened so the output interval is a whole number of steps.
    expect(r.stdout).toMatch(/CFL .*= 0\.[5-7]\d\d; dt \/ limit = 0\.[5-7]\d\d/);
    expect(r.stdout).toMatch(/memory +about/);
  });

  it('bad input: exit 2, one line naming file, line and path first', () => {
    writeFileSync(
      join(dir, 'bad.json'),
      FIXTURE_TEXT.replace('"reducedGravity": 0.03', '"reducedGravity": -0.03').replace('"days": 6', '"days": "six"'),
    );
    const r = pycno(['check', 'bad.json']);
    expect(r.code).toBe(2);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines[0]).toMatch(/^pycno: bad\.json: line 13: physics\.reducedGravity: must be > 0 \(got -0\.03\)/);
    expect(lines[1]).toMatch(/^pycno: bad\.json: line 14: time\.days: must be a number/);
    expect(r.stdout).toBe('');
  });

  it('bad command lines and missing files: exit 2 with one line', () => {
    for (const [args, re] of [
      [['run'], /^pycno: pycno run needs a scenario file/],
      [['frobnicate'], /^pycno: unknown command 'frobnicate'/],
      [['run', 'tiny.json', '--dayz', '3'], /^pycno: unknown option --dayz/],
      [['run', 'tiny.json', '--days', 'x'], /^pycno: --days: expected a number of days > 0 \(got 'x'\)/],
      [['run', 'nothere.json'], /^pycno: nothere\.json: cannot read the scenario file: no such file/],
      [
        ['check', 'tiny.json', '--set', 'physics.reducedGravity=0'],
        /^pycno: tiny\.json: line \d+: physics\.reducedGravity: must be > 0 \(got 0\).*\(from --set physics\.reducedGravity=0\)/,
      ],
      [
        ['run', 'tiny.json', '--out', join(dir, 'no', 'such', 'dir.nc')],
        /^pycno: --out .*: cannot write there: the folder .*no\/such does not exist$/m,
      ],
    ] as const) {
      const r = pycno([...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.split('\n')[0]).toMatch(re);
    }
  });
});

describe('pycno run', () => {
  it('writes a NetCDF whose h_anom equals the engine run, and prints a summary', async () => {
    const r = pycno(['run', 'tiny.json', '--out', 'tiny.nc', '--set', 'basin.resolution=0.5']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/cell updates\/s/);
    expect(r.stdout).toMatch(/output +tiny\.nc \(7 records\)/);
    // Not a terminal: plain progress lines, no carriage returns.
    expect(r.stderr).toMatch(/^pycno: \d+%/m);
    expect(r.stderr).not.toContain('\r');
    const f = readNetcdf(new Uint8Array(readFileSync(join(dir, 'tiny.nc'))));

    const engine = new Engine({ host: fakeHost(3) });
    const loaded = await engine.load(FIXTURE_TEXT, FIXTURE, { sets: ['basin.resolution=0.5'] });
    expect(loaded.ok).toBe(true);
    const expected: number[] = [];
    engine.setRecorder((rec) => {
      for (const x of Array.from(rec.fields.h_anom!)) expected.push(Number.isNaN(x) ? OUTPUT_FILL : Math.fround(x));
    });
    engine.start();
    await engine.idle();
    expect(f.numRecords).toBe(7);
    expect(Array.from(f.variable('h_anom').values as Float64Array)).toEqual(expected);
    expect(String(f.attributes.history.value)).toContain('pycno run tiny.json --set basin.resolution=0.5');
  });

  it('refuses an --out that would overwrite the scenario itself, and leaves it as it was', () => {
    writeFileSync(join(dir, 'same.json'), FIXTURE_TEXT);
    const r = pycno(['run', 'same.json', '--out', 'same.json', '--quiet']);
    expect(r.code).toBe(2);
    expect(r.stderr.trimEnd()).toBe(
      'pycno: --out same.json: that is the scenario file same.json; an output never replaces an input: write it under another name',
    );
    expect(readFileSync(join(dir, 'same.json'), 'utf8')).toBe(FIXTURE_TEXT);
  });

  it('a blow-up exits 1 with its message; --keep-partial keeps the records before it, by default nothing is left', () => {
    const r = pycno(['run', 'tiny.json', '--out', 'blow.nc', '--quiet', '--keep-partial', ...sets(BLOW_UP_SETS)]);
    expect(r.code).toBe(1);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines[0]).toMatch(
      /^pycno: the run blew up on day \d+\.\d\d at [\d.]+°E, [\d.]+°[NS]: the upper layer vanished/,
    );
    const m =
      /^pycno: the (\d+) records? written before the failure (?:is|are) in (blow\.nc\.part-\d+); blow\.nc was not written$/.exec(
        lines[1],
      );
    expect(m, lines[1]).not.toBeNull();
    expect(Number(m![1])).toBeGreaterThanOrEqual(1);
    expect(readNetcdf(new Uint8Array(readFileSync(join(dir, m![2])))).numRecords).toBe(Number(m![1]));
    expect(existsSync(join(dir, 'blow.nc'))).toBe(false);
    const plain = pycno(['run', 'tiny.json', '--out', 'blow2.nc', '--quiet', ...sets(BLOW_UP_SETS)]);
    expect(plain.code).toBe(1);
    expect(plain.stderr.trimEnd().split('\n')[1]).toMatch(
      /^pycno: the \d+ records? written before the failure (was|were) not kept \(--keep-partial keeps (it|them)\); blow2\.nc was not written$/,
    );
    expect(readdirSync(dir).filter((f) => f.startsWith('blow2.nc'))).toEqual([]);
  });

  it('a run killed halfway leaves its temporary file valid with the days done, and no file under --out', async () => {
    // Fine enough to take several seconds; the output every day.
    const args = [BIN, 'run', 'tiny.json', '--out', 'killed.nc', '--set', 'basin.resolution=0.1', '--days', '60'];
    const child = spawn(process.execPath, args, { cwd: dir, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (b) => (stderr += b));
    let path = '';
    // Wait until a few records are on disk in the temporary file it names, then kill without warning.
    await new Promise<void>((resolve, reject) => {
      const timer = setInterval(() => {
        const named = /^pycno: writing (killed\.nc\.part-\d+);/m.exec(stderr);
        if (!named) return;
        path = join(dir, named[1]);
        try {
          const b = new Uint8Array(readFileSync(path));
          if (b.length > 8 && new DataView(b.buffer).getUint32(4) >= 3) {
            clearInterval(timer);
            child.kill('SIGKILL');
            resolve();
          }
        } catch {
          // not created yet
        }
      }, 20);
      child.on('exit', () => {
        clearInterval(timer);
        reject(new Error('the run ended before it was killed; make it longer'));
      });
    });
    await new Promise((r) => child.on('exit', r));
    expect(child.signalCode).toBe('SIGKILL');
    expect(existsSync(join(dir, 'killed.nc'))).toBe(false);
    const f = readNetcdf(new Uint8Array(readFileSync(path)));
    expect(f.numRecords).toBeGreaterThanOrEqual(3);
    expect(f.numRecords).toBeLessThan(61);
    const days = Array.from(f.variable('time').values as Float64Array);
    expect(days[0]).toBe(0);
    const h = f.variable('h_anom').values as Float64Array;
    expect(h.length).toBe(f.numRecords * 400 * 200);
    expect(h.every((x) => x === OUTPUT_FILL || Number.isFinite(x))).toBe(true);
  });

  it('restart: a run continued from its restart file ends where one long run ends', () => {
    const long = pycno([
      'run',
      'tiny.json',
      '--out',
      'long.nc',
      '--days',
      '8',
      '--quiet',
      '--restart-out',
      'long-restart.nc',
    ]);
    expect(long.code).toBe(0);
    const half = pycno([
      'run',
      'tiny.json',
      '--out',
      'half.nc',
      '--days',
      '4',
      '--quiet',
      '--restart-out',
      'half-restart.nc',
    ]);
    expect(half.code).toBe(0);
    writeFileSync(
      join(dir, 'cont.json'),
      FIXTURE_TEXT.replace(
        '"seed": 11',
        '"seed": 11,\n  "initial": { "kind": "restart", "path": "half-restart.nc" }',
      ).replace('"days": 6', '"days": 4'),
    );
    const cont = pycno(['run', 'cont.json', '--out', 'cont.nc', '--quiet', '--restart-out', 'cont-restart.nc']);
    expect(cont.stderr).toBe('');
    expect(cont.code).toBe(0);
    expect(cont.stdout).toMatch(/restart from .*half-restart\.nc at day 4\.\d\d/);
    const a = readNetcdf(new Uint8Array(readFileSync(join(dir, 'long-restart.nc'))));
    const b = readNetcdf(new Uint8Array(readFileSync(join(dir, 'cont-restart.nc'))));
    for (const v of ['u', 'v', 'h', 'time', 'steps']) {
      expect(Array.from(b.variable(v).values as Float64Array), v).toEqual(
        Array.from(a.variable(v).values as Float64Array),
      );
    }
    // A restart from another grid is bad input.
    const bad = pycno(['run', 'cont.json', '--quiet', '--set', 'basin.resolution=0.5']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.split('\n')[0]).toMatch(
      /^pycno: cont\.json: initial\.path: .*half-restart\.nc: is on a 40 x 20 grid, the scenario on 80 x 40/,
    );
  });

  it("restart join: the continued run's records, its first included, are the straight run's, bit for bit", () => {
    // The patch ramps up across day 10, the join; g' = 0.037 makes dt a fraction of a second.
    const wind = [
      'physics.reducedGravity=0.037',
      'time.outputEveryDays=2.5',
      'wind.parts[0].envelope={"kind":"pulse","start":9.5,"duration":5,"ramp":1}',
    ];
    expect(pycno(['run', 'tiny.json', '--out', 'j-straight.nc', '--days', '20', '--quiet', ...sets(wind)]).code).toBe(
      0,
    );
    const first = pycno([
      'run',
      'tiny.json',
      '--out',
      'j-first.nc',
      '--days',
      '10',
      '--quiet',
      ...sets(wind),
      '--restart-out',
      'j-end.nc',
    ]);
    expect(first.code).toBe(0);
    writeFileSync(
      join(dir, 'j-cont.json'),
      FIXTURE_TEXT.replace('"seed": 11', '"seed": 11,\n  "initial": { "kind": "restart", "path": "j-end.nc" }'),
    );
    const cont = pycno(['run', 'j-cont.json', '--out', 'j-cont.nc', '--days', '10', '--quiet', ...sets(wind)]);
    expect(cont.stderr).toBe('');
    expect(cont.code).toBe(0);
    const read = (name: string) => readNetcdf(new Uint8Array(readFileSync(join(dir, name))));
    const straight = read('j-straight.nc');
    const second = read('j-cont.nc');
    const days = (f: ReturnType<typeof read>) => Array.from(f.variable('time').values as Float64Array);
    expect(days(second)).toEqual([10, 12.5, 15, 17.5, 20]);
    expect(days(straight).slice(4)).toEqual(days(second));
    const bad: string[] = [];
    for (const v of straight.variables.filter((x) => x.dimensions[0] === 'time')) {
      const size = v.shape.slice(1).reduce((p, n) => p * n, 1);
      const a = Float64Array.from((v.values as Float64Array).subarray(4 * size));
      const b = Float64Array.from(second.variable(v.name).values as Float64Array);
      if (!Buffer.from(a.buffer).equals(Buffer.from(b.buffer))) bad.push(v.name);
    }
    expect(bad).toEqual([]);
    // The restart file's history holds the whole command, as the run file's does.
    const history = String(read('j-end.nc').attributes.history.value);
    const command = `pycno run tiny.json ${['time.days=10', ...wind].map((w) => `--set ${w}`).join(' ')}`;
    expect(history).toMatch(/^\d{4}-\d\d-\d\dT[\d:.]+Z: /);
    expect(history).toContain(`: ${command} (Pycno `);
    expect(String(read('j-first.nc').attributes.history.value)).toContain(`: ${command} (Pycno `);
  });

  it('spin-up: runs the other scenario first, and refuses cycles', () => {
    writeFileSync(
      join(dir, 'after.json'),
      FIXTURE_TEXT.replace(
        '"seed": 11',
        '"seed": 11,\n  "initial": { "kind": "spinup", "scenario": "tiny.json", "days": 3 }',
      ).replace('"x": 0.1', '"x": 0'),
    );
    const r = pycno(['run', 'after.json', '--out', 'after.nc', '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/spun up with .*tiny\.json for 3 days/);
    const f = readNetcdf(new Uint8Array(readFileSync(join(dir, 'after.nc'))));
    // Day 0 of the new run is the spun-up state: the patch's signal is already there.
    const days = f.variable('time').values as Float64Array;
    expect(days[0]).toBe(0);
    const e = f.variable('energy').values as Float64Array;
    expect(e[0]).toBeGreaterThan(0);
    // Unforced afterwards (x = 0) with weak friction: the energy does not grow.
    expect(e[e.length - 1]).toBeLessThanOrEqual(e[0] * 1.0001);

    writeFileSync(
      join(dir, 'loop-a.json'),
      FIXTURE_TEXT.replace('"seed": 11', '"seed": 11,\n  "initial": { "kind": "spinup", "scenario": "loop-b.json" }'),
    );
    writeFileSync(
      join(dir, 'loop-b.json'),
      FIXTURE_TEXT.replace('"seed": 11', '"seed": 11,\n  "initial": { "kind": "spinup", "scenario": "./loop-a.json" }'),
    );
    const loop = pycno(['run', 'loop-a.json', '--quiet']);
    expect(loop.code).toBe(2);
    expect(loop.stderr.split('\n')[0]).toMatch(
      /^pycno: .*initial\.scenario: spin-up cycle: loop-a\.json -> .*loop-b\.json -> .*loop-a\.json/,
    );
  });
});
