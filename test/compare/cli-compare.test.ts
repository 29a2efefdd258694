// `pycno compare` and `pycno report` through the command line's main(), in this process.

import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { compareRuns } from '../../model/compare/compare.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import { main } from '../../worker/cli/main.ts';
import { shortBurst, tinyRun } from '../support/run-fixture.ts';

let dir: string;
let a: RunData;
let b: RunData;

async function pycno(args: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await main(args, {
    stdout: { write: (s: string) => (stdout += s) },
    stderr: { write: (s: string) => (stderr += s), isTTY: false },
    cwd: dir,
  });
  return { code, stdout, stderr };
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-compare-'));
  a = await tinyRun();
  b = await tinyRun(['physics.frictionDays=5', 'basin.resolution=0.5'], 2);
  writeFileSync(join(dir, 'a.nc'), await toNetcdf(a));
  writeFileSync(join(dir, 'b.nc'), await toNetcdf(b));
  writeFileSync(join(dir, 'notes.txt'), 'not a run');
  const later = structuredClone(a);
  later.days = a.days.map((d) => d + 50);
  writeFileSync(join(dir, 'later.nc'), await toNetcdf(later));
});

describe('pycno compare', () => {
  it('prints the summary and writes B minus A with both runs named', async () => {
    const r = await pycno(['compare', 'a.nc', 'b.nc', '--out', 'diff.nc']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const c = compareRuns(a, b);
    expect(r.stdout).toMatch(
      /scenario +2 values differ \(A -> B\):\n +basin\.resolution +1 -> 0\.5\n +physics\.frictionDays +365 -> 5\n/,
    );
    expect(r.stdout).toContain("grid                B (0.5°) interpolated bilinearly onto A's coarser 1° grid");
    expect(r.stdout).toMatch(/common times +7 \(days 0 to 6, matched within 0\.5 days\); 4 with fields in both/);
    expect(r.stdout).toContain(`max |B - A|         h_anom   ${Number(c.maxAbsDifference.h_anom!.toPrecision(3))} m`);
    expect(r.stdout).toMatch(/Kelvin speed A +[\d.]+ ± [\d.]+ m\/s at 0\.5°; c = 2\.12 m\/s/);
    expect(r.stdout).toMatch(/output +diff\.nc \(7 records, B minus A\)/);
    expect(readdirSync(dir).filter((f) => f.includes('.part-'))).toEqual([]);

    const f = readNetcdf(new Uint8Array(readFileSync(join(dir, 'diff.nc'))));
    const text = (k: string) => f.attributes[k].value as string;
    expect(text('pycno_file')).toBe('run-difference');
    expect(text('pycno_difference')).toBe('B minus A');
    expect([text('pycno_run_a_file'), text('pycno_run_b_file')]).toEqual(['a.nc', 'b.nc']);
    expect([text('pycno_run_a_scenario_sha256'), text('pycno_run_b_scenario_sha256')]).toEqual([
      a.scenarioSha256,
      b.scenarioSha256,
    ]);
    expect(text('pycno_run_b_scenario')).toBe(b.scenarioJson);
    expect(f.numRecords).toBe(7);
    const h = f.variable('h_anom');
    expect(h.shape).toEqual([7, 20, 40]);
    const vals = h.values as Float64Array;
    const cells = 800;
    const d2 = c.difference(2, 'h_anom')!;
    expect(Array.from(vals.subarray(2 * cells, 3 * cells), (x) => (x === OUTPUT_FILL ? NaN : x))).toEqual(
      Array.from(d2),
    );
    // Record 1: B kept no fields there (every 2nd), so the fields are missing, as in a run.
    expect(vals.subarray(cells, 2 * cells).every((x) => x === OUTPUT_FILL)).toBe(true);
    expect(Array.from(f.variable('energy').values as Float64Array)).toEqual(Array.from(c.integrals.energy!.diff));
    expect(() => readRun(new Uint8Array(readFileSync(join(dir, 'diff.nc'))), 'diff.nc')).toThrow(
      /diff\.nc: this is a Pycno difference file \(B minus A\), not a run file/,
    );
  });

  it('refuses files that are not runs, and runs with no common times, with exit 2', async () => {
    let r = await pycno(['compare', 'a.nc', 'notes.txt']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^pycno: notes\.txt: not a NetCDF file/);
    r = await pycno(['compare', 'a.nc', 'missing.nc']);
    expect(r.stderr).toBe('pycno: missing.nc: cannot read the run file: no such file\n');
    r = await pycno(['compare', 'a.nc']);
    expect(r.stderr).toMatch(/^pycno: pycno compare takes 2 run files \(got 1: a\.nc\)/);
    r = await pycno(['compare', 'a.nc', 'later.nc', '--out', 'never.nc']);
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/common times +none/);
    expect(r.stderr).toBe(
      'pycno: no common times: A has days 0..6, B has days 50..56 (times match within 0.5 days); never.nc not written\n',
    );
    expect(readdirSync(dir)).not.toContain('never.nc');
    r = await pycno(['compare', 'a.nc', 'b.nc', '--out', 'no-such-dir/d.nc']);
    expect(r.code).toBe(2);
    // Checked before the runs are read: the folder must exist.
    expect(r.stderr).toBe('pycno: --out no-such-dir/d.nc: cannot write there: the folder no-such-dir does not exist\n');
  });
});

describe('pycno report', () => {
  it('writes the report page of a run', async () => {
    writeFileSync(join(dir, 'burst.nc'), await toNetcdf(await shortBurst()));
    const r = await pycno(['report', 'burst.nc']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Kelvin speed +2\.\d\d ± 0\.\d+ m\/s at 0\.5°; c = 2\.74 m\/s/);
    expect(r.stdout).toMatch(/report +burst\.html \(\d+ kB\)/);
    const html = readFileSync(join(dir, 'burst.html'), 'utf8');
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain('not for navigation or safety decisions');
    const r2 = await pycno(['report', 'notes.txt', '--out', 'x.html']);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/^pycno: notes\.txt: not a NetCDF file/);
    expect(readdirSync(dir)).not.toContain('x.html');
  });
});
