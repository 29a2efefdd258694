import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { NetCDFReader } from 'netcdfjs';
import { describe, expect, it } from 'vitest';
import { FIELD_INFO } from '../../model/diagnostics/fields.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { MemorySink } from '../../model/io/netcdf-writer.ts';
import {
  INTEGRAL_VARIABLES,
  OUTPUT_FILL,
  PYCNO_VERSION,
  RunOutputWriter,
  TIME_UNITS,
  cellSizeDegrees,
  type OutputRecord,
  type RunDescription,
} from '../../model/io/run-output.ts';
import { sha256Hex } from '../../model/io/sha256.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';

/** Run the fixture through the engine into memory; keep every record for comparison. */
async function writeRun(sets: string[] = []) {
  const engine = new Engine({ host: fakeHost(2) });
  const r = await engine.load(FIXTURE_TEXT, FIXTURE, { sets });
  if (!r.ok) throw new Error(r.error.message);
  const info = r.scenario;
  const d: RunDescription = {
    name: info.name,
    description: info.description,
    scenarioJson: info.scenarioJson,
    scenarioFile: 'engine-tiny.json',
    grid: info.grid,
    fields: info.fields,
    hovmollerLats: info.hovmollerLats,
    hovmollerRowLats: info.hovmollerRowLats!,
    probes: info.probes,
    bursts: info.bursts,
    dt: info.dt,
    physics: info.physics,
    createdAt: new Date('2030-01-02T03:04:05Z'),
  };
  const sink = new MemorySink();
  const writer = new RunOutputWriter(d, sink);
  await writer.begin();
  const records: OutputRecord[] = [];
  engine.setRecorder(async (rec) => {
    records.push(structuredClone(rec));
    await writer.append(rec);
  });
  engine.start();
  await engine.idle();
  await writer.close();
  return { info, d, records, bytes: sink.bytes().slice() };
}

function f32(x: number): number {
  return Number.isNaN(x) ? OUTPUT_FILL : Math.fround(x);
}

