// A run held in memory, typed: what the run library saves, what the comparison and the report
// read, and what a Pycno run NetCDF file holds. readRun() turns the bytes of a run file back into
// a RunData (refusing files that are not Pycno run files, or are damaged, with a message that says
// what and where); toNetcdf() writes a RunData with the command line's own RunOutputWriter, so
// export -> import gives back every value bit for bit.
//
// Field snapshots may be kept for only some output records (the run library saves every k-th).
// Such a run is written with the kept maps on an axis of their own, map_time (the fields are
// (map_time, lat, lon), the series stay complete on time), so the file holds no empty maps. Files
// of an earlier layout, where every record had the field variables and a record without a
// snapshot had them all at the fill value, are still read: such a record is "no snapshot" (an
// ocean cell of a real snapshot is never missing, since a run that makes NaN stops).

import { FIELD_NAMES, type FieldName } from '../diagnostics/fields.ts';
import { EARTH } from '../config.ts';
import { earthBeta } from '../theory.ts';
import type { Integrals } from '../diagnostics/integrals.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import { readNetcdf, NetcdfReadError, type NcFile, type NcReadVariable } from './netcdf-read.ts';
import { MemorySink, NetcdfWriter } from './netcdf-writer.ts';
import { INTEGRAL_VARIABLES, MAP_TIME, runOutputFile, OUTPUT_FILL, PYCNO_VERSION, RunOutputWriter, probeVariableName, type OutputRecord, type RunDescription } from './run-output.ts';
import { sha256Hex } from './sha256.ts';

export type IntegralKey = Exclude<keyof Integrals, 'day'>;

export interface RunGrid {
  nx: number;
  ny: number;
  /** Cell-centre coordinates, degrees. */
  lon: Float64Array;
  lat: Float64Array;
  /** 1 ocean, 0 land, nx * ny from the south-west corner. */
  ocean: Uint8Array;
}

/** Full fields of one output record; nx * ny from the south-west corner, NaN on land. */
export interface RunSnapshot {
  /** Index of the output record (into RunData.days). */
  index: number;
  day: number;
  fields: Partial<Record<FieldName, Float32Array>>;
}

export interface HovmollerSection {
  /** Latitude asked for in the scenario, and the centre latitude of the model row used. */
  requestedLat: number;
  rowLat: number;
  /** h' along the row, days.length * nx values, record after record; NaN on land. */
  values: Float32Array;
}

export interface ProbeSeries {
  name: string;
  lon: number;
  lat: number;
  /** One value per output record for each of the run's fields. */
  series: Partial<Record<FieldName, Float32Array>>;
}

export interface RunData {
  name: string;
  description: string;
  /** The scenario JSON exactly as run (defaults filled in), and its SHA-256. */
  scenarioJson: string;
  scenarioSha256: string;
  /** Program version that made the run. */
  version: string;
  seed: string | number;
  /** When and by what the run was made (the file's history line); null when unknown. */
  createdAt: string | null;
  command: string | null;
  dt: number;
  dynamics: string;
  reducedGravity: number;
  layerThickness: number;
  /** beta of the run (m-1 s-1, the equatorial value for the spherical option): it sets L and the Rossby windows. */
  beta: number;
  grid: RunGrid;
  fields: FieldName[];
  /** One entry per output record: model day and steps taken. */
  days: Float64Array;
  steps: Float64Array;
  integrals: Record<IntegralKey, Float64Array>;
  hovmoller: HovmollerSection[];
  probes: ProbeSeries[];
  /** Snapshots in record order; a subset of the records (maybe all). */
  snapshots: RunSnapshot[];
  bursts: DrawnBurst[];
}

export class RunFileError extends Error {
  override name = 'RunFileError';
}

const INTEGRAL_KEYS = INTEGRAL_VARIABLES.map((v) => v.key as IntegralKey);

// --- from the engine ------------------------------------------------------------------------

