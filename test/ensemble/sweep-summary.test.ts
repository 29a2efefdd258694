// The sweep summary of `pycno sweep --gather`, on real members: a seed ensemble (tiny basin under
// random bursts, 3 seeds x 2 layer thicknesses, so two groups) and a parameter sweep with a member
// that blows up and a varied value that is text. Checked: the statistics against a two-pass
// float64 computation over the same member files; that gathering holds one member at a time
// (each member's RunData is garbage once the next is read); the outside readers (netCDF4, xarray,
// ncdump, CDO, UDUNITS-2) without a warning; the ncdump -h listing in docs/ensembles.md; and the
// spread report of `pycno report`.

import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { beforeAll, describe, expect, it } from 'vitest';
import { EnsembleStatistics } from '../../model/ensemble/statistics.ts';
import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { readRun } from '../../model/io/run-import.ts';
import { gather } from '../../worker/cli/sweep-gather.ts';
import { FIXTURE } from '../support/engine-fixture.ts';
import {
  CDO_SINFON,
  NCDUMP_HEADER,
  NETCDF4_READER,
  OUTSIDE_READERS,
  missingUdunits,
  udunits,
} from '../support/outside-readers.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const BURSTS = fileURLToPath(new URL('../fixtures/tiny-bursts.json', import.meta.url));
const DOC = fileURLToPath(new URL('../../docs/ensembles.md', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'pycno-summary-'));

