// Same scenario + seed + program version -> the same file, every value bit for bit; the version
// and the hash of the exact scenario run go into the file; `pycno rerun` repeats a file's run.

import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { NC_CHAR } from '../../model/io/netcdf-format.ts';
import { cli, differingVariables, FIXTURE, readNc, withBursts } from '../support/trust-kit.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const PACKAGE = JSON.parse(readFileSync(fileURLToPath(new URL('../../package.json', import.meta.url)), 'utf8'));
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-trust-repro-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
  writeFileSync(join(dir, 'bursts.json'), withBursts());
});

const base = ['--quiet', '--set', 'basin.resolution=0.5'];

describe('reproducibility through the command line', () => {
  for (const [name, file, extra] of [
    ['linear', 'tiny.json', []],
    ['nonlinear with random bursts', 'bursts.json', ['--set', 'physics.dynamics=nonlinear']],
  ] as const) {
    it(`${name}: two runs give the same value in every variable, bit for bit`, async () => {
      const a = await cli(['run', file, '--out', `${name}-a.nc`, ...base, ...extra], dir);
      const b = await cli(['run', file, '--out', `${name}-b.nc`, ...base, ...extra], dir);
      expect(a.code, a.stderr).toBe(0);
      expect(b.code, b.stderr).toBe(0);
      const fa = readNc(join(dir, `${name}-a.nc`));
      const fb = readNc(join(dir, `${name}-b.nc`));
      expect(fa.variables.length).toBeGreaterThan(20);
      expect(fa.numRecords).toBe(7);
      expect(differingVariables(fa, fb)).toEqual([]);
      // And the run is not trivially at rest (a comparison of zeros would prove little).
      const h = fa.variable('h_anom').values as Float64Array;
      expect(h.some((x) => x !== 0 && Math.abs(x) < 1e30)).toBe(true);
      if (file === 'bursts.json')
        expect(JSON.parse(String(fa.attributes.pycno_bursts.value)).length).toBeGreaterThan(0);
    });
  }

  it('a different seed gives a different run with bursts on (the seed matters)', async () => {
    const a = await cli(['run', 'bursts.json', '--out', 'seed-a.nc', ...base], dir);
    const b = await cli(['run', 'bursts.json', '--out', 'seed-b.nc', ...base, '--set', 'seed=12'], dir);
    expect(a.code + b.code).toBe(0);
    expect(differingVariables(readNc(join(dir, 'seed-a.nc')), readNc(join(dir, 'seed-b.nc')))).toContain('h_anom');
  });

  it('the file carries the program version and the SHA-256 of the exact scenario run (--set and --days in)', async () => {
    const r = await cli(
      ['run', 'tiny.json', '--out', 'hash.nc', '--days', '3', ...base, '--set', 'physics.reducedGravity=0.04'],
      dir,
    );
    expect(r.code, r.stderr).toBe(0);
    const f = readNc(join(dir, 'hash.nc'));
    expect(f.attributes.pycno_version.value).toBe(PACKAGE.version);
    const json = String(f.attributes.pycno_scenario.value);
    // The hash is of the embedded text, checked with an independent SHA-256 (node:crypto).
    expect(f.attributes.pycno_scenario_sha256.value).toBe(createHash('sha256').update(json, 'utf8').digest('hex'));
    const sc = JSON.parse(json);
    expect(sc.time.days).toBe(3);
    expect(sc.basin.resolution).toBe(0.5);
    expect(sc.physics.reducedGravity).toBe(0.04);
    // Defaults are filled in: the run does not depend on defaults of a later version.
    expect(sc.physics.density).toBeTypeOf('number');
    expect(f.numRecords).toBe(4);
  });
});