/** The parts of a scenario the file header repeats, read from the scenario JSON itself. */
export function scenarioFacts(scenarioJson: string): { seed: string | number; dynamics: string; reducedGravity: number; layerThickness: number; beta: number } {
  let s: { seed?: unknown; physics?: { dynamics?: unknown; reducedGravity?: unknown; layerThickness?: unknown; coriolis?: { kind?: unknown; beta?: unknown } } };
  try {
    s = JSON.parse(scenarioJson);
  } catch (e) {
    throw new RunFileError(`the scenario JSON does not parse: ${(e as Error).message}`);
  }
  const p = s.physics ?? {};
  if (typeof p.reducedGravity !== 'number' || typeof p.layerThickness !== 'number') {
    throw new RunFileError('the scenario JSON has no physics.reducedGravity / physics.layerThickness (expected a scenario with defaults filled in)');
  }
  return {
    seed: typeof s.seed === 'string' || typeof s.seed === 'number' ? s.seed : '',
    dynamics: typeof p.dynamics === 'string' ? p.dynamics : 'linear',
    reducedGravity: p.reducedGravity,
    layerThickness: p.layerThickness,
    // As the scenario resolver sets it: the beta plane's own beta, else 2 Omega / R.
    beta: p.coriolis?.kind !== 'spherical' && typeof p.coriolis?.beta === 'number' ? p.coriolis.beta : earthBeta(EARTH.omega, EARTH.radius),
  };
}

/** What a run is made of before its records: the engine's LoadedScenario has all of it. */
export interface RunSetup {
  name: string;
  description: string;
  scenarioJson: string;
  grid: { nx: number; ny: number; lon: ArrayLike<number>; lat: ArrayLike<number>; ocean: ArrayLike<number> };
  fields: readonly FieldName[];
  hovmollerLats: readonly number[];
  hovmollerRowLats?: readonly number[];
  probes: ReadonlyArray<{ name: string; lon: number; lat: number }>;
  bursts: readonly DrawnBurst[];
  dt: number;
}

/**
 * Collects a run record by record (from Engine.setRecorder, or from frames on the page) into a
 * RunData. Fields are kept for every `snapshotEvery`-th record (the first included); a record
 * with no fields simply has no snapshot.
 */
export class RunCollector {
  private readonly setup: RunSetup;
  private readonly every: number;
  private readonly days: number[] = [];
  private readonly steps: number[] = [];
  private readonly integrals: number[][] = INTEGRAL_KEYS.map(() => []);
  private readonly hov: number[][][];
  private readonly probe: number[][][];
  private readonly snapshots: RunSnapshot[] = [];

  constructor(setup: RunSetup, options: { snapshotEvery?: number; createdAt?: Date; command?: string } = {}) {
    const every = options.snapshotEvery ?? 1;
    if (!Number.isInteger(every) || every < 1) throw new RunFileError(`snapshotEvery must be a whole number >= 1 (got ${every})`);
    this.setup = setup;
    this.every = every;
    this.createdAt = (options.createdAt ?? new Date()).toISOString();
    this.command = options.command ?? `run of ${setup.name}`;
    this.hov = setup.hovmollerLats.map(() => []);
    this.probe = setup.probes.map(() => setup.fields.map(() => []));
  }

  private readonly createdAt: string;
  private readonly command: string;

  get records(): number {
    return this.days.length;
  }

  add(r: OutputRecord): void {
    const n = this.days.length;
    const { nx } = this.setup.grid;
    if (n > 0 && !(r.day > this.days[n - 1])) throw new RunFileError(`record ${n}: day ${r.day} does not follow day ${this.days[n - 1]}`);
    if (r.hovmoller.length !== this.hov.length) throw new RunFileError(`record ${n}: ${r.hovmoller.length} Hovmoller rows, expected ${this.hov.length}`);
    if (r.probeValues.length !== this.probe.length) throw new RunFileError(`record ${n}: ${r.probeValues.length} probes, expected ${this.probe.length}`);
    this.days.push(r.day);
    this.steps.push(r.step);
    INTEGRAL_KEYS.forEach((k, q) => this.integrals[q].push(r.integrals[k]));
    r.hovmoller.forEach((row, h) => {
      if (row.length !== nx) throw new RunFileError(`record ${n}: Hovmoller row ${h} has ${row.length} values, expected ${nx}`);
      this.hov[h].push(Array.from(row));
    });
    r.probeValues.forEach((vals, p) => this.setup.fields.forEach((_, k) => this.probe[p][k].push(vals[k])));
    const hasFields = this.setup.fields.every((f) => r.fields[f] !== undefined);
    if (hasFields && n % this.every === 0) {
      const fields: Partial<Record<FieldName, Float32Array>> = {};
      for (const f of this.setup.fields) fields[f] = Float32Array.from(r.fields[f]!);
      this.snapshots.push({ index: n, day: r.day, fields });
    }
  }

