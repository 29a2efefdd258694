// The files `pycno run` and `pycno compare` write, opened by the readers our users take them to
// (Debian's netCDF4, xarray, ncdump, CDO; helper in test/support/outside-readers.ts): each must
// open every file without a single warning, decode the time axis to dates, see the probe names
// and the cell areas, and find CF attributes it can use. A reader that is not installed is
// skipped with the Debian package to install; CI installs them all (.ci/run).

import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readNetcdf, type NcFile } from '../../model/io/netcdf-read.ts';
import { FIXTURE } from '../support/engine-fixture.ts';
import {
  CDO_SHOWTIMESTAMP,
  CDO_SINFON,
  NCDUMP_HEADER,
  NETCDF4_READER,
  OUTSIDE_READERS,
  XARRAY_READER,
  missingUdunits,
  udunits,
  type OutsideReader,
} from '../support/outside-readers.ts';

const BIN = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
const OUTPUT_DOC = fileURLToPath(new URL('../../docs/output.md', import.meta.url));

let dir: string;
const path = (kind: Kind) => join(dir, FILES[kind]);

// The fixture has land (a rectangle in the north-west), two Hovmoller rows and two probes. Run B
// changes g' and gives its second probe a name with a non-ASCII letter and a space.
const FILES = { run: 'tiny.nc', restart: 'tiny-restart.nc', 'run B': 'tiny-b.nc', difference: 'tiny-diff.nc' } as const;
type Kind = keyof typeof FILES;
const KINDS = Object.keys(FILES) as Kind[];
const PROBE_NAMES: Record<Kind, string[]> = {
  run: ['west', 'east-coast'],
  'run B': ['west', 'côte est'],
  difference: ['west'],
  restart: [],
};

function pycno(args: string[]): void {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 170_000 });
  if (r.status !== 0) throw new Error(`pycno ${args.join(' ')} failed (${r.status}): ${r.stderr}`);
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'pycno-readers-'));
  copyFileSync(FIXTURE, join(dir, 'tiny.json'));
  pycno(['run', 'tiny.json', '--out', FILES.run, '--restart-out', FILES.restart]);
  pycno([
    'run',
    'tiny.json',
    '--out',
    FILES['run B'],
    '--set',
    'physics.reducedGravity=0.04',
    '--set',
    'probes[1].name="côte est"',
  ]);
  pycno(['compare', FILES.run, FILES['run B'], '--out', FILES.difference]);
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const ours = (kind: Kind): NcFile => readNetcdf(readFileSync(path(kind)));

/** Run a reader on a file, skipping (with the package to install) where it is missing. */
function read(reader: OutsideReader, kind: Kind, ctx: { skip: (cond: boolean, note: string) => void }) {
  const missing = reader.missing();
  ctx.skip(missing !== null, `${reader.name}: ${missing}`);
  const r = reader.read(path(kind));
  expect(r.problems).toEqual([]);
  return r;
}

/** The dates the time axis should decode to: "days since 2000-01-01 00:00:00", whole ms. */
function expectedDates(kind: Kind): string[] {
  const days = ours(kind).variable('time').values as Float64Array;
  return Array.from(days, (d) =>
    new Date(Date.UTC(2000, 0, 1) + Math.round(d * 86_400_000)).toISOString().slice(0, 23),
  );
}

describe.each(OUTSIDE_READERS.map((r) => [r.name, r] as const))('%s', (_name, reader) => {
  it.for(KINDS)('opens the %s file without a warning or any stderr output', (kind, ctx) => {
    read(reader, kind, ctx);
  });
});

