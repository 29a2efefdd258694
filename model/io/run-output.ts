// The NetCDF file of a run (CF-1.10 metadata, classic or 64-bit-offset format): one record per
// output interval with the centred fields, the basin integrals, the Hovmoller rows and the probe
// series, plus everything needed to repeat the run (scenario JSON, its hash, the drawn bursts,
// the program version). Records are appended as the run goes; the writer updates the record count
// after each one, so a run that is killed leaves a valid file of the records done.
// docs/output.md shows the layout as ncdump prints it.

import type { FieldName } from '../diagnostics/fields.ts';
import { FIELD_INFO } from '../diagnostics/fields.ts';
import type { Integrals } from '../diagnostics/integrals.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import { EARTH } from '../config.ts';
import {
  NC_BYTE,
  NC_CHAR,
  NC_DOUBLE,
  NC_FILL_FLOAT,
  NC_FLOAT,
  utf8Bytes,
  type NcFileInput,
  type NcVariableInput,
} from './netcdf-format.ts';
import { NetcdfWriter, type ByteSink, type NcRecordInput } from './netcdf-writer.ts';
import type { RunPhysics } from '../run-physics.ts';
import { runPhysicsAttributes } from './run-physics-file.ts';
import { sha256Hex } from './sha256.ts';

/** The program version written into files; test/engine checks it against package.json. */
export const PYCNO_VERSION = '0.1.0';

/**
 * Model day 0 is labelled with this date. The experiments are idealised (no real year), but a
 * real calendar lets xarray, CDO and Panoply decode the axis without warnings, which calendar
 * "none" does not; see docs/output.md.
 */
export const TIME_UNITS = 'days since 2000-01-01 00:00:00';
export const TIME_CALENDAR = 'proleptic_gregorian';

/** Land cells in float variables. */
export const OUTPUT_FILL = NC_FILL_FLOAT;

export const IDEALISED_NOTE =
  'Idealised experiment of a reduced-gravity (1.5-layer) model of the upper tropical ocean on an equatorial beta plane; not a forecast or a reanalysis.';

/**
 * The integrals written per record, with their units and descriptions. `since` marks variables
 * newer than the first files (optional): a reader fills NaN where an older file lacks them.
 */
export const INTEGRAL_VARIABLES: ReadonlyArray<{
  name: string;
  key: keyof Integrals;
  units: string;
  longName: string;
  optional?: true;
}> = [
  { name: 'volume', key: 'volume', units: 'm3', longName: 'upper-layer volume' },
  { name: 'volume_anomaly', key: 'volumeAnomaly', units: 'm3', longName: 'volume of the thickness anomaly' },
  {
    name: 'sponge_volume',
    key: 'spongeVolume',
    units: 'm3',
    longName: 'layer volume the sponge bands added (positive) or took out (negative) since the experiment started',
    optional: true,
  },
  {
    name: 'entrained_volume',
    key: 'entrainedVolume',
    units: 'm3',
    longName: 'layer volume entrainment added since the experiment started (nonlinear mode)',
    optional: true,
  },
  { name: 'kinetic_energy', key: 'kinetic', units: 'J', longName: 'kinetic energy of the layer' },
  { name: 'potential_energy', key: 'potential', units: 'J', longName: 'available potential energy' },
  { name: 'energy', key: 'energy', units: 'J', longName: 'total energy (kinetic + available potential)' },
  { name: 'min_thickness', key: 'minThickness', units: 'm', longName: 'thinnest upper layer' },
  { name: 'max_speed', key: 'maxSpeed', units: 'm s-1', longName: 'largest layer-mean speed at cell centres' },
  {
    name: 'courant',
    key: 'courant',
    units: '1',
    longName:
      'Courant number of the scheme: gravity waves at rest depth (linear mode), gravity waves plus flow (nonlinear mode)',
  },
];

