// Reading NetCDF classic (CDF-1) and 64-bit-offset (CDF-2) files through netcdfjs, an
// independent reader, with clear refusals.
//
// Before netcdfjs sees the bytes, a bounds-checked walk over the header (Unidata netCDF classic
// format specification, NUG Appendix B) checks the structure and that every variable's data fits
// in the file: netcdfjs would otherwise throw bare RangeErrors, or size arrays from a corrupt
// header. Then netcdfjs decodes attributes and data, and this layer smooths over its habits:
//   - it reads vsize/type-size values (padding included) and steps records by the sum of vsizes,
//     which is wrong for a single byte/char/short record variable; we pass exact sizes instead;
//   - it returns NC_BYTE as unsigned and text as one char per byte; we return signed bytes and
//     decode text as UTF-8;
//   - it does not handle numrecs = STREAMING; we count the records from the file length.

import { NetCDFReader } from 'netcdfjs';
import {
  NC_ATTRIBUTE_TAG,
  NC_DIMENSION_TAG,
  NC_MAX_NAME,
  NC_STREAMING,
  NC_TYPE_NAMES,
  NC_VARIABLE_TAG,
  isNcType,
  pad4,
  typeSize,
  type NcType,
  type NcTypeName,
} from './netcdf-format.ts';

export class NetcdfReadError extends Error {
  override name = 'NetcdfReadError';
}

export interface NcReadAttribute {
  type: NcTypeName;
  value: string | Float64Array;
}

export interface NcReadDimension {
  name: string;
  /** For the record dimension: the number of records. */
  length: number;
  unlimited: boolean;
}

export interface NcReadVariable {
  name: string;
  type: NcTypeName;
  dimensions: string[];
  /** Dimension lengths, the record dimension given as the number of records. */
  shape: number[];
  attributes: Record<string, NcReadAttribute>;
  /** Numbers in file order (C order, records first); NC_CHAR as text, trailing nulls dropped. */
  values: Float64Array | string;
}

export interface NcFile {
  version: 1 | 2;
  numRecords: number;
  recordDimension: string | null;
  dimensions: NcReadDimension[];
  attributes: Record<string, NcReadAttribute>;
  variables: NcReadVariable[];
  /** The variable of that name; throws if there is none. */
  variable(name: string): NcReadVariable;
}

// --- header walk -----------------------------------------------------------------------------

interface ScannedVar {
  name: string;
  dimIds: number[];
  type: NcType;
  vsize: number;
  begin: number;
  /** Byte offset of the variable's entry in the header, for messages. */
  at: number;
}

interface Scanned {
  version: 1 | 2;
  numrecsRaw: number;
  dims: { name: string; length: number }[];
  vars: ScannedVar[];
  headerEnd: number;
}

const utf8 = new TextDecoder('utf-8');

class Cursor {
  pos = 0;
  private readonly view: DataView;
  constructor(private readonly b: Uint8Array) {
    this.view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  }
  need(n: number, what: string): void {
    if (this.pos + n > this.b.length) {
      throw new NetcdfReadError(
        `truncated header: ${what} at byte ${this.pos} needs ${n} bytes, but the file ends at byte ${this.b.length}`,
      );
    }
  }
  u32(what: string): number {
    this.need(4, what);
    const v = this.view.getUint32(this.pos);
    this.pos += 4;
    return v;
  }
  i64(what: string): number {
    this.need(8, what);
    const v = this.view.getBigInt64(this.pos);
    if (v < 0n || v > BigInt(Number.MAX_SAFE_INTEGER)) {
      throw new NetcdfReadError(`corrupt header: ${what} at byte ${this.pos} is ${v}, not a usable offset`);
    }
    this.pos += 8;
    return Number(v);
  }
  name(what: string): string {
    const at = this.pos;
    const n = this.u32(`length of ${what}`);
    if (n === 0) throw new NetcdfReadError(`corrupt header: ${what} at byte ${at} is empty`);
    // a longer name is a corrupt length (and would flood the message with the bytes after it)
    if (n > NC_MAX_NAME)
      throw new NetcdfReadError(
        `corrupt header: ${what} at byte ${at} claims ${n} bytes (a NetCDF name holds at most ${NC_MAX_NAME})`,
      );
    this.need(pad4(n), `${what} (${n} bytes)`);
    const s = utf8.decode(this.b.subarray(this.pos, this.pos + n));
    this.pos += pad4(n);
    return s;
  }
  /** A list header: ABSENT (0 0) or tag + count; the count is checked against bytes left. */
  list(tag: number, what: string, minEntryBytes: number): number {
    const at = this.pos;
    const t = this.u32(`${what} tag`);
    const n = this.u32(`${what} count`);
    if (t === 0) {
      if (n !== 0) throw new NetcdfReadError(`corrupt header: ${what} at byte ${at} is ABSENT but counts ${n} entries`);
      return 0;
    }
    if (t !== tag) {
      throw new NetcdfReadError(`corrupt header: expected ${what} tag ${tag} (or ABSENT) at byte ${at}, found ${t}`);
    }
    const left = this.b.length - this.pos;
    if (n * minEntryBytes > left) {
      throw new NetcdfReadError(
        `truncated or corrupt header: ${what} at byte ${at} claims ${n} entries, which cannot fit ` +
          `in the ${left} bytes left`,
      );
    }
    return n;
  }
  skipAttributes(what: string): void {
    const n = this.list(NC_ATTRIBUTE_TAG, `${what} attribute list`, 16);
    for (let k = 0; k < n; k++) {
      const name = this.name(`${what} attribute ${k} name`);
      const at = this.pos;
      const type = this.u32(`type of attribute '${name}'`);
      if (!isNcType(type)) {
        throw new NetcdfReadError(
          `unsupported or corrupt header: attribute '${name}' at byte ${at} has type code ${type} ` +
            `(classic types are 1..6)`,
        );
      }
      const count = this.u32(`value count of attribute '${name}'`);
      this.need(pad4(count * typeSize(type)), `values of attribute '${name}' (${count} x ${NC_TYPE_NAMES[type]})`);
      this.pos += pad4(count * typeSize(type));
    }
  }
}

