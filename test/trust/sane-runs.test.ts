// Runs that make sense before they start (issue 20). A scenario whose every number is within the
// schema's range could still ask for nonsense: time.outputEveryDays = 1e-10 gave dt = -Infinity,
// "0 steps" and exit 0; `check` promised 4e300 records; dtSeconds = 0.001 started 345,600,000
// steps; an output of 44.73 GiB was accepted. A restart state of 1e300 was accepted (energy NaN),
// a NaN in it was placed at "grid point i=-1, j=-1", a bad size attribute made a "-2147483648 x 10
// grid", and a blow-up was caught late. Now each is refused (exit 2, one line saying the number,
// the cap and the flag that allows more) or caught at the record where it happens. Command-line
// cases are real `pycno` invocations in a temporary folder; the page's engine runs here in Node.

import { readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { BlowUpError, InputError } from '../../model/errors.ts';
import { chooseTimeStep, stabilityLimit } from '../../model/dynamics/stability.ts';
import { Grid } from '../../model/grid.ts';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import { Model } from '../../model/model.ts';
import { MAX_OUTPUT_BYTES, MAX_STEPS } from '../../model/scenario/run-size.ts';
import { State } from '../../model/state.ts';
import { checkEdited } from '../../viewer/panels/scenario-panel.ts';
import { Engine } from '../../worker/engine.ts';
import { basin, config } from '../support/physics-kit.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';
import { folder, nc, noInternals, pycno, refusedWith } from '../support/cli-kit.ts';
import { edited, variable } from '../support/nc-edit.ts';

let dir: string;
let scenario: Record<string, any>;
let restart: Uint8Array;
let run: Uint8Array;

beforeAll(() => {
  dir = folder('sane');
  scenario = JSON.parse(readFileSync(join(dir, 'tiny.json'), 'utf8'));
  const r = pycno(dir, ['run', 'tiny.json', '--out', 'good.nc', '--restart-out', 'good-restart.nc', '--quiet']);
  expect(r.code, r.stderr).toBe(0);
  restart = new Uint8Array(readFileSync(join(dir, 'good-restart.nc')));
  run = new Uint8Array(readFileSync(join(dir, 'good.nc')));
});

const sets = (...list: string[]) => list.flatMap((s) => ['--set', s]);

/** Refused by both check and run with the same line; run leaves no file. */
function refusedByBoth(args: string[], line: RegExp): void {
  refusedWith(pycno(dir, ['check', 'tiny.json', ...args]), line);
  const before = readdirSync(dir).sort();
  refusedWith(pycno(dir, ['run', 'tiny.json', '--out', 'never.nc', ...args]), line);
  expect(readdirSync(dir).sort()).toEqual(before);
}

describe('what cannot run is refused, whatever the flags', () => {
  it('time.outputEveryDays = 1e-10 (dt came out as -Infinity, "0 steps", exit 0) and 1e-300 (4e300 records promised)', () => {
    refusedByBoth(
      sets('time.outputEveryDays=1e-10'),
      /^pycno: tiny\.json: line \d+: time\.outputEveryDays: 1e-10 days is 0\.00000864 s; records are at least 1 s apart \(0\.0000116 days\) \(from --set time\.outputEveryDays=1e-10\)$/,
    );
    refusedByBoth(
      sets('time.outputEveryDays=1e-300'),
      /time\.outputEveryDays: 1e-300 days is 8\.64e-296 s; records are at least 1 s apart/,
    );
  });

  it('more records than a NetCDF file can count (records 1.04 s apart for 100 years): refused even with both flags', () => {
    refusedByBoth(
      ['--days', '36500', ...sets('time.outputEveryDays=0.000012'), '--allow-long-run', '--allow-large-output'],
      /^pycno: tiny\.json: time: the run would save 3,041,666,668 records; a NetCDF file holds at most 2,147,483,647: use a longer time\.outputEveryDays$/,
    );
  });

  it('a time step of 1e-300 s: more steps than can be counted exactly, refused even with --allow-long-run', () => {
    refusedByBoth(
      [...sets('time.dtSeconds=1e-300'), '--allow-long-run'],
      /^pycno: tiny\.json: time: the run would take 5\.18e\+305 time steps \(dt = 1e-300 s for 6 days\), more than can be counted exactly; it cannot run: use a longer time step \(time\.dtSeconds "auto" gives 28800 s here\) or fewer days$/,
    );
  });

  it('the automatic step of an interval far below the stability limit is the interval, never -Infinity', () => {
    const limit = stabilityLimit({ c: 2, dx: 1e5, dy: 1e5, fMax: 1e-5, viscosity: 0, mode: 'linear' });
    for (const interval of [1, 1e-3, 1e-9, 8.64e-6]) expect(chooseTimeStep(limit, null, 0.8, interval)).toBe(interval);
  });
});

describe('above the caps a run must be asked for, and the message says the cap and the flag', () => {
  it(`dtSeconds = 0.001 for 4 days (345,600,000 steps were started): refused above ${MAX_STEPS.toLocaleString('en-US')} steps; check with --allow-long-run reports it`, () => {
    const args = ['--days', '4', ...sets('time.dtSeconds=0.001')];
    refusedByBoth(
      args,
      /^pycno: tiny\.json: time: the run takes 345,600,000 time steps \(dt = 0\.001 s for 4 days\), above the cap of 10,000,000 steps: use a longer time step \(time\.dtSeconds "auto" gives 28800 s here\) or fewer days, or ask for it with --allow-long-run \(pycno run, check, sweep, rerun; the page runs no more than the cap\)$/,
    );
    const ok = pycno(dir, ['check', 'tiny.json', ...args, '--allow-long-run']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/^steps +345600000 for 4 days$/m);
  });

  it(`an output of about 109 GiB (a century of daily records at 0.1 degree): refused above 8 GiB; --allow-large-output lets check report it`, () => {
    const args = ['--days', '36500', ...sets('basin.resolution=0.1')];
    refusedByBoth(
      args,
      /^pycno: tiny\.json: time: the output would be about 108\.\d\d GiB \(36,501 records of 10 fields on 400 x 200 cells\), above the cap of 8\.00 GiB: save fewer fields \(output\.fields\) or fewer records \(time\.outputEveryDays\), or ask for it with --allow-large-output/,
    );
    const ok = pycno(dir, ['check', 'tiny.json', ...args, '--allow-large-output']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/^output +36501 records every 1 days of .*: about 108\.\d\d GiB$/m);
    expect(MAX_OUTPUT_BYTES).toBe(8 * 1024 ** 3);
  });

  it('a spin-up above the cap (initial.days of a fine-stepped spin-up scenario): refused before it runs', () => {
    writeFileSync(
      join(dir, 'spin-fine.json'),
      JSON.stringify({ ...scenario, time: { days: 1, outputEveryDays: 1, dtSeconds: 0.01 } }),
    );
    writeFileSync(
      join(dir, 'after-spin.json'),
      JSON.stringify({ ...scenario, initial: { kind: 'spinup', scenario: 'spin-fine.json', days: 100 } }),
    );
    const r = pycno(dir, ['run', 'after-spin.json', '--out', 'never.nc'], 30_000);
    refusedWith(
      r,
      /^pycno: after-spin\.json: initial: the spin-up takes 864,000,000 time steps \(dt = 0\.01 s for 100 days\), above the cap of 10,000,000 steps: shorten initial\.days, or ask for it with --allow-long-run$/,
    );
    expect(r.ms).toBeLessThan(30_000);
  });

  it('a sweep with a member above the cap launches nothing; with --allow-long-run it lists the members with the flag', () => {
    const r = pycno(dir, [
      'sweep',
      'tiny.json',
      '--vary',
      'time.dtSeconds=600,0.001',
      '--days',
      '4',
      '--out',
      'capped',
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /^pycno sweep: capped\/run-002\.nc \(time\.dtSeconds=0\.001\): tiny\.json: time: the run takes 345,600,000 time steps .*--allow-long-run/m,
    );
    expect(r.stderr).toMatch(/^pycno sweep: 1 of 2 members cannot run; nothing was started$/m);
    expect(readdirSync(dir)).not.toContain('capped');
    const listed = pycno(dir, [
      'sweep',
      'tiny.json',
      '--vary',
      'time.dtSeconds=600,0.001',
      '--days',
      '4',
      '--out',
      'capped',
      '--list',
      '--allow-long-run',
    ]);
    expect(listed.code, listed.stderr).toBe(0);
    expect(listed.stdout.trim().split('\n')).toHaveLength(2);
    for (const line of listed.stdout.trim().split('\n')) expect(line).toMatch(/ --allow-long-run$/);
  });

  it("the page's scenario panel says it as the values are typed, and Apply stays off", () => {
    const edited = { ...scenario, time: { ...scenario.time, days: 4, dtSeconds: 0.001 } };
    const check = checkEdited(edited);
    expect(check.valid).toBe(false);
    expect(check.issues).toHaveLength(1);
    expect(check.issues[0].path).toBe('time');
    expect(check.issues[0].message).toMatch(
      /^the run takes 345,600,000 time steps .*--allow-long-run .*the page runs no more than the cap\)$/,
    );
    expect(check.derived?.steps).toBe(345_600_000);
    expect(checkEdited({ ...scenario, time: { ...scenario.time, days: 4 } }).valid).toBe(true);
  });

  it("the page's engine (the same Engine, here in Node) refuses it with the same clear message", async () => {
    const engine = new Engine({ host: fakeHost() });
    const r = await engine.load(FIXTURE_TEXT, FIXTURE, { sets: ['time.dtSeconds=0.001', 'time.days=4'] });
    expect(r.ok).toBe(false);
    const error = (r as { error: { kind: string; message: string } }).error;
    expect(error.kind).toBe('input');
    expect(error.message).toMatch(
      /time: the run takes 345,600,000 time steps .* above the cap of 10,000,000 steps: .* the page runs no more than the cap\)$/,
    );
  });
});