/** What the file describes; a subset of what the engine knows after loading a scenario. */
export interface RunDescription {
  name: string;
  description: string;
  /** The scenario JSON as run (defaults filled in). */
  scenarioJson: string;
  /** Scenario file name as given, for the history line. */
  scenarioFile?: string;
  grid: { nx: number; ny: number; lon: ArrayLike<number>; lat: ArrayLike<number>; ocean: ArrayLike<number> };
  fields: readonly FieldName[];
  /** Requested Hovmoller latitudes and the centre latitudes of the rows used. */
  hovmollerLats: readonly number[];
  hovmollerRowLats: readonly number[];
  probes: ReadonlyArray<{ name: string; lon: number; lat: number }>;
  bursts: readonly DrawnBurst[];
  dt: number;
  /** The run's physics record, written as the pycno_physics_* attributes (run-physics-file.ts). */
  physics: RunPhysics;
  /** The command or action that made the file (history attribute), and when. */
  command?: string;
  createdAt?: Date;
  /**
   * Maps kept for only some records (a saved run of the page's library): their number. The maps
   * then lie on an axis of their own, map_time, and the fields are (map_time, lat, lon); absent
   * when every record has its maps (the fields are then (time, lat, lon), as pycno run writes).
   */
  mapRecords?: number;
}

/** The second time axis of a file whose maps are kept for only some records. */
export const MAP_TIME = 'map_time';

/** One output interval. Field arrays are nx * ny from the south-west corner, NaN on land. */
export interface OutputRecord {
  day: number;
  step: number;
  fields: Partial<Record<FieldName, ArrayLike<number>>>;
  integrals: Integrals;
  /** h' along each Hovmoller row (nx values each). */
  hovmoller: ArrayLike<number>[];
  /** probeValues[p][k] = field k (in RunDescription.fields order) at probe p. */
  probeValues: ArrayLike<number>[];
}

export function probeVariableName(field: FieldName): string {
  return `probe_${field}`;
}

/**
 * The cell size in degrees: the spacing of the cell centres (what every writer of a run has, so
 * the command line and the page's export give the same bits); a one-cell axis takes the basin's
 * extent from the scenario (that one cell is the basin).
 */
export function cellSizeDegrees(d: Pick<RunDescription, 'grid' | 'scenarioJson'>): { dLon: number; dLat: number } {
  const basin = () => {
    try {
      return (JSON.parse(d.scenarioJson) as { basin?: Record<string, unknown> }).basin ?? {};
    } catch {
      return {};
    }
  };
  const axis = (centres: ArrayLike<number>, low: string, high: string, what: string): number => {
    const n = centres.length;
    if (n > 1) return (centres[n - 1] - centres[0]) / (n - 1);
    const b = basin();
    const extent =
      typeof b[high] === 'number' && typeof b[low] === 'number' ? (b[high] as number) - (b[low] as number) : NaN;
    if (!(extent > 0))
      throw new Error(`run file: the ${what} of a one-cell grid is unknown (no basin.${low}/${high} in the scenario)`);
    return extent;
  };
  const g = d.grid;
  return {
    dLon: axis(g.lon, 'lonWest', 'lonEast', 'cell width'),
    dLat: axis(g.lat, 'latSouth', 'latNorth', 'cell height'),
  };
}

/**
 * Area of every cell, m2: dx dy with dx = R dLon and dy = R dLat in radians, the distances of
 * the equatorial beta plane (no cos(lat) factor, as in model/grid.ts), so all cells are equal.
 */
export function cellAreaSquareMetres(d: Pick<RunDescription, 'grid' | 'scenarioJson'>): number {
  const { dLon, dLat } = cellSizeDegrees(d);
  const mPerDeg = (EARTH.radius * Math.PI) / 180;
  return dLon * mPerDeg * (dLat * mPerDeg);
}

export const CELL_AREA_COMMENT = `beta-plane cell area dx dy: distances are the Earth radius times radians (dx = R dlon, dy = R dlat, no cos(lat) factor), so every cell has the same area; R = ${EARTH.radius} m (IUGG mean radius R1)`;

/** The record axis, model time in days since the experiment's start (run files and sweep summaries). */
export function timeVariable(): NcVariableInput {
  return {
    name: 'time',
    type: NC_DOUBLE,
    dimensions: ['time'],
    attributes: {
      standard_name: 'time',
      long_name: 'model time',
      units: TIME_UNITS,
      calendar: TIME_CALENDAR,
      axis: 'T',
      comment: 'day 0 is the start of the experiment; the date is a label for analysis tools, not a real date',
    },
  };
}