describe('run output file', () => {
  it('holds every record, value for value, as read back by netcdfjs', async () => {
    const { info, records, bytes } = await writeRun();
    const f = readNetcdf(bytes);
    const nx = info.grid.nx;
    const ny = info.grid.ny;
    expect(f.numRecords).toBe(records.length);
    expect(records.length).toBe(Math.floor(info.days / info.outputEveryDays) + 1);
    expect(Array.from(f.variable('lon').values as Float64Array)).toEqual(Array.from(info.grid.lon));
    expect(Array.from(f.variable('lat').values as Float64Array)).toEqual(Array.from(info.grid.lat));
    expect(Array.from(f.variable('ocean').values as Float64Array)).toEqual(Array.from(info.grid.ocean));
    expect(Array.from(f.variable('time').values as Float64Array)).toEqual(records.map((r) => r.day));
    expect(Array.from(f.variable('step').values as Float64Array)).toEqual(records.map((r) => r.step));
    for (const name of info.fields) {
      const v = f.variable(name);
      expect(v.dimensions).toEqual(['time', 'lat', 'lon']);
      expect(v.type).toBe('float');
      const expected = records.flatMap((r) => Array.from(r.fields[name]!, f32));
      expect(Array.from(v.values as Float64Array)).toEqual(expected);
    }
    for (const iv of INTEGRAL_VARIABLES) {
      expect(Array.from(f.variable(iv.name).values as Float64Array)).toEqual(records.map((r) => r.integrals[iv.key]));
    }
    const hov = f.variable('hovmoller_h_anom');
    expect(hov.shape).toEqual([records.length, info.hovmollerLats.length, nx]);
    expect(Array.from(hov.values as Float64Array)).toEqual(
      records.flatMap((r) => r.hovmoller.flatMap((row) => Array.from(row, f32))),
    );
    expect(Array.from(f.variable('hovmoller_lat').values as Float64Array)).toEqual(info.hovmollerRowLats);
    const k = info.fields.indexOf('u');
    expect(Array.from(f.variable('probe_u').values as Float64Array)).toEqual(
      records.flatMap((r) => r.probeValues.map((p) => f32(p[k]))),
    );
    // The probe series are the field values in the probe's cell.
    const cell = { i: Math.floor(188.5 - 150), j: Math.floor(0.5 + 10) };
    const last = records.at(-1)!;
    expect(f32(last.probeValues[1][k])).toBe(f32(last.fields.u![cell.j * nx + cell.i]));
    expect(f.variable('probe_name').values).toBe('west' + '\0'.repeat(6) + 'east-coast');
    // Land is the fill value, ocean finite.
    const h = f.variable('h_anom').values as Float64Array;
    const land = info.grid.ocean.indexOf(0);
    expect(h[land]).toBe(OUTPUT_FILL);
    expect(Number.isFinite(h[info.grid.ocean.indexOf(1)])).toBe(true);
    expect(h.length).toBe(records.length * nx * ny);
  });

  it('carries CF metadata and what is needed to repeat the run', async () => {
    const { info, bytes } = await writeRun();
    const f = readNetcdf(bytes);
    const att = (name: string) => f.attributes[name]?.value;
    expect(att('Conventions')).toBe('CF-1.10');
    expect(att('title')).toBe(info.name);
    expect(att('source')).toBe(`Pycno ${PYCNO_VERSION}, reduced-gravity equatorial ocean model`);
    expect(att('history')).toBe(`2030-01-02T03:04:05.000Z: run of engine-tiny.json (Pycno ${PYCNO_VERSION})`);
    expect(String(att('comment'))).toMatch(/^Idealised experiment/);
    expect(att('pycno_scenario')).toBe(info.scenarioJson);
    expect(att('pycno_scenario_sha256')).toBe(createHash('sha256').update(info.scenarioJson).digest('hex'));
    expect(JSON.parse(String(att('pycno_bursts')))).toEqual(info.bursts);
    expect(JSON.parse(info.scenarioJson).physics.reducedGravity).toBe(0.03);
    const time = f.variable('time').attributes;
    expect(time.units.value).toBe(TIME_UNITS);
    expect(time.axis.value).toBe('T');
    expect(time.calendar.value).toBe('proleptic_gregorian');
    expect(f.variable('lat').attributes.units.value).toBe('degrees_north');
    expect(f.variable('lat').attributes.axis.value).toBe('Y');
    expect(f.variable('lon').attributes.standard_name.value).toBe('longitude');
    expect(f.variable('lon').attributes.axis.value).toBe('X');
    for (const name of info.fields) {
      const a = f.variable(name).attributes;
      expect(a.units.value).toBe(FIELD_INFO[name].units);
      expect(a.long_name.value).toBe(FIELD_INFO[name].longName);
      if (FIELD_INFO[name].standardName) expect(a.standard_name.value).toBe(FIELD_INFO[name].standardName);
      else expect(a.standard_name).toBeUndefined();
      expect(a._FillValue.type).toBe('float');
      expect(Array.from(a._FillValue.value as Float64Array)).toEqual([OUTPUT_FILL]);
    }
    expect(f.dimensions.find((d) => d.name === 'time')!.unlimited).toBe(true);
  });

  it('reads the same through netcdfjs directly (no project code in between)', async () => {
    const { records, bytes } = await writeRun();
    const reader = new NetCDFReader(bytes);
    expect(reader.recordDimension.length).toBe(records.length);
    expect(reader.getDataVariable('time')).toEqual(records.map((r) => r.day));
    const h = reader.getDataVariable('h_anom') as number[][];
    expect(h.length).toBe(records.length);
    expect(h[2]).toEqual(Array.from(records[2].fields.h_anom!, f32));
    expect(reader.getAttribute('Conventions')).toBe('CF-1.10');
  });

  it('writes beta-plane cell areas that the fields point to and that add up to the volume', async () => {
    const { info, records, bytes } = await writeRun();
    const f = readNetcdf(bytes);
    const area = f.variable('cell_area');
    expect(area.dimensions).toEqual(['lat', 'lon']);
    // CF 1.10 section 7.2 (cell_measures, standard name cell_area, units m2), from memory.
    expect(area.attributes.standard_name.value).toBe('cell_area');
    expect(area.attributes.units.value).toBe('m2');
    expect(String(area.attributes.comment.value)).toMatch(/no cos\(lat\)/);
    for (const name of info.fields) expect(f.variable(name).attributes.cell_measures.value).toBe('area: cell_area');
    // R = 6,371,008.7714 m, the IUGG mean radius R1 (GRS80, check-values section 6): a 1 x 1
    // degree cell of the beta plane is (R pi / 180)^2.
    const a = area.values as Float64Array;
    const expected = ((6371008.7714 * Math.PI) / 180) ** 2;
    expect(a.length).toBe(info.grid.nx * info.grid.ny);
    for (const x of a) expect(x).toBeCloseTo(expected, 3);
    // The model's own integral: at rest (record 0) the volume is H times the ocean area.
    const oceanArea = a.reduce((s, x, k) => s + (info.grid.ocean[k] ? x : 0), 0);
    expect(records[0].integrals.volumeAnomaly).toBe(0);
    expect(records[0].integrals.volume / (150 * oceanArea)).toBeCloseTo(1, 12);
    expect(f.attributes.pycno_physics_earth_radius.value).toEqual(new Float64Array([6371008.7714]));
  });

  it('cell size: the centre spacing, or (one cell) the basin from the scenario', () => {
    const grid = { nx: 1, ny: 3, lon: [150.25], lat: [-1, 0, 1], ocean: [1, 1, 1] };
    const basin = JSON.stringify({ basin: { lonWest: 150, lonEast: 150.5, latSouth: -1.5, latNorth: 1.5 } });
    expect(cellSizeDegrees({ grid, scenarioJson: basin })).toEqual({ dLon: 0.5, dLat: 1 });
    expect(
      cellSizeDegrees({ grid: { ...grid, nx: 4, lon: [0.125, 0.375, 0.625, 0.875] }, scenarioJson: '{}' }),
    ).toEqual({ dLon: 0.25, dLat: 1 });
    expect(() => cellSizeDegrees({ grid, scenarioJson: '{}' })).toThrow(/cell width of a one-cell grid is unknown/);
  });

  it('labels the probe series as CF time series named by probe_name', async () => {
    const { bytes } = await writeRun();
    const f = readNetcdf(bytes);
    const name = f.variable('probe_name');
    expect(name.attributes.cf_role.value).toBe('timeseries_id');
    expect(name.attributes._Encoding.value).toBe('utf-8');
    for (const v of f.variables.filter((x) => x.dimensions.join() === 'time,probe')) {
      expect(v.attributes.coordinates.value).toBe('probe_lat probe_lon probe_name');
    }
  });

  it('hashes like node:crypto (SHA-256 test vectors and a long text)', () => {
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    const long = 'Kelvin wave ° '.repeat(1000) + FIXTURE_TEXT;
    expect(sha256Hex(long)).toBe(createHash('sha256').update(long).digest('hex'));
    for (const n of [55, 56, 63, 64, 65]) {
      const s = 'x'.repeat(n);
      expect(sha256Hex(s)).toBe(createHash('sha256').update(s).digest('hex'));
    }
  });

  it('writes the version of package.json', () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8'));
    expect(PYCNO_VERSION).toBe(pkg.version);
  });
});