describe('what the readers see', () => {
  it.for(['run', 'run B', 'difference'] as const)(
    'netCDF4: the %s file is classic NetCDF with every variable and the probe names as text',
    (kind, ctx) => {
      const got = JSON.parse(read(NETCDF4_READER, kind, ctx).stdout);
      const f = ours(kind);
      expect(got.data_model).toBe('NETCDF3_CLASSIC');
      expect(Object.keys(got.variables)).toEqual(f.variables.map((v) => v.name));
      expect(got.variables.probe_name.text).toEqual(PROBE_NAMES[kind]);
      expect(got.variables.cell_area.attributes.units).toBe('m2');
    },
  );

  it.for(['run', 'run B', 'difference'] as const)(
    'xarray: the %s file decodes times to dates, probe names to text, cell areas and probes to coordinates',
    (kind, ctx) => {
      const got = JSON.parse(read(XARRAY_READER, kind, ctx).stdout);
      expect(got.time_dtype).toBe('datetime64[ns]');
      expect(got.time_iso).toEqual(expectedDates(kind));
      expect(got.time_iso[1]).toBe('2000-01-02T00:00:00.000'); // day 1 of the experiment
      expect(got.probe_name).toEqual(PROBE_NAMES[kind]);
      expect(got.probe_name_dtype).toBe('object');
      for (const c of ['time', 'lat', 'lon', 'cell_area', 'probe_name', 'probe_lat', 'probe_lon', 'hovmoller_lat'])
        expect(got.coords).toContain(c);
      expect(got.cell_measures.h_anom).toBe('area: cell_area');
      expect(got.data_vars).toContain('probe_h_anom');
    },
  );

  it('xarray: the restart file holds the padded state', (ctx) => {
    const got = JSON.parse(read(XARRAY_READER, 'restart', ctx).stdout);
    for (const v of ['u', 'v', 'h', 'du', 'dv', 'dh', 'ocean', 'time', 'steps']) expect(got.data_vars).toContain(v);
    expect(got.time_dtype).toBeUndefined(); // a scalar in seconds, not a time axis
  });

  it.for(['run', 'difference'] as const)(
    'CDO: the %s file has the dates of the run, the fields as variables, cell_area and probe_name as grid and label',
    (kind, ctx) => {
      const dates = read(CDO_SHOWTIMESTAMP, kind, ctx).stdout.trim().split(/\s+/);
      expect(dates).toEqual(expectedDates(kind).map((d) => d.slice(0, 19)));
      // sinfon lists one variable a line: "   3 : unknown  Pycno    v instant ... F32  : h_anom".
      const names = read(CDO_SINFON, kind, ctx)
        .stdout.split('\n')
        .flatMap((l) => /^\s*\d+ : .* : (\S+)\s*$/.exec(l)?.[1] ?? []);
      for (const v of ['h_anom', 'u', 'taux', 'volume', 'hovmoller_h_anom', 'probe_h_anom', 'probe_u'])
        expect(names).toContain(v);
      for (const v of ['cell_area', 'probe_name', 'probe_lat', 'lat', 'time']) expect(names).not.toContain(v);
    },
  );

  it.for([
    ['run', 'tiny'],
    ['restart', 'tiny-restart'],
  ] as const)(
    'docs/output.md: every line of the %s header listing is what ncdump -h prints for the fixture',
    ([kind, cdlName], ctx) => {
      const header = read(NCDUMP_HEADER, kind, ctx).stdout.split('\n');
      const doc = readFileSync(OUTPUT_DOC, 'utf8');
      const block = new RegExp(`\`\`\`\n(netcdf ${cdlName} \\{[\\s\\S]*?)\n\`\`\``).exec(doc);
      expect(block, `the ${kind} header listing in docs/output.md`).not.toBeNull();
      // Lines cut short ("...") and comments added for the reader ("// ...", not ncdump's own
      // "// (7 currently)") are not compared.
      const lines = block![1]
        .split('\n')
        .map((l) => l.replace(/\s+\/\/ (?!\(\d+ currently\)).*$/, ''))
        .filter((l) => l.trim() !== '' && !l.includes('...'));
      expect(lines.length).toBeGreaterThan(kind === 'run' ? 60 : 20);
      for (const l of lines) expect(header, `docs/output.md line: ${l.trim()}`).toContain(l);
    },
  );
});

// --- CF attributes, checked on what the reference library reads -----------------------------