/**
 * The grid's fixed variables (cell-centre lat and lon, the ocean mask, the cell areas), the same
 * in run files and sweep summaries; fresh objects each call.
 */
export function gridVariables(): NcVariableInput[] {
  return [
    {
      name: 'lat',
      type: NC_DOUBLE,
      dimensions: ['lat'],
      attributes: {
        standard_name: 'latitude',
        long_name: 'latitude of cell centres',
        units: 'degrees_north',
        axis: 'Y',
      },
    },
    {
      name: 'lon',
      type: NC_DOUBLE,
      dimensions: ['lon'],
      attributes: {
        standard_name: 'longitude',
        long_name: 'longitude of cell centres',
        units: 'degrees_east',
        axis: 'X',
      },
    },
    {
      name: 'ocean',
      type: NC_BYTE,
      dimensions: ['lat', 'lon'],
      attributes: {
        long_name: 'ocean (1) or land (0)',
        flag_values: { type: NC_BYTE, values: [0, 1] },
        flag_meanings: 'land ocean',
      },
    },
    {
      name: 'cell_area',
      type: NC_DOUBLE,
      dimensions: ['lat', 'lon'],
      attributes: {
        standard_name: 'cell_area',
        long_name: 'area of the grid cell',
        units: 'm2',
        comment: CELL_AREA_COMMENT,
      },
    },
  ];
}

