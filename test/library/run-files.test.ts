// Reading a Pycno run file back into a RunData, and writing it again: every value kept, and
// files that are not Pycno run files, or are damaged, refused with a message that says why.

import { RUN_PHYSICS_ATTRIBUTES } from '../../model/io/run-physics-file.ts';
import { describe, expect, it } from 'vitest';
import { COUPLED_FIELDS, FIELD_NAMES } from '../../model/diagnostics/fields.ts';
import { writeNetcdfToMemory } from '../../model/io/netcdf-writer.ts';
import { NC_FLOAT } from '../../model/io/netcdf-format.ts';
import { RunCollector } from '../../model/io/run-collector.ts';
import { thinSnapshots, RunFileError } from '../../model/io/run-data.ts';
import { runDescription, runRecord, toNetcdf } from '../../model/io/run-export.ts';
import { readRun } from '../../model/io/run-import.ts';
import { MemorySink } from '../../model/io/netcdf-writer.ts';
import { RunOutputWriter, runOutputFile } from '../../model/io/run-output.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { sha256Hex } from '../../model/io/sha256.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';
import { expectSameRun, tinyRun } from '../support/run-fixture.ts';

describe('RunData <-> NetCDF', () => {
  it('collects a run with every series at full resolution and the snapshots asked for', async () => {
    const run = await tinyRun([], 3);
    expect(Array.from(run.days)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(run.snapshots.map((s) => s.index)).toEqual([0, 3, 6]);
    // The default fields: all but those of an answering wind, which this run has not.
    expect(run.fields).toEqual(FIELD_NAMES.filter((f) => !COUPLED_FIELDS.includes(f)));
    expect(run.hovmoller.map((h) => h.values.length)).toEqual([7 * 40, 7 * 40]);
    expect(run.probes.map((p) => p.series.h_anom!.length)).toEqual([7, 7]);
    expect(run.scenarioSha256).toBe(sha256Hex(run.scenarioJson));
    expect(run.seed).toBe(11);
    // The run moved: the westerly patch raised the thermocline somewhere.
    expect(Math.max(...run.snapshots[1].fields.h_anom!.filter(Number.isFinite))).toBeGreaterThan(0.1);
  });

  it('export -> import keeps every value bit for bit, snapshots thinned or not', async () => {
    for (const every of [1, 2]) {
      const run = await tinyRun([], every);
      const bytes = await toNetcdf(run);
      const back = readRun(bytes, 'tiny.nc');
      expectSameRun(run, back);
      // And a second export is the same file, byte for byte.
      expect(Buffer.from(await toNetcdf(back)).equals(Buffer.from(bytes))).toBe(true);
    }
  });

  it('keeps NaN on land and the land mask', async () => {
    const run = await tinyRun();
    const back = readRun(await toNetcdf(run));
    const land = Array.from(back.grid.ocean).indexOf(0);
    expect(land).toBeGreaterThanOrEqual(0);
    expect(back.snapshots[2].fields.u![land]).toBeNaN();
    expect(Number.isFinite(back.snapshots[2].fields.u![back.grid.ocean.indexOf(1)])).toBe(true);
  });

  it('thinSnapshots keeps every k-th record and refuses a bad k', async () => {
    const run = await tinyRun();
    expect(thinSnapshots(run, 4).map((s) => s.index)).toEqual([0, 4]);
    expect(() => thinSnapshots(run, 0)).toThrow(/whole number >= 1/);
  });

  it('the collector refuses records out of order', async () => {
    const run = await tinyRun();
    const c = new RunCollector({ ...run, hovmollerLats: [], probes: [], grid: run.grid, bursts: [] });
    const rec = { day: 1, step: 1, fields: {}, integrals: { day: 1 } as never, hovmoller: [], probeValues: [] };
    c.add(rec);
    expect(() => c.add(rec)).toThrow(/day 1 does not follow day 1/);
  });
});

describe('files written while running', () => {
  it('a file streamed by RunOutputWriter (as pycno run does) reads into the collected run', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    const r = await engine.load(FIXTURE_TEXT, FIXTURE);
    if (!r.ok) throw new Error(r.error.message);
    const info = r.scenario;
    const createdAt = new Date('2032-02-03T04:05:06.000Z');
    const sink = new MemorySink();
    const writer = new RunOutputWriter(
      { ...info, hovmollerRowLats: info.hovmollerRowLats!, command: 'pycno run tiny.json', createdAt },
      sink,
    );
    await writer.begin();
    const c = new RunCollector(info, { createdAt, command: 'pycno run tiny.json' });
    engine.setRecorder(async (rec) => {
      c.add(rec);
      await writer.append(rec);
    });
    engine.start();
    await engine.idle();
    await writer.close();
    const bytes = sink.bytes().slice();
    const collected = c.finish();
    expectSameRun(collected, readRun(bytes));
    expect(Buffer.from(await toNetcdf(collected)).equals(Buffer.from(bytes))).toBe(true);
  });
});

