// Exporting a saved run whose maps were kept every k-th record: only the kept maps go into the
// file, on a time axis of their own (map_time), the series stay complete on time; the file is
// CF-valid and opens in Debian's netCDF4, xarray, ncdump and CDO without a warning; the size the
// save dialog states (estimateSize) is within 10 % of the file; the export reports its progress;
// and the file reads back into the same run.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { thinSnapshots, type RunData } from '../../model/io/run-data.ts';
import { netcdfBytes, toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import { estimateSize } from '../../viewer/library/store.ts';
import { OUTSIDE_READERS, XARRAY_READER } from '../support/outside-readers.ts';
import { collectRun, expectSameRun, WESTERLY_BURST, WESTERLY_BURST_TEXT } from '../support/run-fixture.ts';

const dir = mkdtempSync(join(tmpdir(), 'pycno-saved-export-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let cached: RunData | null = null;
/** 60 days of the westerly burst on a 1° grid, every record with its maps (as the page keeps them). */
async function burst(): Promise<RunData> {
  cached ??= await collectRun(WESTERLY_BURST_TEXT, WESTERLY_BURST, ['time.days=60', 'basin.resolution=1'], 1);
  return cached;
}

const saved = (run: RunData, every: number): RunData => ({ ...run, snapshots: thinSnapshots(run, every) });

describe('export of a saved run with maps kept every k-th record', () => {
  it('writes only the kept maps, on map_time, and the series in full on time', async () => {
    const run = saved(await burst(), 10);
    expect(run.snapshots.length).toBe(7);
    const bytes = await toNetcdf(run);
    const f = readNetcdf(bytes, { only: [] });
    const dims = Object.fromEntries(f.dimensions.map((d) => [d.name, d.length]));
    expect(dims.map_time).toBe(7);
    expect(f.variables.find((v) => v.name === 'h_anom')!.dimensions).toEqual(['map_time', 'lat', 'lon']);
    expect(f.variables.find((v) => v.name === 'volume')!.dimensions).toEqual(['time']);
    const mt = readNetcdf(bytes, { only: ['map_time', 'time'] });
    expect(Array.from(mt.variable('map_time').values as Float64Array)).toEqual(run.snapshots.map((s) => s.day));
    expect((mt.variable('time').values as Float64Array).length).toBe(61);
    // Read back: the same run, bit for bit, and a second export is the same file.
    const back = readRun(bytes, 'saved.nc');
    expectSameRun(run, back);
    expect(Buffer.from(await toNetcdf(back)).equals(Buffer.from(bytes))).toBe(true);
  });

  it('the size the save dialog states is within 10 % of the file, for every choice it offers', async () => {
    const run = await burst();
    for (const every of [1, 2, 5, 10, 20, 60]) {
      const file = (await toNetcdf(saved(run, every))).length;
      const stated = estimateSize(run, every);
      expect(Math.abs(file - stated) / file, `every ${every}: file ${file} B, stated ${stated} B`).toBeLessThan(0.1);
      expect(netcdfBytes(run, every)).toBe(file);
    }
    // Far smaller than with every map: what the old layout wrote as fill values is gone.
    expect((await toNetcdf(saved(run, 10))).length).toBeLessThan((await toNetcdf(run)).length / 5);
  });

  it('reports its progress, up to done', async () => {
    const seen: Array<[number, number]> = [];
    await toNetcdf(saved(await burst(), 10), { progress: (d, t) => void seen.push([d, t]) });
    expect(seen.length).toBeGreaterThan(10);
    const [last, total] = seen[seen.length - 1];
    expect(last).toBe(total);
    for (let k = 1; k < seen.length; k++) expect(seen[k][0]).toBeGreaterThan(seen[k - 1][0]);
  });

  for (const reader of OUTSIDE_READERS) {
    it(`opens in ${reader.name} without a warning`, async (ctx) => {
      const missing = reader.missing();
      ctx.skip(missing !== null, missing ?? '');
      const path = join(dir, 'saved-every-10.nc');
      writeFileSync(path, await toNetcdf(saved(await burst(), 10)));
      const r = reader.read(path);
      expect(r.problems).toEqual([]);
      if (reader === XARRAY_READER) {
        const out = JSON.parse(r.stdout) as { coords: string[]; time_dtype: string };
        expect(out.coords).toContain('map_time');
        expect(out.time_dtype).toMatch(/datetime64/);
      }
    });
  }
});
