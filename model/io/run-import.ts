// Reading a Pycno run file back into a RunData: files that are not Pycno run files, or are
// damaged, are refused with a message that says what and where. Kept maps lie on time (every
// record) or on their own axis map_time (run-export.ts). Files of an earlier layout, where a
// record without a map had every field at the fill value, still read: such a record has no
// snapshot (an ocean cell of a real snapshot is never missing, since a run that makes NaN stops).

import { FIELD_NAMES, type FieldName } from '../diagnostics/fields.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import type { RunPhysics } from '../run-physics.ts';
import { readNetcdf, NetcdfReadError, type NcFile, type NcReadVariable } from './netcdf-read.ts';
import {
  RunFileError,
  type HovmollerSection,
  type IntegralKey,
  type ProbeSeries,
  type RunData,
  type RunSnapshot,
} from './run-data.ts';
import { INTEGRAL_VARIABLES, MAP_TIME, OUTPUT_FILL, probeVariableName } from './run-output.ts';
import {
  hasRunPhysics,
  legacyRunPhysics,
  readRunPhysics,
  RunPhysicsError,
  type KeptPhysics,
} from './run-physics-file.ts';
import { sha256Hex } from './sha256.ts';

/** The history line runOutputFile writes: "<ISO date>: <command> (Pycno <version>)". */
const HISTORY = /^(\d{4}-\d\d-\d\dT[0-9:.]+Z): (.*) \(Pycno ([^()]*)\)$/s;

/** The variable, if it has the type and dimensions given; RunFileError naming it otherwise. */
function typed(
  v: NcReadVariable,
  type: NcReadVariable['type'],
  dims: readonly string[],
  where: string,
): NcReadVariable {
  if (v.type !== type)
    throw new RunFileError(
      `${where}: damaged Pycno run file: variable '${v.name}' is ${v.type}; a run file has it as ${type}`,
    );
  if (v.dimensions.join(',') !== dims.join(',')) {
    throw new RunFileError(
      `${where}: damaged Pycno run file: variable '${v.name}' has dimensions (${v.dimensions.join(', ')}); a run file has it on (${dims.join(', ')})`,
    );
  }
  return v;
}

