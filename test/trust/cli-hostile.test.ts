// The command line with hostile scenario files (exit 2, one clear first line naming the file),
// nothing overwritten before the scenario is valid, and runs killed without warning (nonlinear,
// and during the header or first record) leaving either nothing yet or a valid file.

import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import { FIXTURE, FIXTURE_TEXT } from '../support/engine-fixture.ts';
import { fuzzSeed } from '../support/fuzz-kit.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const REGRESSIONS = fileURLToPath(new URL('./regressions/', import.meta.url));
let dir: string;

const pycno = (args: string[]) =>
  spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 60_000 });

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-trust-cli-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
});

/** A sample of hostile files: the kept regressions and a few generated ones. */
function hostileFiles(): string[] {
  const names = readdirSync(REGRESSIONS).filter((f) => f.startsWith('scenario-'));
  for (const n of names) copyFileSync(join(REGRESSIONS, n), join(dir, n));
  const gen = fc.sample(
    fc.oneof(
      fc.string({ maxLength: 50 }),
      fc.constantFrom(
        '',
        '{',
        '[]',
        'null',
        '{"format": "pycno-scenario/1"}',
        FIXTURE_TEXT.replace('0.03', 'NaN'),
        FIXTURE_TEXT.replace('0.03', '1e999'),
        FIXTURE_TEXT.slice(0, 300),
        `\ufeff${FIXTURE_TEXT.replace('"seed": 11', '"seed": {"__proto__": 1}')}`,
      ),
    ),
    { seed: fuzzSeed('cli sample', 8301), numRuns: 8 },
  );
  gen.forEach((t, k) => writeFileSync(join(dir, `gen-${k}.json`), t));
  return [...names, ...gen.map((_, k) => `gen-${k}.json`)];
}

describe('the command line with hostile scenario files', () => {
  it('pycno check and pycno run: exit 2, a first line that names the file, no stack trace, no output file', () => {
    const files = hostileFiles();
    expect(files.length).toBeGreaterThanOrEqual(12);
    for (const f of files) {
      for (const cmd of ['check', 'run']) {
        const r = pycno(cmd === 'run' ? [cmd, f, '--quiet', '--out', `${f}.nc`] : [cmd, f]);
        expect(r.status, `${cmd} ${f}: ${r.stderr.slice(0, 300)}`).toBe(2);
        const first = r.stderr.split('\n')[0];
        expect(first.startsWith(`pycno: ${f}: `), `${cmd} ${f}: ${first.slice(0, 200)}`).toBe(true);
        expect(first.length).toBeLessThan(600);
        expect(r.stderr).not.toMatch(/internal error| {4}at |TypeError|RangeError/);
        expect(r.stderr.split('\n').length).toBeLessThanOrEqual(23);
        expect(() => statSync(join(dir, `${f}.nc`))).toThrow();
      }
    }
  }, 120_000);

  it('an existing --out file is left as it was when the scenario is refused', () => {
    writeFileSync(join(dir, 'keep.nc'), 'precious earlier run');
    writeFileSync(join(dir, 'bad.json'), FIXTURE_TEXT.replace('"days": 6', '"days": -6'));
    const r = pycno(['run', 'bad.json', '--out', 'keep.nc', '--quiet']);
    expect(r.status).toBe(2);
    expect(readFileSync(join(dir, 'keep.nc'), 'utf8')).toBe('precious earlier run');
  });
});

/**
 * Start a run and kill it (SIGKILL) once `ready(bytes)` holds for its output, which grows under a
 * temporary name beside --out (OUT.part-PID). Returns the temporary file's bytes; the name asked
 * for is never created by a run that did not finish.
 */
async function killWhen(args: string[], out: string, ready: (b: Uint8Array) => boolean): Promise<Uint8Array> {
  const child = spawn(process.execPath, [BIN, ...args, '--out', out], { cwd: dir, stdio: 'ignore' });
  const temp = () => join(dir, `${out}.part-${child.pid}`);
  await new Promise<void>((resolve, reject) => {
    const timer = setInterval(() => {
      try {
        if (ready(new Uint8Array(readFileSync(temp())))) {
          clearInterval(timer);
          child.kill('SIGKILL');
          resolve();
        }
      } catch {
        // not created yet
      }
    }, 2);
    child.on('exit', () => {
      clearInterval(timer);
      reject(new Error('the run ended before it was killed; make it longer'));
    });
  });
  await new Promise((r) => child.on('exit', r));
  expect(child.signalCode).toBe('SIGKILL');
  expect(() => statSync(join(dir, out))).toThrow();
  return new Uint8Array(readFileSync(temp()));
}

describe('runs killed without warning', () => {
  it('nonlinear, killed after a few records: a valid file of the days done', async () => {
    const b = await killWhen(
      ['run', 'tiny.json', '--set', 'basin.resolution=0.1', '--set', 'physics.dynamics=nonlinear', '--days', '60'],
      'nl.nc',
      (x) => x.length > 8 && new DataView(x.buffer).getUint32(4) >= 2,
    );
    const f = readNetcdf(b);
    expect(f.numRecords).toBeGreaterThanOrEqual(2);
    expect(f.numRecords).toBeLessThan(61);
    expect(f.attributes.pycno_physics_dynamics.value).toBe('nonlinear');
    const h = f.variable('h_anom').values as Float64Array;
    expect(h.length).toBe(f.numRecords * 400 * 200);
    expect(h.every((x) => x === OUTPUT_FILL || Number.isFinite(x))).toBe(true);
  }, 60_000);

  it('killed as soon as the file exists (while the coordinates, the header or the first record go in): nothing claimed, or a valid file', async () => {
    for (let k = 0; k < 4; k++) {
      const b = await killWhen(
        ['run', 'tiny.json', '--set', 'basin.resolution=0.1', '--days', '60'],
        `early-${k}.nc`,
        () => true,
      );
      // The temporary file is created empty; the coordinates and mask go in first, then the
      // header, its magic number "CDF" last. A kill before that leaves a file that does not claim
      // to be NetCDF (nothing done, nothing claimed); after it, a valid file of 0 or more records.
      // The name asked for does not exist either way (killWhen checks).
      if (b.length >= 3 && String.fromCharCode(b[0], b[1], b[2]) === 'CDF') {
        expect(readNetcdf(b).numRecords).toBeGreaterThanOrEqual(0);
      } else {
        expect(() => readNetcdf(b)).toThrow(/not a NetCDF file/);
      }
    }
  }, 60_000);
});
