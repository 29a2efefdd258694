// Record times in a run file: each record's time is its nominal day to the bit (k x the output
// interval), over long runs, with fractional intervals and after restarts; an outside reader
// decodes them to the right calendar dates; and a run that is not a whole number of intervals
// ends with a record of its final state.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeRestart } from '../../model/io/restart.ts';
import { derivedNumbers } from '../../model/scenario/derived.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { recordDays, runInMemory } from '../support/run-records.ts';
import { FIXTURE_TEXT } from '../support/engine-fixture.ts';

// g' = 0.037 makes dt a fraction of a second (5 days in 17 steps at 1 degree), where adding dt
// at every step drifts off the whole days.
const ODD_DT = 'physics.reducedGravity=0.037';

/** Days a clock that adds dt at every step would reach at the records (what the files held before). */
function accumulatedDays(dt: number, stepsPerRecord: number, records: number): number[] {
  const out = [0];
  let t = 0;
  for (let k = 1; k < records; k++) {
    for (let s = 0; s < stepsPerRecord; s++) t += dt;
    out.push(t / 86400);
  }
  return out;
}

describe('record times', () => {
  it('1460 days with 5-day output: every record is 5 k days to the bit', async () => {
    const run = await runInMemory(FIXTURE_TEXT, '/runs/tiny.json', {
      sets: [ODD_DT, 'time.days=1460', 'time.outputEveryDays=5'],
    });
    const days = recordDays(run.file);
    expect(days).toHaveLength(293);
    expect(Number.isInteger(run.model.dt)).toBe(false);
    days.forEach((d, k) => expect(d, `record ${k}`).toBe(5 * k));
    // The check can fail: accumulation misses most of these days (day 1460 was 1459.99999999995).
    const N = run.model.clock.spec.stepsPerInterval;
    const drift = accumulatedDays(run.model.dt, N, days.length).filter((d, k) => d !== 5 * k).length;
    expect(drift).toBeGreaterThan(200);
  });

  for (const [every, num, den] of [
    [0.25, 1, 4],
    [0.7, 7, 10],
  ] as const) {
    it(`a fractional interval of ${every} days: record k is the double nearest ${num} k / ${den} days`, async () => {
      const run = await runInMemory(FIXTURE_TEXT, '/runs/tiny.json', {
        sets: [ODD_DT, 'time.days=70', `time.outputEveryDays=${every}`],
      });
      const days = recordDays(run.file);
      expect(days).toHaveLength(Math.round(70 / every) + 1);
      // (num k) / den: integers divided once, the double nearest the nominal day.
      days.forEach((d, k) => expect(d, `record ${k}`).toBe((num * k) / den));
    });
  }

  it('a restarted run keeps the records on their days', async () => {
    const sets = [ODD_DT, 'time.outputEveryDays=0.7'];
    // 9.1 days = 13 intervals; the restart continues for 7 more (10 intervals).
    const first = await runInMemory(FIXTURE_TEXT, '/runs/tiny.json', { sets: [...sets, 'time.days=9.1'] });
    const sc = JSON.parse(FIXTURE_TEXT);
    sc.initial = { kind: 'restart', path: 'half.nc' };
    const files = new Map([['/runs/half.nc', await writeRestart(first.model)]]);
    const second = await runInMemory(JSON.stringify(sc), '/runs/cont.json', { sets: [...sets, 'time.days=7'], files });
    const days = recordDays(second.file);
    expect(days).toHaveLength(11);
    days.forEach((d, k) => expect(d, `record ${k}`).toBe((7 * (13 + k)) / 10));
  });

  it('decode to the right calendar dates with netCDF4.num2date (an outside reader)', async (ctx) => {
    const PY = '/usr/bin/python3';
    const has = spawnSync(PY, ['-c', 'import netCDF4'], { encoding: 'utf8' }).status === 0;
    ctx.skip(!has, `${PY} cannot import netCDF4 (Debian: apt-get install python3-netcdf4)`);
    const run = await runInMemory(FIXTURE_TEXT, '/runs/tiny.json', {
      sets: [ODD_DT, 'time.days=1460', 'time.outputEveryDays=5'],
    });
    const dir = mkdtempSync(join(tmpdir(), 'pycno-dates-'));
    const path = join(dir, 'long.nc');
    writeFileSync(path, run.bytes);
    // netCDF4.num2date (Unidata netcdf4-python, with cftime) decodes CF "days since" axes.
    const script =
      'import sys, netCDF4\nt = netCDF4.Dataset(sys.argv[1])["time"]\nprint("\\n".join(d.isoformat() for d in netCDF4.num2date(t[:], t.units, t.calendar)))';
    const r = spawnSync(PY, ['-c', script, path], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    const dates = r.stdout.trim().split('\n');
    // Day 5 k after 2000-01-01 (the file's time units) in the proleptic Gregorian calendar, by Date.UTC.
    const expected = Array.from({ length: 293 }, (_, k) =>
      new Date(Date.UTC(2000, 0, 1 + 5 * k)).toISOString().slice(0, 19),
    );
    expect(dates).toEqual(expected);
    expect(dates.at(-1)).toBe('2003-12-31T00:00:00');
  });
});

describe('a run that is not a whole number of output intervals', () => {
  it('ends with a record of its final state; the last interval is shorter', async () => {
    const sets = [ODD_DT, 'time.days=12', 'time.outputEveryDays=5'];
    const run = await runInMemory(FIXTURE_TEXT, '/runs/tiny.json', { sets });
    const days = recordDays(run.file);
    const steps = Array.from(run.file.variable('step').values as Float64Array);
    expect(days.slice(0, 3)).toEqual([0, 5, 10]);
    expect(days).toHaveLength(4);
    // The last record is the end of the run: the first step at or after day 12.
    const m = run.model;
    expect(steps.at(-1)).toBe(m.state.steps);
    expect(days.at(-1)).toBe(m.day);
    expect(m.day).toBeGreaterThanOrEqual(12);
    expect(m.day - m.dt / 86400).toBeLessThan(12);
    // Its fields are the final state's.
    const h = run.file.variable('h_anom').values as Float64Array;
    const cells = m.grid.nx * m.grid.ny;
    const last = Array.from(h.subarray(3 * cells));
    const now = Array.from(m.field('h_anom', new Float32Array(cells)), (x) =>
      Number.isNaN(x) ? 9.969209968386869e36 : x,
    );
    expect(last).toEqual(now);
    // `pycno check` counts it.
    const p = parseScenario(FIXTURE_TEXT, 'tiny.json', sets);
    expect(derivedNumbers(p.resolved, m.grid).outputs).toBe(4);
    expect(
      derivedNumbers(
        parseScenario(FIXTURE_TEXT, 'tiny.json', [ODD_DT, 'time.days=10', 'time.outputEveryDays=5']).resolved,
        m.grid,
      ).outputs,
    ).toBe(3);
  });
});