function scanHeader(b: Uint8Array): Scanned {
  if (b.length < 4) {
    throw new NetcdfReadError(`not a NetCDF file: only ${b.length} bytes (a classic file has at least 32)`);
  }
  if (b[0] === 0x89 && b[1] === 0x48 && b[2] === 0x44 && b[3] === 0x46) {
    throw new NetcdfReadError('unsupported format: this is an HDF5 (NetCDF-4) file; only CDF-1 and CDF-2 are read');
  }
  if (b[0] !== 0x43 || b[1] !== 0x44 || b[2] !== 0x46) {
    const hex = Array.from(b.subarray(0, 4), (x) => x.toString(16).padStart(2, '0')).join(' ');
    throw new NetcdfReadError(`not a NetCDF file: the first bytes are ${hex}, expected 'CDF' (43 44 46)`);
  }
  const v = b[3];
  if (v === 5) {
    throw new NetcdfReadError('unsupported version: CDF-5 (64-bit data) files are not read; only CDF-1 and CDF-2');
  }
  if (v !== 1 && v !== 2) {
    throw new NetcdfReadError(
      `unsupported version: byte 3 is ${v}; known classic versions are 1 (CDF-1) and 2 (CDF-2)`,
    );
  }
  const c = new Cursor(b);
  c.pos = 4;
  const numrecsRaw = c.u32('numrecs');

  const ndims = c.list(NC_DIMENSION_TAG, 'dimension list', 12);
  const dims: Scanned['dims'] = [];
  let recordDims = 0;
  for (let k = 0; k < ndims; k++) {
    const name = c.name(`dimension ${k} name`);
    const length = c.u32(`length of dimension '${name}'`);
    if (length === 0 && ++recordDims > 1) {
      throw new NetcdfReadError(`corrupt header: dimension '${name}' is a second unlimited dimension`);
    }
    dims.push({ name, length });
  }
  c.skipAttributes('global');

  const nvars = c.list(NC_VARIABLE_TAG, 'variable list', 32);
  const vars: ScannedVar[] = [];
  for (let k = 0; k < nvars; k++) {
    const at = c.pos;
    const name = c.name(`variable ${k} name`);
    const nd = c.u32(`dimension count of variable '${name}'`);
    c.need(4 * nd, `dimension ids of variable '${name}' (${nd})`);
    const dimIds: number[] = [];
    for (let j = 0; j < nd; j++) {
      const id = c.u32(`dimension id ${j} of variable '${name}'`);
      if (id >= dims.length) {
        throw new NetcdfReadError(
          `corrupt header: variable '${name}' uses dimension id ${id}, but there are ${dims.length} dimensions`,
        );
      }
      if (dims[id].length === 0 && j !== 0) {
        throw new NetcdfReadError(
          `corrupt header: variable '${name}' has the record dimension in position ${j}, not first`,
        );
      }
      dimIds.push(id);
    }
    c.skipAttributes(`variable '${name}'`);
    const tAt = c.pos;
    const type = c.u32(`type of variable '${name}'`);
    if (!isNcType(type)) {
      throw new NetcdfReadError(
        `unsupported or corrupt header: variable '${name}' at byte ${tAt} has type code ${type} (classic types are 1..6)`,
      );
    }
    const vsize = c.u32(`vsize of variable '${name}'`);
    const begin = v === 1 ? c.u32(`begin of variable '${name}'`) : c.i64(`begin of variable '${name}'`);
    vars.push({ name, dimIds, type, vsize, begin, at });
  }
  return { version: v, numrecsRaw, dims, vars, headerEnd: c.pos };
}

