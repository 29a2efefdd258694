// pycno run --threads: the same end state bit for bit as one thread (read from the restart
// files, which hold u, v and h in full), a note that says how the step ran, the process exits by
// itself (the strip workers are stopped), and a bad count is refused with exit 2.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const SCENARIO = fileURLToPath(new URL('../../configs/westerly-burst.json', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'pycno-threads-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function pycno(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 180_000 });
  return { code: r.status, signal: r.signal, stdout: r.stdout, stderr: r.stderr };
}

function restartFields(file: string): Record<'u' | 'v' | 'h', Float64Array> {
  const f = readNetcdf(new Uint8Array(readFileSync(join(dir, file))));
  return {
    u: f.variable('u').values as Float64Array,
    v: f.variable('v').values as Float64Array,
    h: f.variable('h').values as Float64Array,
  };
}

/** Every numeric variable of a restart file (the state, the multistep history, the clock, the budget). */
function restartVariables(file: string): Map<string, ArrayLike<number>> {
  const f = readNetcdf(new Uint8Array(readFileSync(join(dir, file))));
  return new Map(
    f.variables
      .filter(
        (v) =>
          typeof (v.values as ArrayLike<number>).length === 'number' &&
          typeof (v.values as ArrayLike<number>)[0] !== 'string',
      )
      .map((v) => [v.name, v.values as ArrayLike<number>]),
  );
}

describe('pycno run --threads', () => {
  it('ends in the one-thread state bit for bit, says so, and exits', () => {
    const common = ['run', SCENARIO, '--days', '16', '--quiet', '--set', 'physics.viscosity=800'];
    const one = pycno([...common, '--out', 'one.nc', '--restart-out', 'one-restart.nc']);
    const two = pycno([...common, '--out', 'two.nc', '--restart-out', 'two-restart.nc', '--threads', '2']);
    expect(one.stderr).toBe('');
    expect(two.stderr).toBe('');
    expect(one.code).toBe(0);
    expect(two.code).toBe(0); // exited by itself: no worker kept it alive (spawnSync would time out)
    expect(two.signal).toBeNull();
    expect(two.stdout).toMatch(/linear step on 2 threads \(latitude strips\)/);
    expect(one.stdout).not.toMatch(/threads/);
    const a = restartFields('one-restart.nc');
    const b = restartFields('two-restart.nc');
    for (const key of ['u', 'v', 'h'] as const) {
      expect(b[key].length).toBe(a[key].length);
      let differ = 0;
      for (let k = 0; k < a[key].length; k++) if (!Object.is(a[key][k], b[key][k])) differ++;
      expect(differ, key).toBe(0);
    }
    expect(Math.max(...a.h)).toBeGreaterThan(0.01); // the burst has moved the thermocline
  });

  it('the nonlinear step too: every variable of the restart file (history included) bit for bit', () => {
    const common = [
      'run',
      SCENARIO,
      '--days',
      '14',
      '--quiet',
      '--set',
      'physics.dynamics=nonlinear',
      '--set',
      'physics.viscosity=800',
    ];
    const one = pycno([...common, '--out', 'nl-one.nc', '--restart-out', 'nl-one-restart.nc']);
    const two = pycno([...common, '--out', 'nl-two.nc', '--restart-out', 'nl-two-restart.nc', '--threads', '2']);
    expect(one.stderr).toBe('');
    expect(two.stderr).toBe('');
    expect([one.code, two.code]).toEqual([0, 0]);
    expect(two.stdout).toMatch(/nonlinear step on 2 threads \(latitude strips\)/);
    const a = restartVariables('nl-one-restart.nc');
    const b = restartVariables('nl-two-restart.nc');
    expect([...b.keys()]).toEqual([...a.keys()]);
    for (const name of ['u', 'v', 'h', 'du', 'dv', 'dh', 'history_count']) expect(a.has(name), name).toBe(true);
    for (const [name, x] of a) {
      const y = b.get(name)!;
      let differ = 0;
      for (let k = 0; k < x.length; k++) if (!Object.is(x[k], y[k])) differ++;
      expect(differ, name).toBe(0);
    }
    expect(Math.max(...(a.get('h') as Float64Array))).toBeGreaterThan(0.01);
  });

  it('refuses a bad count with exit 2 and one line', () => {
    for (const [arg, re] of [
      ['0', /^pycno: --threads: must be a whole number from 1 to 64, or 'auto' \(got '0'\)/],
      ['two', /^pycno: --threads: must be a whole number from 1 to 64, or 'auto' \(got 'two'\)/],
      ['', /^pycno: --threads: must be a whole number from 1 to 64, or 'auto' \(got ''\)/],
    ] as const) {
      const r = pycno(['run', SCENARIO, `--threads=${arg}`, '--quiet']);
      expect(r.code, arg).toBe(2);
      expect(r.stderr).toMatch(re);
    }
    const check = pycno(['check', SCENARIO, '--threads', '2']);
    expect(check.code).toBe(2);
    expect(check.stderr).toMatch(/--threads applies to pycno run only/);
  });
});