/** The NetCDF layout (dimensions, variables, attributes) of a run's file. */
export function runOutputFile(d: RunDescription): NcFileInput {
  const created = d.createdAt ?? new Date();
  const floatAtts = (units: string, longName: string, standardName?: string) => {
    const a: Record<string, string | { type: typeof NC_FLOAT; values: number }> = { long_name: longName, units };
    if (standardName) a.standard_name = standardName;
    a._FillValue = { type: NC_FLOAT, values: OUTPUT_FILL };
    return a;
  };
  const dimensions: NcFileInput['dimensions'][number][] = [
    { name: 'time', length: 'unlimited' },
    { name: 'lat', length: d.grid.ny },
    { name: 'lon', length: d.grid.nx },
  ];
  const ownMapAxis = d.mapRecords !== undefined;
  if (ownMapAxis) dimensions.push({ name: MAP_TIME, length: d.mapRecords! });
  const variables: NcVariableInput[] = [
    timeVariable(),
    ...gridVariables(),
    {
      name: 'step',
      type: NC_DOUBLE,
      dimensions: ['time'],
      attributes: { long_name: 'model time steps taken', units: '1' },
    },
  ];
  if (ownMapAxis) {
    variables.push({
      name: MAP_TIME,
      type: NC_DOUBLE,
      dimensions: [MAP_TIME],
      attributes: {
        standard_name: 'time',
        long_name: 'model time of the kept maps',
        units: TIME_UNITS,
        calendar: TIME_CALENDAR,
        comment:
          'the maps (fields on lat and lon) were kept for these output times only; the series on time are complete',
      },
    });
  }
  for (const f of d.fields) {
    const info = FIELD_INFO[f];
    variables.push({
      name: f,
      type: NC_FLOAT,
      dimensions: [ownMapAxis ? MAP_TIME : 'time', 'lat', 'lon'],
      attributes: { ...floatAtts(info.units, info.longName, info.standardName), cell_measures: 'area: cell_area' },
    });
  }
  for (const iv of INTEGRAL_VARIABLES) {
    variables.push({
      name: iv.name,
      type: NC_DOUBLE,
      dimensions: ['time'],
      attributes: { long_name: iv.longName, units: iv.units },
    });
  }
  if (d.hovmollerLats.length > 0) {
    dimensions.push({ name: 'hovmoller', length: d.hovmollerLats.length });
    variables.push({
      name: 'hovmoller_lat',
      type: NC_DOUBLE,
      dimensions: ['hovmoller'],
      attributes: {
        standard_name: 'latitude',
        long_name: 'centre latitude of the model row of each Hovmoller section',
        units: 'degrees_north',
      },
    });
    variables.push({
      name: 'hovmoller_h_anom',
      type: NC_FLOAT,
      dimensions: ['time', 'hovmoller', 'lon'],
      attributes: {
        ...floatAtts('m', `${FIELD_INFO.h_anom.longName} along the Hovmoller rows`),
        coordinates: 'hovmoller_lat',
      },
    });
  }
  if (d.probes.length > 0) {
    const strlen = Math.max(1, ...d.probes.map((p) => utf8Bytes(p.name).length));
    dimensions.push({ name: 'probe', length: d.probes.length }, { name: 'probe_name_length', length: strlen });
    // The probes are a CF discrete-sampling-geometry collection of time series in the orthogonal
    // multidimensional layout (probe_<field>(time, probe)); probe_name is the timeseries_id. It
    // is listed in the series' coordinates: CDO then takes it as a label and does not warn that
    // it skips a char variable. _Encoding lets netCDF4-python and xarray give the names as text.
    variables.push(
      {
        name: 'probe_name',
        type: NC_CHAR,
        dimensions: ['probe', 'probe_name_length'],
        attributes: { long_name: 'probe name', cf_role: 'timeseries_id', _Encoding: 'utf-8' },
      },
      {
        name: 'probe_lon',
        type: NC_DOUBLE,
        dimensions: ['probe'],
        attributes: { standard_name: 'longitude', long_name: 'probe longitude as given', units: 'degrees_east' },
      },
      {
        name: 'probe_lat',
        type: NC_DOUBLE,
        dimensions: ['probe'],
        attributes: { standard_name: 'latitude', long_name: 'probe latitude as given', units: 'degrees_north' },
      },
    );
    for (const f of d.fields) {
      const info = FIELD_INFO[f];
      variables.push({
        name: probeVariableName(f),
        type: NC_FLOAT,
        dimensions: ['time', 'probe'],
        attributes: {
          ...floatAtts(info.units, `${info.longName} in the model cell holding the probe`, info.standardName),
          coordinates: 'probe_lat probe_lon probe_name',
        },
      });
    }
  }
  const command = d.command ?? `run of ${d.scenarioFile ?? d.name}`;
  return {
    version: 'auto',
    dimensions,
    variables,
    attributes: {
      Conventions: 'CF-1.10',
      title: d.name,
      summary: d.description || d.name,
      source: `Pycno ${PYCNO_VERSION}, reduced-gravity equatorial ocean model`,
      history: `${created.toISOString()}: ${command} (Pycno ${PYCNO_VERSION})`,
      comment: IDEALISED_NOTE,
      pycno_file: 'run-output',
      pycno_version: PYCNO_VERSION,
      pycno_scenario: d.scenarioJson,
      pycno_scenario_sha256: sha256Hex(d.scenarioJson),
      pycno_bursts: JSON.stringify(d.bursts),
      pycno_time_step_seconds: d.dt,
      ...runPhysicsAttributes(d.physics),
      pycno_hovmoller_requested_lat: d.hovmollerLats.length ? [...d.hovmollerLats] : 'none',
    },
  };
}

/** NaN (land, missing) becomes the fill value; a copy, the input is not changed. */
function filled(values: ArrayLike<number>): Float32Array {
  const out = Float32Array.from(values as ArrayLike<number>);
  for (let k = 0; k < out.length; k++) if (Number.isNaN(out[k])) out[k] = OUTPUT_FILL;
  return out;
}

function concat(rows: ArrayLike<number>[], width: number): Float32Array {
  const out = new Float32Array(rows.length * width);
  rows.forEach((r, k) => out.set(filled(r), k * width));
  return out;
}

/**
 * The non-record variables of a file laid out by runOutputFile(d): coordinates, mask, cell
 * areas, Hovmoller row latitudes and the probe table. For the run writer and the difference file.
 */