describe('older files', () => {
  it('a saved run exported before map_time (every record with the fields, fill values where no map was kept) reads the same', async () => {
    const run = await tinyRun([], 2);
    const sink = new MemorySink(1 << 16);
    const writer = new RunOutputWriter(runDescription(run), sink);
    await writer.begin();
    const missing = new Float32Array(run.grid.nx * run.grid.ny).fill(NaN);
    const byIndex = new Map(run.snapshots.map((s) => [s.index, s]));
    for (let n = 0; n < run.days.length; n++) await writer.append(runRecord(run, n, byIndex.get(n), missing));
    await writer.close();
    const old = sink.bytes().slice();
    expect(readNetcdf(old, { only: [] }).variables.find((v) => v.name === 'h_anom')!.dimensions).toEqual([
      'time',
      'lat',
      'lon',
    ]);
    expectSameRun(readRun(old, 'old.nc'), run);
  });

  it("a run file of the layout before cell areas and the physics record (no cell_area, probe names not in coordinates, g' and H in their own attributes) reads the same", async () => {
    const run = await tinyRun([], 1);
    const now = await toNetcdf(run);
    // The same file laid out as Pycno wrote it before: no cell_area, no cell_measures, probe
    // series with coordinates "probe_lat probe_lon", probe_name without _Encoding.
    const layout = runOutputFile(runDescription(run));
    layout.variables = layout.variables
      .filter((v) => v.name !== 'cell_area')
      .map((v) => {
        const a = { ...(v.attributes ?? {}) };
        delete a.cell_measures;
        delete a._Encoding;
        if (a.coordinates === 'probe_lat probe_lon probe_name') a.coordinates = 'probe_lat probe_lon';
        return { ...v, attributes: a };
      });
    // Before the run-physics record: dynamics, g' and H in attributes of their own, the rest
    // (beta, rho0, friction, viscosity, R) only in the scenario the file carries.
    const atts = layout.attributes as Record<string, unknown>;
    for (const a of RUN_PHYSICS_ATTRIBUTES) delete atts[a.name];
    Object.assign(atts, {
      pycno_dynamics: run.physics.dynamics,
      pycno_reduced_gravity: run.physics.reducedGravity,
      pycno_layer_thickness: run.physics.layerThickness,
    });
    const f = readNetcdf(now);
    const dims = new Map(f.dimensions.map((d) => [d.name, d]));
    const fixed: Record<string, Float64Array | string> = {};
    const records: Record<string, Float64Array>[] = Array.from({ length: f.numRecords }, () => ({}));
    for (const v of layout.variables) {
      const values = f.variable(v.name).values;
      if (v.dimensions[0] !== 'time') {
        fixed[v.name] = values;
        continue;
      }
      const per = v.dimensions.slice(1).reduce((n, d) => n * dims.get(d)!.length, 1);
      records.forEach((r, n) => (r[v.name] = (values as Float64Array).subarray(n * per, (n + 1) * per)));
    }
    const old = await writeNetcdfToMemory(layout, fixed, records);
    expect(readNetcdf(old).variables.some((v) => v.name === 'cell_area')).toBe(false);
    expectSameRun(readRun(now, 'now.nc'), readRun(old, 'old.nc'));
    expect(readRun(old).probes.map((p) => p.name)).toEqual(['west', 'east-coast']);
  });
});

describe('refusals', () => {
  it('a NetCDF file written by someone else', async () => {
    const other = await writeNetcdfToMemory(
      {
        dimensions: [{ name: 'x', length: 3 }],
        variables: [{ name: 'sst', type: NC_FLOAT, dimensions: ['x'] }],
        attributes: { title: 'not ours' },
      },
      { sst: [1, 2, 3] },
      [],
    );
    expect(() => readRun(other, 'other.nc')).toThrow(
      /^other\.nc: not a Pycno run file: it has no pycno_scenario attribute/,
    );
  });

  it('bytes that are not NetCDF at all', () => {
    expect(() => readRun(new TextEncoder().encode('{"format": "pycno-scenario/1"}'), 'scenario.json')).toThrow(
      /^scenario\.json: not a NetCDF file/,
    );
  });

  it('a truncated run file', async () => {
    const bytes = await toNetcdf(await tinyRun());
    const cut = bytes.slice(0, bytes.length - 5000);
    expect(() => readRun(cut, 'cut.nc')).toThrow(RunFileError);
    expect(() => readRun(cut, 'cut.nc')).toThrow(/^cut\.nc: truncated file/);
    expect(() => readRun(bytes.slice(0, 100), 'head.nc')).toThrow(/^head\.nc: truncated/);
  });

  it('a run file whose scenario text was changed', async () => {
    const bytes = await toNetcdf(await tinyRun());
    // Change one character of the scenario attribute in place ("0.03" -> "0.04"), same length.
    const text = Buffer.from(bytes).toString('latin1');
    const at = text.indexOf('"reducedGravity": 0.03');
    expect(at).toBeGreaterThan(0);
    const changed = bytes.slice();
    changed[at + '"reducedGravity": 0.0'.length] = '4'.charCodeAt(0);
    expect(() => readRun(changed, 'edited.nc')).toThrow(/^edited\.nc: damaged Pycno run file: the scenario's SHA-256/);
  });
});