// --- netcdfjs output -> our types -------------------------------------------------------------

/** netcdfjs builds text with String.fromCharCode(int8): recover the bytes, then decode UTF-8. */
function charsToBytes(s: string, width?: number): Uint8Array {
  const out = new Uint8Array(width ?? s.length);
  for (let k = 0; k < s.length && k < out.length; k++) out[k] = s.charCodeAt(k) & 0xff;
  return out;
}

function decodeText(bytes: Uint8Array): string {
  let end = bytes.length;
  while (end > 0 && bytes[end - 1] === 0) end--;
  return utf8.decode(bytes.subarray(0, end));
}

function convertAttribute(a: { name: string; type: string; value: unknown }, where: string): [string, NcReadAttribute] {
  const name = decodeText(charsToBytes(a.name));
  const type = a.type as NcTypeName;
  if (type === 'char') {
    if (typeof a.value !== 'string')
      throw new NetcdfReadError(`${where}: attribute '${name}': netcdfjs returned no text`);
    return [name, { type, value: decodeText(charsToBytes(a.value)) }];
  }
  const raw = Array.isArray(a.value) ? (a.value as number[]) : [a.value as number];
  const value = Float64Array.from(raw, (x) => (type === 'byte' && x > 127 ? x - 256 : x));
  return [name, { type, value }];
}

function readerError(e: unknown, what: string): NetcdfReadError {
  const msg = e instanceof Error ? e.message : String(e);
  return new NetcdfReadError(`${what}: the netcdfjs reader failed: ${msg}`);
}

export interface ReadOptions {
  /** Only decode these variables' data (others get empty values). Default: all. */
  only?: readonly string[];
}