export async function writeRunFixed(writer: NetcdfWriter, d: RunDescription): Promise<void> {
  await writer.writeFixed('lat', d.grid.lat);
  await writer.writeFixed('lon', d.grid.lon);
  await writer.writeFixed('ocean', d.grid.ocean);
  await writer.writeFixed('cell_area', new Float64Array(d.grid.nx * d.grid.ny).fill(cellAreaSquareMetres(d)));
  if (d.hovmollerLats.length > 0) await writer.writeFixed('hovmoller_lat', d.hovmollerRowLats);
  if (d.probes.length > 0) {
    const strlen = Math.max(1, ...d.probes.map((p) => utf8Bytes(p.name).length));
    const names = new Uint8Array(d.probes.length * strlen);
    d.probes.forEach((p, k) => names.set(utf8Bytes(p.name), k * strlen));
    await writer.writeFixed('probe_name', names);
    await writer.writeFixed(
      'probe_lon',
      d.probes.map((p) => p.lon),
    );
    await writer.writeFixed(
      'probe_lat',
      d.probes.map((p) => p.lat),
    );
  }
}

/** Streams a run into a ByteSink: begin(), then append() per output interval, then close(). */
export class RunOutputWriter {
  private readonly writer: NetcdfWriter;
  private readonly d: RunDescription;

  constructor(d: RunDescription, sink: ByteSink) {
    this.d = d;
    // The header last (after the coordinates and the mask): a run killed while it starts leaves
    // a file that is not yet NetCDF, never a header without its data.
    this.writer = new NetcdfWriter(runOutputFile(d), sink, { headerLast: true });
  }

  get records(): number {
    return this.writer.numRecords;
  }

  /** Bytes of the file once the records so far are in. */
  get byteLength(): number {
    return this.writer.byteLength;
  }

  /** Bytes of the file with `records` records. */
  bytesFor(records: number): number {
    return this.writer.bytesFor(records);
  }

  /**
   * Header and the fixed variables (coordinates, mask, cell areas, probe table, and the kept maps
   * of a file with its own map axis); the header goes in last.
   */
  async begin(maps?: {
    days: ArrayLike<number>;
    fields: ReadonlyArray<Partial<Record<FieldName, ArrayLike<number>>>>;
    progress?: () => Promise<void> | void;
  }): Promise<void> {
    await this.writer.writeHeader();
    await writeRunFixed(this.writer, this.d);
    if (maps) await this.writeMaps(maps.days, maps.fields, maps.progress);
    await this.writer.finishFixed();
  }

  /** The kept maps of a file with its own map axis (d.mapRecords): their days and fields, in order. */
  async writeMaps(
    days: ArrayLike<number>,
    maps: ReadonlyArray<Partial<Record<FieldName, ArrayLike<number>>>>,
    progress?: () => Promise<void> | void,
  ): Promise<void> {
    const { d } = this;
    if (d.mapRecords === undefined || maps.length !== d.mapRecords)
      throw new Error(`run file: ${maps.length} maps for a layout of ${d.mapRecords ?? 'no'} map records`);
    await this.writer.writeFixed(MAP_TIME, days);
    const cells = d.grid.nx * d.grid.ny;
    for (const f of d.fields) {
      const all = new Float32Array(maps.length * cells);
      maps.forEach((m, n) => {
        const v = m[f];
        if (!v) throw new Error(`kept map ${n} (day ${days[n]}): field ${f} is missing`);
        all.set(filled(v), n * cells);
      });
      await this.writer.writeFixed(f, all);
      await progress?.();
    }
  }

  async append(r: OutputRecord): Promise<void> {
    const { d } = this;
    const values: Record<string, ArrayLike<number> | number> = { time: r.day, step: r.step };
    if (d.mapRecords === undefined) {
      for (const f of d.fields) {
        const v = r.fields[f];
        if (!v) throw new Error(`output record for day ${r.day}: field ${f} is missing`);
        values[f] = filled(v);
      }
    }
    for (const iv of INTEGRAL_VARIABLES) values[iv.name] = r.integrals[iv.key];
    if (d.hovmollerLats.length > 0) values.hovmoller_h_anom = concat(r.hovmoller, d.grid.nx);
    if (d.probes.length > 0) {
      d.fields.forEach((f, k) => {
        values[probeVariableName(f)] = filled(r.probeValues.map((p) => p[k]));
      });
    }
    await this.writer.appendRecord(values as NcRecordInput);
  }

  async close(): Promise<void> {
    await this.writer.close();
  }
}