  finish(): RunData {
    const s = this.setup;
    const facts = scenarioFacts(s.scenarioJson);
    const nt = this.days.length;
    const integrals = {} as Record<IntegralKey, Float64Array>;
    INTEGRAL_KEYS.forEach((k, q) => (integrals[k] = Float64Array.from(this.integrals[q])));
    return {
      name: s.name,
      description: s.description,
      scenarioJson: s.scenarioJson,
      scenarioSha256: sha256Hex(s.scenarioJson),
      version: PYCNO_VERSION,
      seed: facts.seed,
      createdAt: this.createdAt,
      command: this.command,
      dt: s.dt,
      dynamics: facts.dynamics,
      reducedGravity: facts.reducedGravity,
      layerThickness: facts.layerThickness,
      beta: facts.beta,
      grid: { nx: s.grid.nx, ny: s.grid.ny, lon: Float64Array.from(s.grid.lon), lat: Float64Array.from(s.grid.lat), ocean: Uint8Array.from(s.grid.ocean) },
      fields: [...s.fields],
      days: Float64Array.from(this.days),
      steps: Float64Array.from(this.steps),
      integrals,
      hovmoller: s.hovmollerLats.map((lat, h) => {
        const values = new Float32Array(nt * s.grid.nx);
        this.hov[h].forEach((row, n) => values.set(row, n * s.grid.nx));
        return { requestedLat: lat, rowLat: s.hovmollerRowLats?.[h] ?? lat, values };
      }),
      probes: s.probes.map((p, q) => {
        const series: Partial<Record<FieldName, Float32Array>> = {};
        s.fields.forEach((f, k) => (series[f] = Float32Array.from(this.probe[q][k])));
        return { name: p.name, lon: p.lon, lat: p.lat, series };
      }),
      snapshots: this.snapshots.slice(),
      bursts: structuredClone([...s.bursts]),
    };
  }
}

// --- helpers for readers of a RunData ----------------------------------------------------------

/** A Hovmoller section in the shape the wave fit takes (rows are views, not copies). */
export function hovmollerData(run: RunData, section: number): { lon: Float64Array; days: Float64Array; rows: Float32Array[] } {
  const h = run.hovmoller[section];
  if (!h) throw new RunFileError(`the run has no Hovmoller section ${section} (it has ${run.hovmoller.length})`);
  const nx = run.grid.nx;
  const rows = Array.from(run.days, (_, n) => h.values.subarray(n * nx, (n + 1) * nx));
  return { lon: run.grid.lon, days: run.days, rows };
}

/** The snapshot of record `index`, or undefined if that record has none. */
export function snapshotAt(run: RunData, index: number): RunSnapshot | undefined {
  return run.snapshots.find((s) => s.index === index);
}

/** Keep every k-th snapshot (by record index, the first included): what the library saves. */
export function thinSnapshots(run: RunData, every: number): RunSnapshot[] {
  if (!Number.isInteger(every) || every < 1) throw new RunFileError(`snapshotEvery must be a whole number >= 1 (got ${every})`);
  return run.snapshots.filter((s) => s.index % every === 0);
}

// --- to NetCDF ------------------------------------------------------------------------------

/** The history line runOutputFile writes: "<ISO date>: <command> (Pycno <version>)". */
const HISTORY = /^(\d{4}-\d\d-\d\dT[0-9:.]+Z): (.*) \(Pycno ([^()]*)\)$/s;