/** Read a CDF-1 or CDF-2 file from bytes. */
export function readNetcdf(bytes: Uint8Array, options: ReadOptions = {}): NcFile {
  if (!(bytes instanceof Uint8Array)) throw new NetcdfReadError('readNetcdf: expected a Uint8Array');
  const s = scanHeader(bytes);
  const len = bytes.length;
  const recordDimId = s.dims.findIndex((d) => d.length === 0);

  // Sizes from the dimensions, checked against the file length before anything is allocated.
  const info = s.vars.map((v) => {
    const isRecord = v.dimIds.length > 0 && v.dimIds[0] === recordDimId;
    let count = 1;
    for (const id of v.dimIds) if (id !== recordDimId) count *= s.dims[id].length;
    const dataBytes = count * typeSize(v.type);
    const expected = pad4(dataBytes);
    if (v.vsize !== expected && !(v.vsize === 0xffffffff && expected > 0xfffffffc)) {
      throw new NetcdfReadError(
        `corrupt header: variable '${v.name}' (header byte ${v.at}) has vsize ${v.vsize}, but its dimensions give ${expected}`,
      );
    }
    return { isRecord, count, dataBytes };
  });
  const recVars = s.vars.filter((_, k) => info[k].isRecord);
  const recordSize =
    recVars.length === 1
      ? info[s.vars.indexOf(recVars[0])].dataBytes // packed: spec, "Note on padding"
      : s.vars.reduce((sum, _, k) => sum + (info[k].isRecord ? pad4(info[k].dataBytes) : 0), 0);
  const beginRecords = recVars.length ? Math.min(...recVars.map((v) => v.begin)) : len;

  let numRecords = s.numrecsRaw;
  if (recordDimId < 0) numRecords = 0;
  else if (s.numrecsRaw === NC_STREAMING) {
    numRecords = recordSize > 0 ? Math.max(0, Math.floor((len - beginRecords) / recordSize)) : 0;
  }

  s.vars.forEach((v, k) => {
    const { isRecord, count, dataBytes } = info[k];
    const shape =
      v.dimIds.map((id) => (id === recordDimId ? 'records' : String(s.dims[id].length))).join(' x ') || 'scalar';
    if (v.begin < s.headerEnd) {
      throw new NetcdfReadError(
        `corrupt header: variable '${v.name}' begins at byte ${v.begin}, inside the header (which ends at ${s.headerEnd})`,
      );
    }
    const end = isRecord
      ? numRecords === 0
        ? 0
        : v.begin + (numRecords - 1) * recordSize + dataBytes
      : v.begin + dataBytes;
    if (end > len) {
      const held =
        isRecord && recordSize > 0 ? Math.max(0, Math.floor((len - v.begin - dataBytes) / recordSize) + 1) : 0;
      throw new NetcdfReadError(
        isRecord
          ? `truncated file: the header counts ${numRecords} records, but variable '${v.name}' (${NC_TYPE_NAMES[v.type]}, ${shape}) ` +
              `has data for only ${held} of them in the file's ${len} bytes`
          : `truncated or corrupt file: variable '${v.name}' (${NC_TYPE_NAMES[v.type]}, ${shape}, ${count} values) needs ` +
              `bytes ${v.begin}..${v.begin + dataBytes} but the file has only ${len} bytes`,
      );
    }
  });

  let reader: NetCDFReader;
  try {
    reader = new NetCDFReader(bytes);
  } catch (e) {
    throw readerError(e, 'reading the header');
  }
  const jsVars = reader.header.variables ?? [];
  if (jsVars.length !== s.vars.length) {
    throw new NetcdfReadError(
      `header disagreement: netcdfjs found ${jsVars.length} variables, the header walk ${s.vars.length}`,
    );
  }
  // Give netcdfjs the true record count and record step (see the note at the top).
  reader.header.recordDimension.length = numRecords;
  reader.header.recordDimension.recordStep = recordSize;

  const dimensions: NcReadDimension[] = s.dims.map((d) => ({
    name: d.name,
    length: d.length === 0 ? numRecords : d.length,
    unlimited: d.length === 0,
  }));
  const attributes = Object.fromEntries(
    (reader.header.globalAttributes ?? []).map((a) => convertAttribute(a, 'global attributes')),
  );
  const only = options.only ? new Set(options.only) : null;

  const variables: NcReadVariable[] = s.vars.map((v, k) => {
    const jv = jsVars[k];
    const { isRecord, count, dataBytes } = info[k];
    const type = NC_TYPE_NAMES[v.type];
    const atts = Object.fromEntries(
      ((jv.attributes ?? []) as Array<{ name: string; type: string; value: unknown }>).map((a) =>
        convertAttribute(a, `variable '${v.name}'`),
      ),
    );
    const base = {
      name: v.name,
      type,
      dimensions: v.dimIds.map((id) => s.dims[id].name),
      shape: v.dimIds.map((id) => dimensions[id].length),
      attributes: atts,
    };
    if (only && !only.has(v.name)) return { ...base, values: v.type === 2 ? '' : new Float64Array(0) };
    if (jv.offset !== v.begin) {
      throw new NetcdfReadError(
        `header disagreement on variable '${v.name}': netcdfjs offset ${jv.offset}, header walk ${v.begin}`,
      );
    }
    let data: unknown[];
    try {
      // Exact byte size, so netcdfjs reads `count` values per slab and no padding.
      data = reader.getDataVariable({ ...jv, size: dataBytes }) as unknown[];
    } catch (e) {
      throw readerError(e, `reading variable '${v.name}' at byte ${v.begin}`);
    }
    const slabs = isRecord ? numRecords : 1;
    if (data.length !== (isRecord ? numRecords : count)) {
      throw new NetcdfReadError(
        `reading variable '${v.name}': netcdfjs returned ${data.length} items, expected ${isRecord ? numRecords : count}`,
      );
    }
    if (v.type === 2) {
      const bytesOut = new Uint8Array(slabs * count);
      if (isRecord) data.forEach((rec, r) => bytesOut.set(charsToBytes(rec as string, count), r * count));
      else data.forEach((ch, i) => (bytesOut[i] = (ch as string).length ? (ch as string).charCodeAt(0) & 0xff : 0));
      return { ...base, values: decodeText(bytesOut) };
    }
    const out = new Float64Array(slabs * count);
    let i = 0;
    const push = (x: unknown) => {
      if (Array.isArray(x)) for (const y of x) out[i++] = y as number;
      else out[i++] = x as number;
    };
    for (const item of data) push(item);
    if (i !== out.length) {
      throw new NetcdfReadError(`reading variable '${v.name}': netcdfjs returned ${i} values, expected ${out.length}`);
    }
    if (v.type === 1) for (let j = 0; j < out.length; j++) if (out[j] > 127) out[j] -= 256;
    return { ...base, values: out };
  });

  return {
    version: s.version,
    numRecords,
    recordDimension: recordDimId >= 0 ? s.dims[recordDimId].name : null,
    dimensions,
    attributes,
    variables,
    variable(name: string): NcReadVariable {
      const found = variables.find((x) => x.name === name);
      if (!found)
        throw new NetcdfReadError(`no variable '${name}' (have: ${variables.map((x) => x.name).join(', ') || 'none'})`);
      return found;
    },
  };
}