/** output.fields of a scenario JSON (defaults filled in, as a run file holds it); none when it does not say. */
function declaredFields(scenarioJson: string): FieldName[] {
  try {
    const fields = (JSON.parse(scenarioJson) as { output?: { fields?: unknown } }).output?.fields;
    return Array.isArray(fields)
      ? fields.filter((x): x is FieldName => typeof x === 'string' && (FIELD_NAMES as readonly string[]).includes(x))
      : [];
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
  if (!a || typeof a.value === 'string' || a.value.length !== 1)
    throw new RunFileError(`${where}: the global attribute ${name} is missing or not one number`);
  return a.value[0];
}

/** What a file written before the run-physics record kept of the physics, in its own attributes. */
function legacyAttributes(f: NcFile, where: string): KeptPhysics {
  const optional = (name: string) => (f.attributes[name] === undefined ? undefined : numberAttribute(f, name, where));
  return {
    reducedGravity: numberAttribute(f, 'pycno_reduced_gravity', where),
    layerThickness: numberAttribute(f, 'pycno_layer_thickness', where),
    beta: optional('pycno_beta'),
    dynamics: textAttribute(f, 'pycno_dynamics'),
    earthRadius: optional('pycno_earth_radius'),
  };
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
    throw new RunFileError(
      `${label}: not a Pycno run file: it has no pycno_scenario attribute (a NetCDF file written by another program?)`,
    );
  }
  if (kind !== 'run-output') {
    const what =
      kind === 'restart'
        ? 'a Pycno restart file'
        : kind === 'run-difference'
          ? 'a Pycno difference file (B minus A)'
          : `a Pycno file of kind '${kind ?? 'unknown'}'`;
    throw new RunFileError(`${label}: this is ${what}, not a run file`);
  }
  if (scenarioJson === undefined)
    throw new RunFileError(`${label}: damaged Pycno run file: the pycno_scenario attribute is missing`);
  const isField = (n: string): n is FieldName => (FIELD_NAMES as readonly string[]).includes(n);
  const f = read(header.variables.map((v) => v.name).filter((n) => !isField(n)));
  const where = `${label}`;
  const hash = textAttribute(f, 'pycno_scenario_sha256') ?? '';
  const actual = sha256Hex(scenarioJson);
  if (hash !== actual) {
    throw new RunFileError(
      `${label}: damaged Pycno run file: the scenario's SHA-256 is ${actual.slice(0, 12)}..., the file says ${hash.slice(0, 12) || '(none)'}...; the scenario text was changed after the run`,
    );
  }
  // The file keeps its name, description and seed only in the scenario it carries.
  let s: { name?: unknown; description?: unknown; seed?: unknown };
  try {
    s = JSON.parse(scenarioJson);
  } catch (e) {
    throw new RunFileError(
      `${label}: damaged Pycno run file: the scenario JSON does not parse: ${(e as Error).message}`,
    );
  }
  const name = typeof s?.name === 'string' ? s.name : '';
  const description = typeof s?.description === 'string' ? s.description : '';
  const seed = typeof s?.seed === 'string' || typeof s?.seed === 'number' ? s.seed : '';
  let physics: RunPhysics;
  try {
    physics = hasRunPhysics(f.attributes)
      ? readRunPhysics(f.attributes)
      : legacyRunPhysics(legacyAttributes(f, label), scenarioJson);
  } catch (e) {
    if (e instanceof RunPhysicsError) throw new RunFileError(`${label}: damaged Pycno run file: ${e.message}`);
    throw e;
  }
  let bursts: DrawnBurst[];
  try {
    bursts = JSON.parse(textAttribute(f, 'pycno_bursts') ?? '[]');
    if (!Array.isArray(bursts)) throw new Error('not a list');
  } catch (e) {
    throw new RunFileError(
      `${label}: damaged Pycno run file: the pycno_bursts attribute is not a JSON list: ${(e as Error).message}`,
    );
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
  if (ocean.length !== nx * ny)
    throw new RunFileError(
      `${where}: damaged Pycno run file: 'ocean' has ${ocean.length} values for a ${nx} x ${ny} grid`,
    );
  const days = numbers(need('time', 'double', ['time']), where).slice();
  const nt = days.length;
  if (nt === 0) throw new RunFileError(`${where}: the run file holds no output records`);
  for (let n = 0; n < nt; n++)
    if (!Number.isFinite(days[n]))
      throw new RunFileError(`${where}: damaged Pycno run file: variable 'time' has ${days[n]} at record ${n}`);
  for (let n = 1; n < nt; n++)
    if (!(days[n] > days[n - 1]))
      throw new RunFileError(
        `${where}: damaged Pycno run file: variable 'time' does not increase: time ${n} (${days[n]}) does not follow time ${n - 1} (${days[n - 1]})`,
      );
  const steps = numbers(need('step', 'double', ['time']), where).slice();

  const fields = f.variables.map((v) => v.name).filter(isField);
  if (fields.length === 0)
    throw new RunFileError(`${where}: damaged Pycno run file: no field variables (${FIELD_NAMES.join(', ')})`);
  // The fields the run's own scenario says it wrote must all be there.
  for (const name of declaredFields(scenarioJson)) {
    if (!fields.includes(name))
      throw new RunFileError(
        `${where}: damaged Pycno run file: variable '${name}' is missing (the run's scenario lists it in output.fields)`,
      );
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
      throw new RunFileError(
        `${where}: damaged Pycno run file: '${name}' has shape (${v.dimensions.join(', ')}) = ${v.shape.join(' x ')}, expected (${mapDim}, lat, lon)`,
      );
    }
    return floats(vals);
  });
  const snapshots: RunSnapshot[] = [];
  if (ownAxis) {
    // Each kept map belongs to the record of the same day (map_time holds those days exactly).
    let n = 0;
    for (let q = 0; q < nm; q++) {
      while (n < nt && days[n] < mapDays[q]) n++;
      if (n >= nt || days[n] !== mapDays[q])
        throw new RunFileError(
          `${where}: damaged Pycno run file: map_time ${q} (${mapDays[q]}) is not a time of the run's records (or map_time does not increase)`,
        );
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
      if (!present[q])
        throw new RunFileError(
          `${where}: damaged Pycno run file: record ${n} (day ${days[n]}) has some fields but not '${name}'`,
        );
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
    if (vals.length !== nt)
      throw new RunFileError(
        `${where}: damaged Pycno run file: '${iv.name}' has ${vals.length} values for ${nt} times`,
      );
    integrals[iv.key as IntegralKey] = vals.slice();
  }

  const hovmoller: HovmollerSection[] = [];
  const requested = f.attributes.pycno_hovmoller_requested_lat;
  if (has('hovmoller_lat')) {
    const rowLats = numbers(need('hovmoller_lat', 'double', ['hovmoller']), where);
    const req = requested && typeof requested.value !== 'string' ? requested.value : rowLats;
    const hv = numbers(need('hovmoller_h_anom', 'float', ['time', 'hovmoller', 'lon']), where);
    const nh = rowLats.length;
    if (hv.length !== nt * nh * nx || req.length !== nh)
      throw new RunFileError(
        `${where}: damaged Pycno run file: 'hovmoller_h_anom' does not match ${nt} times x ${nh} sections x ${nx} longitudes`,
      );
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
    if (plon.length !== np || plat.length !== np)
      throw new RunFileError(`${where}: damaged Pycno run file: 'probe_lon' and 'probe_lat' do not have ${np} values`);
    const names = probeNames(pv, np, width);
    const series = fields.map((name) => {
      const vals = numbers(need(probeVariableName(name), 'float', ['time', 'probe']), where);
      if (vals.length !== nt * np)
        throw new RunFileError(
          `${where}: damaged Pycno run file: '${probeVariableName(name)}' has ${vals.length} values for ${nt} times x ${np} probes`,
        );
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
    seed,
    createdAt: m ? m[1] : null,
    command: m ? m[2] : null,
    dt: numberAttribute(f, 'pycno_time_step_seconds', where),
    physics,
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