export function runDescription(run: RunData): RunDescription {
  // The version in a file is the writer's; a run made by another version says so in its history.
  const command = run.command ?? `export of ${run.name}`;
  return {
    name: run.name,
    description: run.description,
    scenarioJson: run.scenarioJson,
    grid: run.grid,
    fields: run.fields,
    hovmollerLats: run.hovmoller.map((h) => h.requestedLat),
    hovmollerRowLats: run.hovmoller.map((h) => h.rowLat),
    probes: run.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat })),
    bursts: run.bursts,
    dt: run.dt,
    dynamics: run.dynamics,
    reducedGravity: run.reducedGravity,
    layerThickness: run.layerThickness,
    beta: run.beta,
    command: run.version === PYCNO_VERSION ? command : `${command}; run made by Pycno ${run.version}`,
    createdAt: run.createdAt ? new Date(run.createdAt) : undefined,
  };
}

/** Record n of a run as the writer takes it; fields all missing where there is no snapshot. */
export function runRecord(run: RunData, n: number, snapshot: RunSnapshot | undefined, missing: Float32Array): OutputRecord {
  const nx = run.grid.nx;
  const fields: Partial<Record<FieldName, ArrayLike<number>>> = {};
  for (const f of run.fields) fields[f] = snapshot?.fields[f] ?? missing;
  const integrals = { day: run.days[n] } as Integrals;
  for (const k of INTEGRAL_KEYS) integrals[k] = run.integrals[k][n];
  return {
    day: run.days[n],
    step: run.steps[n],
    fields,
    integrals,
    hovmoller: run.hovmoller.map((h) => h.values.subarray(n * nx, (n + 1) * nx)),
    probeValues: run.probes.map((p) => Float32Array.from(run.fields, (f) => p.series[f]![n])),
  };
}

export interface ExportOptions {
  /**
   * Called as the file grows, with the steps done and the steps in all (one per kept map field
   * and one per record); a returned promise is awaited, so a page can show it and stay responsive.
   */
  progress?: (done: number, total: number) => Promise<void> | void;
}

/** Whether a run's maps are kept for every record (then they are written on time, as pycno run does). */
export function mapsOnEveryRecord(run: RunData): boolean {
  return run.snapshots.length === run.days.length;
}

/**
 * The run as a CF-NetCDF file, written by the command line's writer. A run with maps for every
 * record has them on time; one with fewer has only its kept maps, on their own axis map_time.
 */
export async function toNetcdf(run: RunData, options: ExportOptions = {}): Promise<Uint8Array> {
  checkRun(run);
  const every = mapsOnEveryRecord(run);
  const d = runDescription(run);
  if (!every) d.mapRecords = run.snapshots.length;
  const sink = new MemorySink(1 << 16);
  const writer = new RunOutputWriter(d, sink);
  const total = run.days.length + (every ? 0 : run.fields.length);
  let done = 0;
  const step = async () => {
    done++;
    // Every record would be too often for a callback that yields: about a hundred calls in all.
    if (options.progress && (done === total || done % Math.max(1, Math.floor(total / 100)) === 0)) await options.progress(done, total);
  };
  await writer.begin(every ? undefined : { days: run.snapshots.map((s) => s.day), fields: run.snapshots.map((s) => s.fields), progress: step });
  const missing = new Float32Array(run.grid.nx * run.grid.ny).fill(NaN);
  const byIndex = new Map(run.snapshots.map((s) => [s.index, s]));
  for (let n = 0; n < run.days.length; n++) {
    await writer.append(runRecord(run, n, byIndex.get(n), missing));
    await step();
  }
  await writer.close();
  return sink.bytes().slice();
}

/** Bytes of the file toNetcdf writes for a run when every `snapshotEvery`-th map is kept, without writing it. */
export function netcdfBytes(run: RunData, snapshotEvery = 1): number {
  const kept = thinSnapshots(run, snapshotEvery).length;
  const d = runDescription(run);
  if (kept !== run.days.length) d.mapRecords = kept;
  return new NetcdfWriter(runOutputFile(d), new MemorySink(1)).bytesFor(run.days.length);
}

/** A run kept by an older Pycno lacks the newer (optional) integrals: they are NaN, as when a file is read. */
export function withAllIntegrals(run: RunData): RunData {
  const missing = INTEGRAL_VARIABLES.filter((iv) => iv.optional && !run.integrals[iv.key as IntegralKey]);
  if (missing.length === 0) return run;
  const integrals = { ...run.integrals };
  for (const iv of missing) integrals[iv.key as IntegralKey] = new Float64Array(run.days.length).fill(NaN);
  return { ...run, integrals };
}