function pycno(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 170_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const SEEDS = ['1', '2', '3'];
const THICK = ['120', '150'];
const gatherAlive: number[] = [];
let gatherOut = '';
let seedFile: NcFile;
let members: RunData[] = [];

beforeAll(async () => {
  copyFileSync(BURSTS, join(dir, 'tiny-bursts.json'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
  const made = pycno([
    'sweep',
    'tiny-bursts.json',
    '--vary',
    `physics.layerThickness=${THICK.join(',')}`,
    '--vary',
    `seed=${SEEDS.join(',')}`,
    '--batch',
    'seeds',
    '--per-task',
    '6',
  ]);
  expect(made.code, made.stderr).toBe(0);
  const task = pycno(['sweep', '--task', 'seeds', '1']);
  expect(task.code, task.stdout + task.stderr).toBe(0);
  // Gathered in this process, with the garbage collector at hand: at each member read, how many
  // of the members read before it are still in memory.
  setFlagsFromString('--expose-gc');
  const gc = runInNewContext('gc') as () => void;
  const refs: Array<WeakRef<RunData>> = [];
  let out = '';
  const io = { stdout: { write: (s: string) => (out += s) }, stderr: { write: (s: string) => (out += s) }, cwd: dir };
  const code = await gather(['--gather', 'seeds'], io, {
    onMember: (run) => {
      gc();
      gatherAlive.push(refs.filter((r) => r.deref() !== undefined).length);
      refs.push(new WeakRef(run));
    },
  });
  gatherOut = out;
  expect(code, out).toBe(0);
  seedFile = readNetcdf(readFileSync(join(dir, 'seeds', 'summary.nc')));
  members = Array.from({ length: 6 }, (_, k) =>
    readRun(new Uint8Array(readFileSync(join(dir, 'seeds', 'runs', `run-00${k + 1}.nc`))), `run-00${k + 1}.nc`),
  );

  // The parameter sweep: a text value (physics.slip) and a member that blows up (5 N m-2).
  const p = pycno([
    'sweep',
    'tiny.json',
    '--vary',
    'wind.parts[0].source.x=0.05,5',
    '--vary',
    'physics.slip=free,no',
    '--batch',
    'params',
    '--per-task',
    '4',
  ]);
  expect(p.code, p.stderr).toBe(0);
  expect(pycno(['sweep', '--task', 'params', '1']).code).toBe(1);
  expect(pycno(['sweep', '--gather', 'params']).code).toBe(1);
}, 400_000);

const values = (f: NcFile, name: string) => f.variable(name).values as Float64Array;

/** One float32 unit in the last place at x. */
const ulp32 = (x: number) => {
  const f = Math.fround(Math.abs(x));
  const b = new Float32Array([f]);
  const i = new Int32Array(b.buffer);
  i[0] += 1;
  return b[0] - f;
};

describe('the seed statistics', () => {
  it('groups the members by the values that are not the seed', () => {
    expect(gatherOut).toMatch(/6 members: 6 complete, 0 failed, 0 missing/);
    expect(gatherOut).toMatch(
      /mean and standard deviation over the seeds of h_anom, ssh, u, v, u_surf, v_surf, u_below, v_below, taux, tauy in 2 seed ensembles/,
    );
    expect(Array.from(values(seedFile, 'member_ensemble'))).toEqual([1, 1, 1, 2, 2, 2]);
    expect(Array.from(values(seedFile, 'ensemble_vary_physics_layerThickness'))).toEqual([120, 150]);
    expect(Array.from(values(seedFile, 'ensemble_members'))).toEqual([3, 3]);
    expect(Array.from(values(seedFile, 'vary_seed'))).toEqual([1, 2, 3, 1, 2, 3]);
    // The seeds draw different bursts (the same in both groups), so there is a spread to measure.
    expect(new Set(members.map((m) => JSON.stringify(m.bursts))).size).toBe(3);
    expect(members[3].bursts).toEqual(members[0].bursts);
  });

  it('equal the two-pass float64 mean and standard deviation of the member files, to the float32 they are stored in', () => {
    const nt = members[0].days.length;
    const cells = members[0].grid.nx * members[0].grid.ny;
    let compared = 0;
    let exact = 0;
    // The fields the members recorded (an uncoupled run has no SST or answering wind).
    for (const f of members[0].fields) {
      const mean = values(seedFile, `${f}_mean`);
      const std = values(seedFile, `${f}_std`);
      for (let g = 0; g < 2; g++) {
        const group = members.slice(3 * g, 3 * g + 3);
        for (let n = 0; n < nt; n++) {
          const snaps = group.map((m) => m.snapshots[n].fields[f]!);
          for (let c = 0; c < cells; c++) {
            const at = (n * 2 + g) * cells + c;
            const xs = snaps.map((s) => s[c]);
            if (!Number.isFinite(xs[0])) {
              expect(mean[at]).toBeGreaterThan(9e36); // land: the fill value
              continue;
            }
            const m = (xs[0] + xs[1] + xs[2]) / 3;
            const sd = Math.sqrt(
              ((xs[0] - m) * (xs[0] - m) + (xs[1] - m) * (xs[1] - m) + (xs[2] - m) * (xs[2] - m)) / 2,
            );
            // Stored as float32: the two computations round to the same float, or to neighbours.
            expect(
              Math.abs(mean[at] - Math.fround(m)),
              `${f} mean, group ${g + 1}, record ${n}, cell ${c}`,
            ).toBeLessThanOrEqual(ulp32(m) + 1e-300);
            expect(
              Math.abs(std[at] - Math.fround(sd)),
              `${f} std, group ${g + 1}, record ${n}, cell ${c}`,
            ).toBeLessThanOrEqual(ulp32(sd) + 1e-300);
            compared++;
            if (mean[at] === Math.fround(m) && std[at] === Math.fround(sd)) exact++;
          }
        }
      }
    }
    expect(compared).toBeGreaterThan(100_000);
    expect(exact / compared).toBeGreaterThan(0.9);
    // The energy is kept in float64: the two computations agree to a few roundings.
    const em = values(seedFile, 'energy_mean');
    const es = values(seedFile, 'energy_std');
    for (let n = 1; n < nt; n++) {
      for (let g = 0; g < 2; g++) {
        const xs = members.slice(3 * g, 3 * g + 3).map((m) => m.integrals.energy[n]);
        const m = (xs[0] + xs[1] + xs[2]) / 3;
        const sd = Math.sqrt(xs.reduce((s, x) => s + (x - m) * (x - m), 0) / 2);
        expect(Math.abs(em[n * 2 + g] - m) / m).toBeLessThan(1e-14);
        expect(Math.abs(es[n * 2 + g] - sd) / sd).toBeLessThan(1e-9);
      }
    }
    // Hovmoller rows and probe series likewise, on one row and one probe.
    const hm = values(seedFile, 'hovmoller_h_anom_mean');
    const nx = members[0].grid.nx;
    const n = nt - 1;
    for (let i = 0; i < nx; i++) {
      const xs = members.slice(0, 3).map((m) => m.hovmoller[0].values[n * nx + i]);
      if (!Number.isFinite(xs[0])) continue;
      expect(
        Math.abs(hm[((n * 2 + 0) * 2 + 0) * nx + i] - Math.fround((xs[0] + xs[1] + xs[2]) / 3)),
      ).toBeLessThanOrEqual(ulp32(xs[0]) * 2);
    }
    const pm = values(seedFile, 'probe_h_anom_mean');
    const xs = members.slice(3, 6).map((m) => m.probes[1].series.h_anom![n]);
    expect(Math.abs(pm[(n * 2 + 1) * 2 + 1] - Math.fround((xs[0] + xs[1] + xs[2]) / 3))).toBeLessThanOrEqual(
      ulp32(xs[0]) * 2,
    );
  });

  it('are gathered one member at a time: no earlier member is still in memory when the next is read', () => {
    expect(gatherAlive).toEqual([0, 0, 0, 0, 0, 0]);
    // The accumulators' size depends on the grid, the records and the groups, not on the members.
    const m = members[0];
    const one = EnsembleStatistics.bytesFor(2, m.days.length, m.grid.nx * m.grid.ny, 10, 2, m.grid.nx, 2);
    const stats = new EnsembleStatistics(2);
    stats.add(0, members[0]);
    expect(stats.bytes).toBe(one);
    for (const r of members.slice(1, 3)) stats.add(0, r);
    expect(stats.bytes).toBe(one);
  });
});

describe('the summary file in outside readers', () => {
  it.for(['seeds', 'params'] as const)(
    'the %s summary opens in netCDF4, xarray, ncdump and CDO without a warning',
    (kind, ctx) => {
      const path = join(dir, kind, 'summary.nc');
      for (const reader of OUTSIDE_READERS) {
        const missing = reader.missing();
        if (missing) {
          ctx.skip(true, `${reader.name}: ${missing}`);
          return;
        }
        expect(reader.read(path).problems, reader.name).toEqual([]);
      }
    },
  );

  it.for(['seeds', 'params'] as const)('every units string of the %s summary is one UDUNITS-2 reads', (kind, ctx) => {
    const missing = NETCDF4_READER.missing() ?? missingUdunits();
    ctx.skip(missing !== null, String(missing));
    const got = JSON.parse(NETCDF4_READER.read(join(dir, kind, 'summary.nc')).stdout);
    const units = [
      ...new Set(
        Object.values(got.variables as Record<string, { attributes: Record<string, unknown> }>).flatMap((v) =>
          typeof v.attributes.units === 'string' ? [v.attributes.units] : [],
        ),
      ),
    ];
    expect(units.length).toBeGreaterThan(kind === 'seeds' ? 6 : 4);
    const u = udunits([...units, 'no_such_unit']);
    expect(u.problems).toEqual([]);
    expect(u.parses.no_such_unit).toBe(false); // the check can fail
    expect(units.filter((x) => !u.parses[x])).toEqual([]);
  });

  it('the parameter sweep keeps the text values as indices into pycno_values, and the failed member as fill', () => {
    const f = readNetcdf(readFileSync(join(dir, 'params', 'summary.nc')));
    expect(Array.from(values(f, 'vary_physics_slip'))).toEqual([0, 1, 0, 1]);
    expect(f.variable('vary_physics_slip').attributes.pycno_values.value).toBe('["free","no"]');
    expect(Array.from(values(f, 'member_state'))).toEqual([0, 0, 1, 1]);
    expect(Array.from(values(f, 'member_exit_code'))).toEqual([0, 0, 1, 1]);
    expect(values(f, 'ssh_peak')[2]).toBeGreaterThan(9e36);
    const listed = JSON.parse(f.attributes.pycno_members.value as string);
    expect(listed[2].message).toMatch(/^the run blew up on day/);
    expect(f.variables.some((v) => v.name === 'time')).toBe(false); // no seeds: no statistics
  });

  it('CDO finds the statistics as variables on the lon/lat grid and the seed ensembles as levels', (ctx) => {
    ctx.skip(CDO_SINFON.missing() !== null, String(CDO_SINFON.missing()));
    const out = CDO_SINFON.read(join(dir, 'seeds', 'summary.nc')).stdout;
    const names = out.split('\n').flatMap((l) => /^\s*\d+ : .* : (\S+)\s*$/.exec(l)?.[1] ?? []);
    for (const v of [
      'h_anom_mean',
      'h_anom_std',
      'hovmoller_h_anom_mean',
      'probe_h_anom_std',
      'energy_mean',
      'kelvin_speed',
    ])
      expect(names).toContain(v);
    expect(out).toMatch(/lonlat +: points=800 \(40x20\)/);
    expect(out).toMatch(/generic +: levels=2\n +ensemble : 1 to 2/);
  });

  it('docs/ensembles.md: every line of the summary header listing is what ncdump -h prints for the seed summary', (ctx) => {
    ctx.skip(NCDUMP_HEADER.missing() !== null, String(NCDUMP_HEADER.missing()));
    const header = NCDUMP_HEADER.read(join(dir, 'seeds', 'summary.nc')).stdout.split('\n');
    const doc = readFileSync(DOC, 'utf8');
    const block = /```\n(netcdf summary \{[\s\S]*?)\n```/.exec(doc);
    expect(block, 'the summary header listing in docs/ensembles.md').not.toBeNull();
    // Lines cut short ("...") and comments added for the reader ("// ...") are not compared.
    const lines = block![1]
      .split('\n')
      .map((l) => l.replace(/\s+\/\/ (?!\(\d+ currently\)).*$/, ''))
      .filter((l) => l.trim() !== '' && !l.includes('...'));
    expect(lines.length).toBeGreaterThan(60);
    for (const l of lines) expect(header, `docs/ensembles.md line: ${l.trim()}`).toContain(l);
  });
});

describe('pycno report SUMMARY.nc', () => {
  it('draws the spread: mean and a band of one standard deviation per group, a dot per member with results, a cross per member without', () => {
    const r = pycno(['report', 'seeds/summary.nc', '--out', 'seeds.html']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/sweep summary +6 members, 2 seed ensembles/);
    const html = readFileSync(join(dir, 'seeds.html'), 'utf8');
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain("default-src 'none'");
    // 2 groups x (2 probes + the energy) band plots; 2 Hovmoller images each.
    expect(html.match(/<polygon class="band"/g)?.length).toBe(6);
    expect(html.match(/alt="h′ standard deviation along 0\.5°N/g)?.length).toBe(2);
    // 4 scalar plots + 2 arrival plots, a dot for each of the 6 members in each.
    expect(html.match(/<circle class="pt"/g)?.length).toBe(36);
    expect(html).toContain('seed ensemble 1 (physics.layerThickness = 120): 3 members');

    const p = pycno(['report', 'params/summary.nc', '--out', 'params.html']);
    expect(p.code, p.stderr).toBe(0);
    const ph = readFileSync(join(dir, 'params.html'), 'utf8');
    expect(ph.match(/<path class="bad"/g)?.length).toBe(12); // 2 failed members x 6 plots
    expect(ph).toMatch(/member 3 \(failed, exit 1\): the run blew up on day/);
    expect(ph).toContain('No seed among the varied values');
  });

  it('refuses a damaged summary with a message naming it', () => {
    const bytes = readFileSync(join(dir, 'params', 'summary.nc'));
    const text = bytes.toString('latin1').replace('"member":1,', '"member":1 ');
    writeFileSync(join(dir, 'damaged.nc'), Buffer.from(text, 'latin1'));
    const r = pycno(['report', 'damaged.nc']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^pycno: damaged\.nc: damaged sweep summary: /);
  });
});
