// Crafting hostile NetCDF files for the trust tests: read a good file, change it (drop a
// variable, give one another type or other values, set an attribute) and write it again with the
// project's writer. Only the test-side tool; the readers under test never see this code.

import { readNetcdf, type NcFile, type NcReadVariable } from '../../model/io/netcdf-read.ts';
import {
  NC_CHAR,
  NC_TYPE_NAMES,
  type NcAttributeInput,
  type NcFileInput,
  type NcType,
  type NcTypeName,
} from '../../model/io/netcdf-format.ts';
import { writeNetcdfToMemory, type NcRecordInput } from '../../model/io/netcdf-writer.ts';
import { sha256Hex } from '../../model/io/sha256.ts';

const TYPE_CODE = Object.fromEntries(Object.entries(NC_TYPE_NAMES).map(([k, v]) => [v, Number(k) as NcType])) as Record<
  NcTypeName,
  NcType
>;

export interface EditableVariable {
  name: string;
  type: NcTypeName;
  dimensions: string[];
  attributes: Record<string, NcAttributeInput>;
  /** File order, records first; text for char variables. */
  values: Float64Array | string;
}

export interface EditableFile {
  dimensions: Array<{ name: string; length: number | 'unlimited' }>;
  attributes: Record<string, NcAttributeInput>;
  variables: EditableVariable[];
  numRecords: number;
}

function attributes(a: NcFile['attributes']): Record<string, NcAttributeInput> {
  const out: Record<string, NcAttributeInput> = {};
  for (const [k, v] of Object.entries(a))
    out[k] = typeof v.value === 'string' ? v.value : { type: TYPE_CODE[v.type], values: Array.from(v.value) };
  return out;
}

export function editable(bytes: Uint8Array): EditableFile {
  const f = readNetcdf(bytes);
  return {
    dimensions: f.dimensions.map((d) => ({ name: d.name, length: d.unlimited ? 'unlimited' : d.length })),
    attributes: attributes(f.attributes),
    variables: f.variables.map((v: NcReadVariable) => ({
      name: v.name,
      type: v.type,
      dimensions: [...v.dimensions],
      attributes: attributes(v.attributes),
      values: v.values,
    })),
    numRecords: f.numRecords,
  };
}

/** Write an edited file: values of integer types are rounded, NaN there becomes the fill value. */
export async function written(e: EditableFile): Promise<Uint8Array> {
  const record = e.dimensions.find((d) => d.length === 'unlimited')?.name;
  const layout: NcFileInput = {
    dimensions: e.dimensions,
    attributes: e.attributes,
    variables: e.variables.map((v) => ({
      name: v.name,
      type: TYPE_CODE[v.type],
      dimensions: v.dimensions,
      attributes: v.attributes,
    })),
  };
  const isInt = (t: NcTypeName) => t === 'byte' || t === 'short' || t === 'int';
  const prep = (v: EditableVariable, vals: Float64Array | string) => {
    if (typeof vals === 'string')
      return TYPE_CODE[v.type] === NC_CHAR ? vals : Float64Array.from(new TextEncoder().encode(vals));
    if (TYPE_CODE[v.type] === NC_CHAR)
      return Array.from(vals, (x) => String.fromCharCode(Math.max(32, Math.min(126, Math.round(x) || 32)))).join('');
    return isInt(v.type)
      ? vals.map((x) =>
          Number.isFinite(x)
            ? Math.max(v.type === 'byte' ? -127 : -32767, Math.min(v.type === 'byte' ? 127 : 32767, Math.round(x)))
            : NaN,
        )
      : vals;
  };
  const isRecord = (v: EditableVariable) => record !== undefined && v.dimensions[0] === record;
  const fixed: Record<string, Float64Array | string> = {};
  for (const v of e.variables) if (!isRecord(v)) fixed[v.name] = prep(v, v.values) as Float64Array | string;
  const records: NcRecordInput[] = [];
  for (let n = 0; n < e.numRecords; n++) {
    const r: Record<string, Float64Array | string> = {};
    for (const v of e.variables) {
      if (!isRecord(v)) continue;
      const per =
        typeof v.values === 'string'
          ? v.values.length / Math.max(1, e.numRecords)
          : v.values.length / Math.max(1, e.numRecords);
      const part =
        typeof v.values === 'string' ? v.values.slice(n * per, (n + 1) * per) : v.values.slice(n * per, (n + 1) * per);
      r[v.name] = prep(v, part) as Float64Array | string;
    }
    records.push(r);
  }
  return writeNetcdfToMemory(layout, fixed, records);
}

/** Read, change, write. */
export async function edited(bytes: Uint8Array, change: (f: EditableFile) => void): Promise<Uint8Array> {
  const f = editable(bytes);
  change(f);
  return written(f);
}

export function variable(f: EditableFile, name: string): EditableVariable {
  const v = f.variables.find((x) => x.name === name);
  if (!v) throw new Error(`test file has no variable ${name}`);
  return v;
}

export function dropVariable(f: EditableFile, name: string): void {
  variable(f, name);
  f.variables = f.variables.filter((v) => v.name !== name);
}

/** Replace the embedded scenario of a run file and keep its hash matching (a crafted, not a damaged, file). */
export function setScenario(f: EditableFile, scenarioJson: string): void {
  f.attributes.pycno_scenario = scenarioJson;
  f.attributes.pycno_scenario_sha256 = sha256Hex(scenarioJson);
}

/** Give a variable another type (its values converted; a _FillValue of the old type dropped). */
export function retype(f: EditableFile, name: string, type: NcTypeName): EditableVariable {
  const v = variable(f, name);
  v.type = type;
  delete v.attributes._FillValue;
  return v;
}