/** Sizes and orders agree, so a file written from it can be read back. */
export function checkRun(run: RunData): void {
  const { nx, ny } = run.grid;
  const nt = run.days.length;
  const bad = (what: string) => {
    throw new RunFileError(`run '${run.name}': ${what}`);
  };
  if (nt === 0) bad('no output records');
  if (run.grid.lon.length !== nx || run.grid.lat.length !== ny || run.grid.ocean.length !== nx * ny) bad('grid arrays do not match nx, ny');
  if (run.steps.length !== nt) bad(`steps has ${run.steps.length} values for ${nt} records`);
  for (const k of INTEGRAL_KEYS) if (run.integrals[k].length !== nt) bad(`integral ${k} has ${run.integrals[k].length} values for ${nt} records`);
  run.hovmoller.forEach((h, q) => h.values.length !== nt * nx && bad(`Hovmoller section ${q} has ${h.values.length} values, expected ${nt * nx}`));
  for (const p of run.probes) for (const f of run.fields) if (p.series[f]?.length !== nt) bad(`probe '${p.name}' series ${f} does not have ${nt} values`);
  let last = -1;
  for (const s of run.snapshots) {
    if (!(s.index > last) || s.index >= nt) bad(`snapshot indices must increase within 0..${nt - 1} (found ${s.index} after ${last})`);
    last = s.index;
    for (const f of run.fields) if (s.fields[f]?.length !== nx * ny) bad(`snapshot of record ${s.index} lacks field ${f} of ${nx * ny} values`);
  }
}

// --- from NetCDF ----------------------------------------------------------------------------

/** The variable, if it has the type and dimensions given; RunFileError naming it otherwise. */
function typed(v: NcReadVariable, type: NcReadVariable['type'], dims: readonly string[], where: string): NcReadVariable {
  if (v.type !== type) throw new RunFileError(`${where}: damaged Pycno run file: variable '${v.name}' is ${v.type}; a run file has it as ${type}`);
  if (v.dimensions.join(',') !== dims.join(',')) {
    throw new RunFileError(`${where}: damaged Pycno run file: variable '${v.name}' has dimensions (${v.dimensions.join(', ')}); a run file has it on (${dims.join(', ')})`);
  }
  return v;
}

/** output.fields of a scenario JSON (defaults filled in, as a run file holds it); none when it does not say. */
function declaredFields(scenarioJson: string): FieldName[] {
  try {
    const fields = (JSON.parse(scenarioJson) as { output?: { fields?: unknown } }).output?.fields;
    return Array.isArray(fields) ? fields.filter((x): x is FieldName => typeof x === 'string' && (FIELD_NAMES as readonly string[]).includes(x)) : [];
  } catch {
    return [];
  }
}

function numbers(v: NcReadVariable, where: string): Float64Array {
  if (typeof v.values === 'string') throw new RunFileError(`${where}: variable '${v.name}' is text, expected numbers`);
  return v.values;
}

/** A value read from a float variable, the fill value turned back into NaN. */
function unfill(x: number): number {
  return x === OUTPUT_FILL ? NaN : x;
}

function floats(values: Float64Array, from = 0, to = values.length): Float32Array {
  const out = new Float32Array(to - from);
  for (let k = from; k < to; k++) out[k - from] = unfill(values[k]);
  return out;
}

function textAttribute(f: NcFile, name: string): string | undefined {
  const a = f.attributes[name];
  return a && a.type === 'char' && typeof a.value === 'string' ? a.value : undefined;
}

function numberAttribute(f: NcFile, name: string, where: string): number {
  const a = f.attributes[name];
  if (!a || typeof a.value === 'string' || a.value.length !== 1) throw new RunFileError(`${where}: the global attribute ${name} is missing or not one number`);
  return a.value[0];
}

/**
 * Read a Pycno run file. `label` names the file in messages (e.g. its file name). Throws
 * RunFileError with "<label>: ..." for files that are not NetCDF, not Pycno's, or damaged.
 */