/** Standard names the files use, with the units CF gives them. */
const STANDARD_NAMES: Record<string, { units: string; source: string }> = {
  // CF gives time the units s; a time coordinate takes them with a reference date, and UDUNITS
  // converts such units only to others of the kind.
  time: { units: 'seconds since 1970-01-01 00:00:00', source: 'CF 1.10 section 4.4 (check-values section 8, read)' },
  latitude: { units: 'degrees_north', source: 'CF 1.10 section 4.1 (check-values section 8, read)' },
  longitude: { units: 'degrees_east', source: 'CF 1.10 section 4.2 (check-values section 8, read)' },
  sea_surface_height_above_geoid: { units: 'm', source: 'CF standard name table (check-values section 8, read)' },
  eastward_sea_water_velocity: {
    units: 'm s-1',
    source: 'CF standard name table: name read (check-values section 8), units from memory',
  },
  northward_sea_water_velocity: {
    units: 'm s-1',
    source: 'CF standard name table: name read (check-values section 8), units from memory',
  },
  surface_eastward_sea_water_velocity: { units: 'm s-1', source: 'CF standard name table, from memory' },
  surface_northward_sea_water_velocity: { units: 'm s-1', source: 'CF standard name table, from memory' },
  surface_downward_eastward_stress: {
    units: 'Pa',
    source: 'CF standard name table, from memory (check-values section 8)',
  },
  surface_downward_northward_stress: {
    units: 'Pa',
    source: 'CF standard name table, from memory (check-values section 8)',
  },
  cell_area: { units: 'm2', source: 'CF 1.10 section 7.2 and the standard name table, from memory' },
};
// CF 1.10 section 4.4.2 (check-values section 8, read).
const CALENDARS = [
  'standard',
  'gregorian',
  'proleptic_gregorian',
  'julian',
  'noleap',
  '365_day',
  'all_leap',
  '366_day',
  '360_day',
  'none',
];
// CF 1.10 section 9.5, from memory.
const CF_ROLES = ['timeseries_id', 'profile_id', 'trajectory_id'];

interface PyVariable {
  dtype: string;
  dimensions: string[];
  attributes: Record<string, string | number[]>;
}