describe('pycno rerun', () => {
  it('repeats a run made with --set and --days: exit 0, every value matches; --out keeps the new file', async () => {
    const r = await cli(
      ['run', 'bursts.json', '--out', 'orig.nc', '--days', '4', ...base, '--set', 'physics.dynamics=nonlinear'],
      dir,
    );
    expect(r.code, r.stderr).toBe(0);
    const again = await cli(['rerun', 'orig.nc', '--out', 'again.nc'], dir);
    expect(again.stderr).toBe('');
    expect(again.code).toBe(0);
    expect(again.stdout).toMatch(
      /^match +every value of \d+ variables .* 5 records\) is bit for bit the same as in orig\.nc/,
    );
    expect(differingVariables(readNc(join(dir, 'orig.nc')), readNc(join(dir, 'again.nc')))).toEqual([]);
    // As a user runs it, in a child process.
    const child = spawnSync(process.execPath, [BIN, 'rerun', 'orig.nc'], {
      cwd: dir,
      encoding: 'utf8',
      timeout: 120_000,
    });
    expect(child.status, child.stderr).toBe(0);
  });

  it('a changed value: exit 1 naming the first differing variable, index, place and both values', async () => {
    expect((await cli(['run', 'tiny.json', '--out', 'tamper.nc', '--days', '2', ...base], dir)).code).toBe(0);
    const bytes = new Uint8Array(readFileSync(join(dir, 'tamper.nc')));
    const f = readNc(join(dir, 'tamper.nc'));
    // Find the last record's first ocean value of u and overwrite it in place.
    const u = f.variable('u').values as Float64Array;
    const k = u.findIndex((x, i) => i >= 2 * 80 * 40 && Math.abs(x) < 1e30 && x !== 0);
    expect(k).toBeGreaterThan(0);
    const target = new DataView(new ArrayBuffer(4));
    target.setFloat32(0, u[k]);
    const needle = new Uint8Array(target.buffer);
    // The float's bytes are unique enough in the u block; find them after the header.
    let at = -1;
    for (let p = bytes.length - 4; p > 0; p--) {
      if (
        bytes[p] === needle[0] &&
        bytes[p + 1] === needle[1] &&
        bytes[p + 2] === needle[2] &&
        bytes[p + 3] === needle[3]
      ) {
        at = p;
        break;
      }
    }
    expect(at).toBeGreaterThan(0);
    new DataView(bytes.buffer).setFloat32(at, 123.5);
    writeFileSync(join(dir, 'tamper.nc'), bytes);
    const r = await cli(['rerun', 'tamper.nc'], dir);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(
      /^differs +\w+ at index \d+ \(time \d, lat \d+, lon \d+\): tamper\.nc has 123\.5, the rerun -?[\d.e-]+/,
    );
  });

  it('an edited embedded scenario (hash mismatch), a foreign file, garbage, a missing file: exit 2, one line', async () => {
    expect((await cli(['run', 'tiny.json', '--out', 'edit.nc', '--days', '1', ...base], dir)).code).toBe(0);
    const bytes = new Uint8Array(readFileSync(join(dir, 'edit.nc')));
    // "reducedGravity": 0.03 -> 0.09, same length, so the header stays valid.
    const text = Buffer.from(bytes).toString('latin1');
    const at = text.indexOf('"reducedGravity": 0.03');
    expect(at).toBeGreaterThan(0);
    bytes[at + '"reducedGravity": 0.0'.length] = '9'.charCodeAt(0);
    writeFileSync(join(dir, 'edited.nc'), bytes);
    writeFileSync(join(dir, 'garbage.nc'), 'not a netcdf file at all');
    const { writeNetcdfToMemory } = await import('../../model/io/netcdf-writer.ts');
    writeFileSync(
      join(dir, 'foreign.nc'),
      await writeNetcdfToMemory(
        { dimensions: [{ name: 'n', length: 2 }], variables: [{ name: 'c', type: NC_CHAR, dimensions: ['n'] }] },
        { c: 'ab' },
      ),
    );
    for (const [args, re] of [
      [['rerun', 'edited.nc'], /^pycno: edited\.nc: the embedded scenario does not match its hash/],
      [['rerun', 'garbage.nc'], /^pycno: garbage\.nc: cannot read the run file: not a NetCDF file/],
      [['rerun', 'foreign.nc'], /^pycno: foreign\.nc: is not a Pycno run output/],
      [['rerun', 'missing.nc'], /^pycno: missing\.nc: cannot read the run file: no such file/],
      [['rerun'], /^pycno: pycno rerun takes one run file/],
      [['rerun', 'edit.nc', '--frob'], /^pycno: unknown option --frob for pycno rerun/],
    ] as const) {
      const r = await cli([...args], dir);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(re);
    }
  });
});