export function readRun(bytes: Uint8Array, label = 'the file'): RunData {
  // The header first (no data), so a file that is not a run is refused before any big read;
  // then the small variables; the fields one at a time, so only one is ever held as doubles.
  const read = (only: readonly string[]): NcFile => {
    try {
      return readNetcdf(bytes, { only });
    } catch (e) {
      if (e instanceof NetcdfReadError) throw new RunFileError(`${label}: ${e.message}`);
      throw e;
    }
  };
  const header = read([]);
  const kind = textAttribute(header, 'pycno_file');
  const scenarioJson = textAttribute(header, 'pycno_scenario');
  if (kind === undefined && scenarioJson === undefined) {
    throw new RunFileError(`${label}: not a Pycno run file: it has no pycno_scenario attribute (a NetCDF file written by another program?)`);
  }
  if (kind !== 'run-output') {
    const what = kind === 'restart' ? 'a Pycno restart file' : kind === 'run-difference' ? 'a Pycno difference file (B minus A)' : `a Pycno file of kind '${kind ?? 'unknown'}'`;
    throw new RunFileError(`${label}: this is ${what}, not a run file`);
  }
  if (scenarioJson === undefined) throw new RunFileError(`${label}: damaged Pycno run file: the pycno_scenario attribute is missing`);
  const isField = (n: string): n is FieldName => (FIELD_NAMES as readonly string[]).includes(n);
  const f = read(header.variables.map((v) => v.name).filter((n) => !isField(n)));
  const where = `${label}`;
  const hash = textAttribute(f, 'pycno_scenario_sha256') ?? '';
  const actual = sha256Hex(scenarioJson);
  if (hash !== actual) {
    throw new RunFileError(`${label}: damaged Pycno run file: the scenario's SHA-256 is ${actual.slice(0, 12)}..., the file says ${hash.slice(0, 12) || '(none)'}...; the scenario text was changed after the run`);
  }
  let facts: ReturnType<typeof scenarioFacts>;
  let name = '';
  let description = '';
  try {
    facts = scenarioFacts(scenarioJson);
    const s = JSON.parse(scenarioJson) as { name?: unknown; description?: unknown };
    name = typeof s.name === 'string' ? s.name : '';
    description = typeof s.description === 'string' ? s.description : '';
  } catch (e) {
    throw new RunFileError(`${label}: damaged Pycno run file: ${(e as Error).message}`);
  }
  let bursts: DrawnBurst[];
  try {
    bursts = JSON.parse(textAttribute(f, 'pycno_bursts') ?? '[]');
    if (!Array.isArray(bursts)) throw new Error('not a list');
  } catch (e) {
    throw new RunFileError(`${label}: damaged Pycno run file: the pycno_bursts attribute is not a JSON list: ${(e as Error).message}`);
  }

  const has = (n: string) => f.variables.some((v) => v.name === n);
  // Every variable read must have the type and dimensions Pycno writes it with (run-output.ts):
  // a file with a retyped or reshaped variable is damaged or crafted, and is refused by name.
  const need = (n: string, type: NcReadVariable['type'], dims: readonly string[]): NcReadVariable => {
    if (!has(n)) throw new RunFileError(`${where}: damaged Pycno run file: variable '${n}' is missing`);
    return typed(f.variable(n), type, dims, where);
  };
  const lon = numbers(need('lon', 'double', ['lon']), where);
  const lat = numbers(need('lat', 'double', ['lat']), where);
  const nx = lon.length;
  const ny = lat.length;
  const ocean = Uint8Array.from(numbers(need('ocean', 'byte', ['lat', 'lon']), where));
  if (ocean.length !== nx * ny) throw new RunFileError(`${where}: damaged Pycno run file: 'ocean' has ${ocean.length} values for a ${nx} x ${ny} grid`);
  const days = numbers(need('time', 'double', ['time']), where).slice();
  const nt = days.length;
  if (nt === 0) throw new RunFileError(`${where}: the run file holds no output records`);
  for (let n = 0; n < nt; n++) if (!Number.isFinite(days[n])) throw new RunFileError(`${where}: damaged Pycno run file: variable 'time' has ${days[n]} at record ${n}`);
  for (let n = 1; n < nt; n++) if (!(days[n] > days[n - 1])) throw new RunFileError(`${where}: damaged Pycno run file: variable 'time' does not increase: time ${n} (${days[n]}) does not follow time ${n - 1} (${days[n - 1]})`);
  const steps = numbers(need('step', 'double', ['time']), where).slice();

  const fields = f.variables.map((v) => v.name).filter(isField);
  if (fields.length === 0) throw new RunFileError(`${where}: damaged Pycno run file: no field variables (${FIELD_NAMES.join(', ')})`);
  // The fields the run's own scenario says it wrote must all be there.
  for (const name of declaredFields(scenarioJson)) {
    if (!fields.includes(name)) throw new RunFileError(`${where}: damaged Pycno run file: variable '${name}' is missing (the run's scenario lists it in output.fields)`);
  }
  if (!ocean.includes(1)) throw new RunFileError(`${where}: damaged Pycno run file: the ocean mask has no ocean cell`);
  const cells = nx * ny;
  // The maps lie on time (every record) or on map_time (the kept maps only).
  const ownAxis = has(MAP_TIME);
  const mapDays = ownAxis ? numbers(need(MAP_TIME, 'double', [MAP_TIME]), where) : days;
  const nm = mapDays.length;
  const mapDim = ownAxis ? MAP_TIME : 'time';
  const fieldValues = fields.map((name) => {
    const v = typed(read([name]).variable(name), 'float', [mapDim, 'lat', 'lon'], where);
    const vals = numbers(v, where);
    if (vals.length !== nm * cells) {
      throw new RunFileError(`${where}: damaged Pycno run file: '${name}' has shape (${v.dimensions.join(', ')}) = ${v.shape.join(' x ')}, expected (${mapDim}, lat, lon)`);
    }
    return floats(vals);
  });
  const snapshots: RunSnapshot[] = [];
  if (ownAxis) {
    // Each kept map belongs to the record of the same day (map_time holds those days exactly).
    let n = 0;
    for (let q = 0; q < nm; q++) {
      while (n < nt && days[n] < mapDays[q]) n++;
      if (n >= nt || days[n] !== mapDays[q]) throw new RunFileError(`${where}: damaged Pycno run file: map_time ${q} (${mapDays[q]}) is not a time of the run's records (or map_time does not increase)`);
      const fl: Partial<Record<FieldName, Float32Array>> = {};
      fields.forEach((name, f) => (fl[name] = fieldValues[f].slice(q * cells, (q + 1) * cells)));
      snapshots.push({ index: n, day: days[n], fields: fl });
      n++;
    }
  }
  for (let n = 0; n < (ownAxis ? 0 : nt); n++) {
    // A record without a snapshot has every field missing (see the note at the top).
    const present = fieldValues.map((vals) => {
      for (let k = 0; k < cells; k++) if (ocean[k] && !Number.isNaN(vals[n * cells + k])) return true;
      return false;
    });
    if (present.every((p) => !p)) continue;
    const fl: Partial<Record<FieldName, Float32Array>> = {};
    fields.forEach((name, q) => {
      if (!present[q]) throw new RunFileError(`${where}: damaged Pycno run file: record ${n} (day ${days[n]}) has some fields but not '${name}'`);
      fl[name] = fieldValues[q].slice(n * cells, (n + 1) * cells);
    });
    snapshots.push({ index: n, day: days[n], fields: fl });
  }

  const integrals = {} as Record<IntegralKey, Float64Array>;
  for (const iv of INTEGRAL_VARIABLES) {
    if (iv.optional && !has(iv.name)) {
      integrals[iv.key as IntegralKey] = new Float64Array(nt).fill(NaN); // written by an older Pycno
      continue;
    }
    const vals = numbers(need(iv.name, 'double', ['time']), where);
    if (vals.length !== nt) throw new RunFileError(`${where}: damaged Pycno run file: '${iv.name}' has ${vals.length} values for ${nt} times`);
    integrals[iv.key as IntegralKey] = vals.slice();
  }

  const hovmoller: HovmollerSection[] = [];
  const requested = f.attributes.pycno_hovmoller_requested_lat;
  if (has('hovmoller_lat')) {
    const rowLats = numbers(need('hovmoller_lat', 'double', ['hovmoller']), where);
    const req = requested && typeof requested.value !== 'string' ? requested.value : rowLats;
    const hv = numbers(need('hovmoller_h_anom', 'float', ['time', 'hovmoller', 'lon']), where);
    const nh = rowLats.length;
    if (hv.length !== nt * nh * nx || req.length !== nh) throw new RunFileError(`${where}: damaged Pycno run file: 'hovmoller_h_anom' does not match ${nt} times x ${nh} sections x ${nx} longitudes`);
    for (let h = 0; h < nh; h++) {
      const values = new Float32Array(nt * nx);
      for (let n = 0; n < nt; n++) values.set(floats(hv, (n * nh + h) * nx, (n * nh + h + 1) * nx), n * nx);
      hovmoller.push({ requestedLat: req[h], rowLat: rowLats[h], values });
    }
  }

  const probes: ProbeSeries[] = [];
  if (has('probe_name')) {
    const pv = need('probe_name', 'char', ['probe', 'probe_name_length']);
    const np = pv.shape[0];
    const width = pv.shape[1];
    const plon = numbers(need('probe_lon', 'double', ['probe']), where);
    const plat = numbers(need('probe_lat', 'double', ['probe']), where);
    if (plon.length !== np || plat.length !== np) throw new RunFileError(`${where}: damaged Pycno run file: 'probe_lon' and 'probe_lat' do not have ${np} values`);
    const names = probeNames(pv, np, width);
    const series = fields.map((name) => {
      const vals = numbers(need(probeVariableName(name), 'float', ['time', 'probe']), where);
      if (vals.length !== nt * np) throw new RunFileError(`${where}: damaged Pycno run file: '${probeVariableName(name)}' has ${vals.length} values for ${nt} times x ${np} probes`);
      return vals;
    });
    for (let p = 0; p < np; p++) {
      const s: Partial<Record<FieldName, Float32Array>> = {};
      fields.forEach((name, q) => {
        const out = new Float32Array(nt);
        for (let n = 0; n < nt; n++) out[n] = unfill(series[q][n * np + p]);
        s[name] = out;
      });
      probes.push({ name: names[p], lon: plon[p], lat: plat[p], series: s });
    }
  }

  const history = textAttribute(f, 'history') ?? '';
  const m = HISTORY.exec(history);
  return {
    name: textAttribute(f, 'title') ?? name,
    description: description,
    scenarioJson,
    scenarioSha256: actual,
    version: textAttribute(f, 'pycno_version') ?? 'unknown',
    seed: facts.seed,
    createdAt: m ? m[1] : null,
    command: m ? m[2] : null,
    dt: numberAttribute(f, 'pycno_time_step_seconds', where),
    dynamics: textAttribute(f, 'pycno_dynamics') ?? facts.dynamics,
    reducedGravity: numberAttribute(f, 'pycno_reduced_gravity', where),
    layerThickness: numberAttribute(f, 'pycno_layer_thickness', where),
    // Files before pycno_beta: the scenario they carry says it.
    beta: f.attributes.pycno_beta === undefined ? facts.beta : numberAttribute(f, 'pycno_beta', where),
    grid: { nx, ny, lon: lon.slice(), lat: lat.slice(), ocean },
    fields,
    days,
    steps,
    integrals,
    hovmoller,
    probes,
    snapshots,
    bursts,
  };
}

/**
 * Probe names: the reader gives the char variable as one UTF-8 text with trailing nulls dropped;
 * names are cut from its bytes at the fixed width (each is padded with nulls to the width).
 */
function probeNames(v: NcReadVariable, np: number, width: number): string[] {
  if (typeof v.values !== 'string') throw new RunFileError(`'probe_name' is not text`);
  // Re-encode to bytes so the width counts bytes, as written (UTF-8 names).
  const enc = new TextEncoder().encode(v.values);
  const full = new Uint8Array(np * width);
  full.set(enc.subarray(0, full.length));
  const dec = new TextDecoder('utf-8');
  const out: string[] = [];
  for (let p = 0; p < np; p++) {
    const b = full.subarray(p * width, (p + 1) * width);
    let end = b.length;
    while (end > 0 && b[end - 1] === 0) end--;
    out.push(dec.decode(b.subarray(0, end)));
  }
  return out;
}