describe('start states outside the bounds of an ocean are refused like NaN, by variable and place', () => {
  /** A restart file edited by `change`, used by a scenario; the command must refuse it with `line`. */
  async function badStart(
    name: string,
    bytes: Uint8Array,
    change: Parameters<typeof edited>[1],
    line: RegExp,
  ): Promise<void> {
    writeFileSync(join(dir, `${name}.nc`), await edited(bytes, change));
    writeFileSync(
      join(dir, `${name}.json`),
      JSON.stringify({ ...scenario, initial: { kind: 'restart', path: `${name}.nc` } }),
    );
    const before = readdirSync(dir).sort();
    refusedWith(pycno(dir, ['run', `${name}.json`, '--out', 'never.nc']), line);
    expect(readdirSync(dir).sort()).toEqual(before);
  }

  // The tiny grid: 40 x 20 cells of 1 degree from 150E, 10S; padded rows of 43. Index 100 is
  // padded row 2, column 14: cell (13, 1) at 163.5E, 8.5S.
  it("h' = 1e300 in a restart file (it was accepted, energy NaN)", async () => {
    await badStart(
      'h-huge',
      restart,
      (f) => {
        (variable(f, 'h').values as Float64Array)[100] = 1e300;
      },
      /^pycno: h-huge\.json: initial\.path: h-huge\.nc: variable 'h' has 1e\+300 at index 100 \(cell \(13, 1\) at 163\.50°E, 8\.50°S\); a thermocline displaced by more than 11000 m is deeper than any ocean$/,
    );
  });

  it('u = -1e300 and v = 50 m/s in a restart file', async () => {
    await badStart(
      'u-huge',
      restart,
      (f) => {
        (variable(f, 'u').values as Float64Array)[100] = -1e300;
      },
      /variable 'u' has -1e\+300 at index 100 \(the u face \(13, 1\) at 163\.00°E, 8\.50°S\); a start must be slower than 20 m\/s, the speed at which a run is stopped as blown up$/,
    );
    await badStart(
      'v-fast',
      restart,
      (f) => {
        (variable(f, 'v').values as Float64Array)[100] = 50;
      },
      /variable 'v' has 50 at index 100 \(the v face \(13, 1\) at 163\.50°E, 9\.00°S\); a start must be slower than 20 m\/s/,
    );
  });

  it('a NaN in the padding around the grid is named as the padding, never as "grid point i=-1, j=-1"', async () => {
    await badStart(
      'h-nan-halo',
      restart,
      (f) => {
        (variable(f, 'h').values as Float64Array)[0] = NaN;
      },
      /variable 'h' has NaN at index 0 \(the padding outside the grid \(padded row 0, column 0\), which holds no grid point\); a start must be finite$/,
    );
    await badStart(
      'du-nan-history',
      restart,
      (f) => {
        (variable(f, 'du').values as Float64Array)[43 * 23 + 100] = NaN;
      },
      /variable 'du' has NaN at index 1089 \(the u face \(13, 1\) at 163\.00°E, 8\.50°S, history 1\); a start must be finite$/,
    );
  });

  it('a run output used as a start, with h_anom = 50,000 m at one cell of its last record', async () => {
    const cells = 40 * 20;
    await badStart(
      'run-deep',
      run,
      (f) => {
        const h = variable(f, 'h_anom').values as Float64Array;
        h[h.length - cells + 40 * 1 + 7] = 50_000; // cell (7, 1)
      },
      /variable 'h_anom' has 50000 at 157\.50°E, 8\.50°S, in the last record; a thermocline displaced by more than 11000 m is deeper than any ocean$/,
    );
  });

  it("a size attribute that is no size (pycno_nx = -2147483648) is named as the attribute, not as a '-2147483648 x 20 grid'", async () => {
    await badStart(
      'nx-bad',
      restart,
      (f) => {
        (f.attributes.pycno_nx as { values: ArrayLike<number> }).values = [-2147483648];
      },
      /h? ?nx-bad\.nc: global attribute 'pycno_nx' is -2147483648; a Pycno restart file has the grid's number of cells there \(a whole number >= 1\)$/,
    );
    await badStart(
      'ny-text',
      restart,
      (f) => {
        f.attributes.pycno_ny = 'twenty';
      },
      /global attribute 'pycno_ny' is the text "twenty"; a Pycno restart file has the grid's number of cells there/,
    );
  });

  it("a state handed to the model (the page's start from a kept run): 1e300 in h', a tendency that would carry u past 20 m/s in one step", () => {
    const b = basin(140, 180, -10, 10, 0.5);
    const grid = new Grid(b, config(b).physics.earthRadius);
    const s = new State(grid);
    s.h[grid.idx(5, 7)] = 1e300;
    const error = (fn: () => unknown) => {
      try {
        fn();
      } catch (e) {
        return e as Error;
      }
      throw new Error('accepted');
    };
    const e = error(() => new Model(config(b), { initial: s }));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toBe(
      "initial: the initial state has h' = 1e+300 at cell (5, 7) at 142.75°E, 6.25°S: a layer of 150 m plus this anomaly is thicker than any ocean is deep (at most 11000 m)",
    );
    const t = new State(grid);
    t.historyCount = 1;
    t.history.du[0][grid.idx(3, 4)] = 1;
    const m = error(() => new Model(config(b), { initial: t }));
    expect(m.message).toMatch(
      /^initial: the initial state's tendency du \(one step back\) is 1 at the u face \(3, 4\) at 141\.50°E, 7\.75°S: one step of [\d.]+ s would change it by more than 20 m\/s$/,
    );
  });
});