describe.each(['run', 'run B', 'difference'] as const)('CF attributes of the %s file', (kind) => {
  let vars: Record<string, PyVariable>;
  let gatts: Record<string, string | number[]>;
  beforeAll(() => {
    if (NETCDF4_READER.missing()) return;
    const r = NETCDF4_READER.read(path(kind));
    expect(r.problems).toEqual([]);
    const got = JSON.parse(r.stdout);
    vars = got.variables;
    gatts = got.attributes;
  });
  const skipUnlessRead = (ctx: { skip: (c: boolean, n: string) => void }) =>
    ctx.skip(NETCDF4_READER.missing() !== null, `netCDF4: ${NETCDF4_READER.missing()}`);
  const text = (a: string | number[] | undefined) => (typeof a === 'string' ? a : undefined);

  it('Conventions names a CF version (CF 1.10 section 2.6.1, check-values section 8)', (ctx) => {
    skipUnlessRead(ctx);
    expect(gatts.Conventions).toMatch(/^CF-1\.\d+$/);
    for (const a of ['title', 'source', 'history', 'comment']) expect(typeof gatts[a]).toBe('string'); // CF 2.6.2
  });

  it('every units string is one UDUNITS-2 reads, and converts to the units of its standard name', (ctx) => {
    skipUnlessRead(ctx);
    const missing = missingUdunits();
    ctx.skip(missing !== null, String(missing));
    // CF 1.10 section 3.1: units must be recognised by UDUNITS (from memory).
    const withUnits = Object.entries(vars).filter(([, v]) => typeof v.attributes.units === 'string');
    expect(withUnits.length).toBeGreaterThan(20);
    const units = [...new Set(withUnits.map(([, v]) => v.attributes.units as string))];
    const named = withUnits.filter(([, v]) => typeof v.attributes.standard_name === 'string');
    const pairs = named.map(
      ([, v]) =>
        [
          v.attributes.units as string,
          STANDARD_NAMES[v.attributes.standard_name as string]?.units ?? 'unknown standard name',
        ] as const,
    );
    const u = udunits([...units, 'no_such_unit'], pairs);
    expect(u.problems).toEqual([]);
    expect(u.parses.no_such_unit).toBe(false); // the check can fail
    expect(units.filter((x) => !u.parses[x])).toEqual([]);
    expect(
      named
        .filter((_, k) => !u.convertible[k])
        .map(([n, v]) => `${n}: ${v.attributes.units} vs ${v.attributes.standard_name}`),
    ).toEqual([]);
  });

  it('standard names are from the CF table (the list above, each with its source)', (ctx) => {
    skipUnlessRead(ctx);
    const names = Object.values(vars).flatMap((v) => text(v.attributes.standard_name) ?? []);
    expect(names).toContain('time');
    expect(names.filter((n) => !(n in STANDARD_NAMES))).toEqual([]);
  });

  it('time: "<unit> since <date>" and a CF calendar (CF 1.10 sections 4.4.1, 4.4.2)', (ctx) => {
    skipUnlessRead(ctx);
    expect(vars.time.attributes.units).toMatch(/^days since \d{4}-\d\d-\d\d( \d\d:\d\d:\d\d)?$/);
    expect(CALENDARS).toContain(vars.time.attributes.calendar);
  });

  it('coordinates, cell_measures, cf_role, flags and fill values point to what is there (CF 1.10 sections 2.5.1, 3.5, 5, 7.2, 9; from memory)', (ctx) => {
    skipUnlessRead(ctx);
    for (const [name, v] of Object.entries(vars)) {
      const where = `${name}`;
      for (const c of (text(v.attributes.coordinates) ?? '').split(' ').filter(Boolean)) {
        expect(vars[c], `${where}: coordinate ${c}`).toBeDefined();
        // An auxiliary coordinate spans some of the variable's dimensions; a char one adds its string length.
        const dims = /S1$/.test(vars[c].dtype) ? vars[c].dimensions.slice(0, -1) : vars[c].dimensions;
        for (const d of dims) expect(v.dimensions, `${where}: coordinate ${c}`).toContain(d);
      }
      const m = text(v.attributes.cell_measures);
      if (m !== undefined) {
        const [, measure, target] = /^(area|volume): (\S+)$/.exec(m) ?? [];
        expect(measure, `${where}: cell_measures = "${m}"`).toBe('area');
        expect(vars[target]?.attributes.standard_name).toBe('cell_area');
        for (const d of vars[target].dimensions) expect(v.dimensions).toContain(d);
      }
      if (v.attributes.cf_role !== undefined) expect(CF_ROLES).toContain(v.attributes.cf_role);
      if (v.attributes.flag_values !== undefined) {
        expect((v.attributes.flag_values as number[]).length).toBe(
          String(v.attributes.flag_meanings).split(' ').length,
        );
      }
      if (v.attributes._FillValue !== undefined) expect(v.dtype).toBe('float32');
    }
    // The probes: one timeseries_id over the probe dimension, named by every probe series.
    const ids = Object.entries(vars).filter(([, v]) => v.attributes.cf_role === 'timeseries_id');
    expect(ids.map(([n]) => n)).toEqual(['probe_name']);
    const series = Object.entries(vars).filter(([, v]) => v.dimensions.join() === 'time,probe');
    expect(series.length).toBeGreaterThan(0);
    for (const [, v] of series) expect(String(v.attributes.coordinates).split(' ')).toContain('probe_name');
    // The gridded fields name the cell areas.
    const gridded = Object.entries(vars).filter(
      ([n, v]) => v.dimensions.join() === 'time,lat,lon' && n !== 'cell_area',
    );
    expect(gridded.length).toBeGreaterThan(0);
    for (const [n, v] of gridded) expect(v.attributes.cell_measures, n).toBe('area: cell_area');
  });
});
