// pycno sweep: a 2 x 2 sweep writes four runs equal bit for bit to separate `pycno run --set`
// runs, an index with the values and final diagnostics; --list prints the equivalent run lines.

import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'pycno-sweep-'));
copyFileSync(fileURLToPath(new URL('../../configs/example-minimal.json', import.meta.url)), join(dir, 'tiny.json'));

function pycno(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 170_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const vary = ['--vary', 'physics.reducedGravity=0.02,0.04', '--vary', 'physics.layerThickness=100,150', '--days', '4'];

describe('pycno sweep', () => {
  it('--list prints one pycno run line per combination, first --vary slowest', () => {
    const r = pycno(['sweep', 'tiny.json', ...vary, '--out', 'out', '--list']);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(
      [
        'pycno run tiny.json --out out/run-001.nc --set time.days=4 --set physics.reducedGravity=0.02 --set physics.layerThickness=100',
        'pycno run tiny.json --out out/run-002.nc --set time.days=4 --set physics.reducedGravity=0.02 --set physics.layerThickness=150',
        'pycno run tiny.json --out out/run-003.nc --set time.days=4 --set physics.reducedGravity=0.04 --set physics.layerThickness=100',
        'pycno run tiny.json --out out/run-004.nc --set time.days=4 --set physics.reducedGravity=0.04 --set physics.layerThickness=150',
        '',
      ].join('\n'),
    );
  });

  it('runs the combinations in parallel; each file equals a separate pycno run --set bit for bit', () => {
    const r = pycno(['sweep', 'tiny.json', ...vary, '--out', 'out', '--jobs', '2']);
    expect(r.stderr).toMatch(/4 runs on 2 worker threads/);
    expect(r.code).toBe(0);
    const combos = [
      ['0.02', '100'],
      ['0.02', '150'],
      ['0.04', '100'],
      ['0.04', '150'],
    ];
    const index = JSON.parse(readFileSync(join(dir, 'out', 'index.json'), 'utf8'));
    expect(index.runs).toHaveLength(4);
    const heights = new Set<string>();
    combos.forEach(([gp, H], n) => {
      const name = `single-${n}.nc`;
      const one = pycno([
        'run',
        'tiny.json',
        '--out',
        name,
        '--quiet',
        '--set',
        'time.days=4',
        '--set',
        `physics.reducedGravity=${gp}`,
        '--set',
        `physics.layerThickness=${H}`,
      ]);
      expect(one.code).toBe(0);
      const a = readNetcdf(readFileSync(join(dir, 'out', `run-00${n + 1}.nc`)));
      const b = readNetcdf(readFileSync(join(dir, name)));
      const ha = a.variable('h_anom').values as Float64Array;
      const hb = b.variable('h_anom').values as Float64Array;
      expect(ha.length).toBeGreaterThan(0);
      expect(Array.from(ha)).toEqual(Array.from(hb));
      heights.add(String(ha[ha.length - 100]));
      const row = index.runs[n];
      expect(row['physics.reducedGravity']).toBe(gp);
      expect(row['physics.layerThickness']).toBe(H);
      expect(row.exit).toBe(0);
      expect(row.final_day).toBe(4);
      expect(row.energy_J).toBeGreaterThan(0);
    });
    expect(heights.size).toBe(4); // the four runs really differ
    expect(readFileSync(join(dir, 'out', 'index.csv'), 'utf8').split('\n')[0]).toBe(
      'file,physics.reducedGravity,physics.layerThickness,exit,final_day,volume_change,energy_J,thinnest_layer_m,fastest_flow_m_s,courant',
    );
  });

  it('refuses a sweep without --vary or --out (exit 2)', () => {
    expect(pycno(['sweep', 'tiny.json', '--out', 'x']).code).toBe(2);
    expect(pycno(['sweep', 'tiny.json', '--vary', 'physics.reducedGravity=0.02']).code).toBe(2);
  });
});