describe('health is checked at every record, before it is written', () => {
  it('a run whose layer vanishes on day 1.5: reported at that record, every kept record healthy (records of -110 m and -inf were kept)', () => {
    const thin = sets(
      'time.outputEveryDays=0.25',
      'physics.layerThickness=60',
      'physics.surfaceLayer.depth=10',
      'physics.entrainment.minThickness=5',
      'wind.parts[0].source.x=5',
      'wind.parts[0].envelope={"kind":"constant"}',
    );
    const r = pycno(dir, [
      'run',
      'tiny.json',
      '--out',
      'vanish.nc',
      '--quiet',
      '--keep-partial',
      '--days',
      '4',
      ...thin,
    ]);
    expect(r.code, r.stderr).toBe(1);
    noInternals(r);
    const day = Number(/^pycno: the run blew up on day (\d+\.\d\d)/.exec(r.stderr)?.[1]);
    const kept = /are in (vanish\.nc\.part-[\d-]+);/.exec(r.stderr)?.[1];
    expect(kept, r.stderr).toBeDefined();
    const f = nc(join(dir, kept!));
    const days = Array.from(f.variable('time').values as Float64Array);
    expect(days.length).toBeGreaterThanOrEqual(2);
    // Caught at the first record of the bad state at the latest: one output interval after the last good one.
    expect(days.every((d) => d < day)).toBe(true);
    expect(day - days.at(-1)!).toBeLessThanOrEqual(0.25 + 1e-9);
    for (const x of f.variable('min_thickness').values as Float64Array) expect(x).toBeGreaterThan(0);
    const h = f.variable('h_anom').values as Float64Array;
    for (const x of h) if (x !== OUTPUT_FILL) expect(x > -60 && Number.isFinite(x)).toBe(true);
  });

  it('an infinite thickness is a blow-up too (+Infinity passed the "thickness <= 0" test)', () => {
    const b = basin(140, 180, -10, 10, 0.5);
    const m = new Model(config(b));
    m.state.h[m.grid.idx(10, 10)] = Infinity;
    expect(() => m.checkHealth()).toThrow(BlowUpError);
    expect(() => m.checkHealth()).toThrow(/the layer thickness became infinite/);
  });
});
