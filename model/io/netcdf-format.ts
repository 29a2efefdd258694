// Binary encoding of NetCDF classic (CDF-1) and 64-bit-offset (CDF-2) files, written from the
// Unidata netCDF classic format specification (NUG Appendix B, netcdf-c
// docs/file_format_specifications.md).
//
// Layout. Everything is big-endian. A file is a header followed by data:
//   header   = magic numrecs dim_list gatt_list var_list
//   magic    = 'C' 'D' 'F' VERSION          (VERSION 1 = classic, 2 = 64-bit offset)
//   numrecs  = 32-bit count of records      (FF FF FF FF = STREAMING, never written here)
//   *_list   = ABSENT (8 zero bytes) | tag nelems [element ...]
//              tags: NC_DIMENSION 0x0A, NC_VARIABLE 0x0B, NC_ATTRIBUTE 0x0C
//   name     = nelems (byte count) + UTF-8 bytes, null-padded to a multiple of 4
//   dim      = name dim_length              (0 marks the single record dimension)
//   attr     = name nc_type nelems values   (values padded with nulls to a multiple of 4)
//   var      = name nelems [dimid ...] vatt_list nc_type vsize begin
//   begin    = 32-bit INT in CDF-1, 64-bit INT64 in CDF-2: the only difference between them.
// Data: the non-record variables one after another in definition order, each taking vsize bytes
// (its size rounded up to 4, the padding filled with the variable's fill value); then the records,
// each holding one slab of every record variable, again in definition order. The record size is
// the sum of the record variables' vsizes, except when there is exactly one record variable: then
// the slabs are packed without padding (this only matters for byte, char and short).

export const NC_BYTE = 1;
export const NC_CHAR = 2;
export const NC_SHORT = 3;
export const NC_INT = 4;
export const NC_FLOAT = 5;
export const NC_DOUBLE = 6;
export type NcType = 1 | 2 | 3 | 4 | 5 | 6;

export const NC_TYPE_NAMES = {
  1: 'byte',
  2: 'char',
  3: 'short',
  4: 'int',
  5: 'float',
  6: 'double',
} as const satisfies Record<NcType, string>;
export type NcTypeName = (typeof NC_TYPE_NAMES)[NcType];

export const NC_DIMENSION_TAG = 0x0a;
export const NC_VARIABLE_TAG = 0x0b;
export const NC_ATTRIBUTE_TAG = 0x0c;
export const NC_STREAMING = 0xffffffff;

// Default fill values (spec, "Note on fill values").
export const NC_FILL_BYTE = -127;
export const NC_FILL_CHAR = 0;
export const NC_FILL_SHORT = -32767;
export const NC_FILL_INT = -2147483647;
export const NC_FILL_FLOAT = 9.969209968386869e36;
export const NC_FILL_DOUBLE = 9.969209968386869e36;

/** Largest begin offset a CDF-1 file can hold (OFFSET is a signed 32-bit INT). */
export const CDF1_MAX_OFFSET = 2 ** 31 - 1;
/** Largest dimension length (dim_length is a non-negative INT). */
export const NC_MAX_DIM_LENGTH = 2 ** 31 - 1;
/** Largest record count: numrecs is 32 bits and FF FF FF FF means STREAMING. */
export const NC_MAX_NUMRECS = 2 ** 32 - 2;
/** vsize is 32 bits; larger variables store 2^32 - 1 and may only come last (spec, vsize). */
export const NC_MAX_VSIZE = 2 ** 32 - 4;
/** netcdf-c's NC_MAX_NAME, in bytes. */
export const NC_MAX_NAME = 256;

export class NetcdfFormatError extends Error {
  override name = 'NetcdfFormatError';
}

export function isNcType(t: unknown): t is NcType {
  return t === 1 || t === 2 || t === 3 || t === 4 || t === 5 || t === 6;
}

export function typeSize(t: NcType): number {
  switch (t) {
    case NC_BYTE:
    case NC_CHAR:
      return 1;
    case NC_SHORT:
      return 2;
    case NC_INT:
    case NC_FLOAT:
      return 4;
    case NC_DOUBLE:
      return 8;
  }
}

export function defaultFill(t: NcType): number {
  switch (t) {
    case NC_BYTE:
      return NC_FILL_BYTE;
    case NC_CHAR:
      return NC_FILL_CHAR;
    case NC_SHORT:
      return NC_FILL_SHORT;
    case NC_INT:
      return NC_FILL_INT;
    case NC_FLOAT:
      return NC_FILL_FLOAT;
    case NC_DOUBLE:
      return NC_FILL_DOUBLE;
  }
}

export function pad4(n: number): number {
  return Math.ceil(n / 4) * 4;
}

const utf8 = new TextEncoder();

export function utf8Bytes(s: string): Uint8Array {
  return utf8.encode(s);
}

/**
 * Check a dimension, variable or attribute name against the spec's grammar:
 *   ID1 = alphanumeric | '_';  IDN = alphanumeric | special1 | special2  (printable ASCII but '/')
 *   alphanumeric includes multibyte UTF-8 (MUTF8), NFC-normalised; no trailing spaces.
 */
export function checkName(name: unknown, where: string): asserts name is string {
  if (typeof name !== 'string' || name.length === 0) {
    throw new NetcdfFormatError(`${where}: a name must be a non-empty string`);
  }
  if (name.normalize('NFC') !== name) {
    throw new NetcdfFormatError(`${where}: name '${name}' is not NFC-normalised Unicode`);
  }
  const cps = Array.from(name);
  const first = cps[0].codePointAt(0)!;
  const alnum = (c: number) =>
    (c >= 0x30 && c <= 0x39) || (c >= 0x41 && c <= 0x5a) || (c >= 0x61 && c <= 0x7a) || c >= 0x80;
  if (!(alnum(first) || first === 0x5f)) {
    throw new NetcdfFormatError(
      `${where}: name '${name}' must begin with a letter, digit, underscore or non-ASCII character`,
    );
  }
  for (let k = 1; k < cps.length; k++) {
    const c = cps[k].codePointAt(0)!;
    if (c < 0x20 || c === 0x7f || c === 0x2f) {
      throw new NetcdfFormatError(
        `${where}: name '${name}' contains a forbidden character (code ${c}) at position ${k}: ` +
          `control characters and '/' are not allowed`,
      );
    }
  }
  if (/\s$/.test(name)) {
    throw new NetcdfFormatError(`${where}: name '${name}' must not end with white space`);
  }
  if (utf8Bytes(name).length > NC_MAX_NAME) {
    throw new NetcdfFormatError(`${where}: name '${name.slice(0, 20)}...' is longer than ${NC_MAX_NAME} bytes`);
  }
}

// ---------------------------------------------------------------------------------------------
// Attributes

/** An attribute as the caller gives it: text, a number or numbers (stored as double), or typed. */
export type NcAttributeInput =
  | string
  | number
  | readonly number[]
  | { type: NcType; values: ArrayLike<number> | number | string };

export type NcAttributesInput = Readonly<Record<string, NcAttributeInput>>;

/** An attribute ready to encode. Text is kept as its UTF-8 bytes. */
export interface NcAttribute {
  name: string;
  type: NcType;
  /** For NC_CHAR: the bytes; otherwise the numbers. */
  values: Uint8Array | Float64Array;
}

/**
 * Turn caller attributes into encodable ones. A bare number (or number[]) becomes NC_DOUBLE,
 * except _FillValue, which the spec requires to have the variable's own type.
 */
export function normaliseAttributes(
  input: NcAttributesInput | undefined,
  where: string,
  variableType?: NcType,
): NcAttribute[] {
  if (input === undefined) return [];
  if (typeof input !== 'object' || input === null || Array.isArray(input)) {
    throw new NetcdfFormatError(`${where}: attributes must be an object of name: value`);
  }
  const out: NcAttribute[] = [];
  for (const [name, raw] of Object.entries(input)) {
    const at = `${where}, attribute '${name}'`;
    checkName(name, at);
    let type: NcType;
    let values: ArrayLike<number> | number | string;
    if (typeof raw === 'string') {
      type = NC_CHAR;
      values = raw;
    } else if (typeof raw === 'number' || Array.isArray(raw)) {
      type = name === '_FillValue' && variableType !== undefined ? variableType : NC_DOUBLE;
      values = raw as number | number[];
    } else if (typeof raw === 'object' && raw !== null && 'type' in raw) {
      if (!isNcType(raw.type)) {
        throw new NetcdfFormatError(`${at}: unknown type ${String(raw.type)} (use NC_BYTE..NC_DOUBLE)`);
      }
      type = raw.type;
      values = raw.values;
    } else {
      throw new NetcdfFormatError(`${at}: value must be a string, number(s) or { type, values }`);
    }
    out.push({ name, type, values: encodeAttributeValues(type, values, at) });
  }
  if (variableType !== undefined) {
    const fill = out.find((a) => a.name === '_FillValue');
    if (fill) {
      if (fill.type !== variableType) {
        throw new NetcdfFormatError(
          `${where}, attribute '_FillValue': type ${NC_TYPE_NAMES[fill.type]} differs from the ` +
            `variable's type ${NC_TYPE_NAMES[variableType]}; the spec requires them to match`,
        );
      }
      if (fill.values.length !== 1) {
        throw new NetcdfFormatError(
          `${where}, attribute '_FillValue': must hold exactly one value, got ${fill.values.length}`,
        );
      }
    }
  }
  return out;
}

function encodeAttributeValues(type: NcType, values: ArrayLike<number> | number | string, at: string) {
  if (type === NC_CHAR) {
    if (typeof values === 'string') return utf8Bytes(values);
    throw new NetcdfFormatError(`${at}: an NC_CHAR attribute needs a string value`);
  }
  if (typeof values === 'string') {
    throw new NetcdfFormatError(`${at}: a ${NC_TYPE_NAMES[type]} attribute needs numbers, got a string`);
  }
  const arr = typeof values === 'number' ? [values] : values;
  const out = new Float64Array(arr.length);
  for (let k = 0; k < arr.length; k++) {
    const v = arr[k];
    if (typeof v !== 'number') throw new NetcdfFormatError(`${at}: value ${k} is not a number`);
    checkRepresentable(type, v, `${at}, value ${k}`);
    out[k] = v;
  }
  return out;
}

const INT_RANGE: Partial<Record<NcType, [number, number]>> = {
  [NC_BYTE]: [-128, 127],
  [NC_SHORT]: [-32768, 32767],
  [NC_INT]: [-2147483648, 2147483647],
};

/** Integer types take integers in range; floats take anything (NaN and infinities included). */
function checkRepresentable(type: NcType, v: number, at: string): void {
  const r = INT_RANGE[type];
  if (!r) return;
  if (!Number.isInteger(v) || v < r[0] || v > r[1]) {
    throw new NetcdfFormatError(
      `${at}: ${v} is not representable as ${NC_TYPE_NAMES[type]} (integer in ${r[0]}..${r[1]})`,
    );
  }
}

// ---------------------------------------------------------------------------------------------
// File description and layout

export interface NcDimensionInput {
  name: string;
  /** A positive length, or 'unlimited' for the (single) record dimension. */
  length: number | 'unlimited';
}

export interface NcVariableInput {
  name: string;
  type: NcType;
  /** Dimension names, slowest varying first. The record dimension, if used, must come first. */
  dimensions: readonly string[];
  attributes?: NcAttributesInput;
}

export interface NcFileInput {
  dimensions: readonly NcDimensionInput[];
  attributes?: NcAttributesInput;
  variables: readonly NcVariableInput[];
  /** 1 = classic, 2 = 64-bit offset, 'auto' (default) = 1 unless an offset needs more. */
  version?: 1 | 2 | 'auto';
}

export interface NcDimensionLayout {
  name: string;
  /** 0 for the record dimension, as in the file. */
  length: number;
}

export interface NcVariableLayout {
  name: string;
  type: NcType;
  dimIds: number[];
  /** Lengths of the dimensions, with the record dimension given as 0. */
  shape: number[];
  isRecord: boolean;
  /** Number of values: in the whole variable, or in one record of a record variable. */
  count: number;
  /** count * type size: the data bytes without padding. */
  dataBytes: number;
  /** dataBytes rounded up to 4 (the field in the header is capped at 2^32 - 1). */
  vsize: number;
  begin: number;
  attributes: NcAttribute[];
  /** The fill value used for padding and unwritten data (_FillValue or the default). */
  fill: number;
}

export interface NcLayout {
  version: 1 | 2;
  dimensions: NcDimensionLayout[];
  recordDimId: number;
  attributes: NcAttribute[];
  variables: NcVariableLayout[];
  headerSize: number;
  /** Offset of the first record (end of the non-record data). */
  beginRecords: number;
  /** Bytes per record (0 when there are no record variables). */
  recordSize: number;
}

function nameSize(name: string): number {
  return 4 + pad4(utf8Bytes(name).length);
}

function attributeListSize(atts: NcAttribute[]): number {
  if (atts.length === 0) return 8;
  let n = 8;
  for (const a of atts) n += nameSize(a.name) + 8 + pad4(a.values.length * typeSize(a.type));
  return n;
}

/** Validate a file description and compute where everything goes. */
export function computeLayout(file: NcFileInput): NcLayout {
  if (typeof file !== 'object' || file === null) throw new NetcdfFormatError('file description must be an object');
  if (!Array.isArray(file.dimensions)) throw new NetcdfFormatError('file description: dimensions must be an array');
  if (!Array.isArray(file.variables)) throw new NetcdfFormatError('file description: variables must be an array');
  const requested = file.version ?? 'auto';
  if (requested !== 1 && requested !== 2 && requested !== 'auto') {
    throw new NetcdfFormatError(`file description: version must be 1, 2 or 'auto', got ${String(requested)}`);
  }

  const dims: NcDimensionLayout[] = [];
  const dimIndex = new Map<string, number>();
  let recordDimId = -1;
  file.dimensions.forEach((d, k) => {
    const at = `dimension ${k}${d && typeof d.name === 'string' ? ` '${d.name}'` : ''}`;
    checkName(d?.name, at);
    if (dimIndex.has(d.name)) throw new NetcdfFormatError(`${at}: duplicate dimension name`);
    let length: number;
    if (d.length === 'unlimited') {
      if (recordDimId >= 0) {
        throw new NetcdfFormatError(
          `${at}: a second unlimited dimension ('${dims[recordDimId].name}' is already unlimited); ` +
            `classic NetCDF allows at most one`,
        );
      }
      recordDimId = k;
      length = 0;
    } else if (
      typeof d.length === 'number' &&
      Number.isInteger(d.length) &&
      d.length >= 1 &&
      d.length <= NC_MAX_DIM_LENGTH
    ) {
      length = d.length;
    } else {
      throw new NetcdfFormatError(
        `${at}: length must be an integer 1..${NC_MAX_DIM_LENGTH} or 'unlimited', got ${String(d.length)}` +
          (d.length === 0 ? " (the file uses 0 for the record dimension: write length: 'unlimited')" : ''),
      );
    }
    dimIndex.set(d.name, k);
    dims.push({ name: d.name, length });
  });

  const gatts = normaliseAttributes(file.attributes, 'global attributes');
  checkUnique(
    gatts.map((a) => a.name),
    'global attributes',
  );

  const varNames = new Set<string>();
  const vars: NcVariableLayout[] = file.variables.map((v, k) => {
    const at = `variable ${k}${v && typeof v.name === 'string' ? ` '${v.name}'` : ''}`;
    checkName(v?.name, at);
    if (varNames.has(v.name)) throw new NetcdfFormatError(`${at}: duplicate variable name`);
    varNames.add(v.name);
    if (!isNcType(v.type))
      throw new NetcdfFormatError(`${at}: unknown type ${String(v.type)} (use NC_BYTE..NC_DOUBLE)`);
    if (!Array.isArray(v.dimensions)) throw new NetcdfFormatError(`${at}: dimensions must be an array of names`);
    const dimIds = (v.dimensions as readonly string[]).map((dn: string, j: number): number => {
      const id = dimIndex.get(dn);
      if (id === undefined) {
        throw new NetcdfFormatError(
          `${at}: unknown dimension '${String(dn)}' (known: ${dims.map((d) => d.name).join(', ') || 'none'})`,
        );
      }
      if (id === recordDimId && j !== 0) {
        throw new NetcdfFormatError(`${at}: the record dimension '${dn}' must be the first dimension`);
      }
      return id;
    });
    if (new Set(dimIds).size !== dimIds.length) {
      throw new NetcdfFormatError(`${at}: a dimension is repeated`);
    }
    const shape = dimIds.map((id) => dims[id].length);
    const isRecord = dimIds.length > 0 && dimIds[0] === recordDimId;
    let count = 1;
    for (const n of shape) if (n !== 0) count *= n;
    const dataBytes = count * typeSize(v.type);
    if (!Number.isSafeInteger(dataBytes)) throw new NetcdfFormatError(`${at}: too large (${dataBytes} bytes)`);
    const attributes = normaliseAttributes(v.attributes, at, v.type);
    checkUnique(
      attributes.map((a) => a.name),
      at,
    );
    const fillAtt = attributes.find((a) => a.name === '_FillValue');
    const fill = fillAtt ? fillAtt.values[0] : defaultFill(v.type);
    return {
      name: v.name,
      type: v.type,
      dimIds,
      shape,
      isRecord,
      count,
      dataBytes,
      vsize: pad4(dataBytes),
      begin: 0,
      attributes,
      fill,
    };
  });

  // Only the last fixed and the last record variable may exceed the 32-bit vsize (spec, vsize).
  const fixed = vars.filter((v) => !v.isRecord);
  const recs = vars.filter((v) => v.isRecord);
  for (const group of [fixed, recs]) {
    group.forEach((v, k) => {
      if (v.vsize > NC_MAX_VSIZE && k !== group.length - 1) {
        throw new NetcdfFormatError(
          `variable '${v.name}': needs ${v.vsize} bytes${v.isRecord ? ' per record' : ''}, more than ` +
            `${NC_MAX_VSIZE}; only the last ${v.isRecord ? 'record' : 'non-record'} variable may be that large`,
        );
      }
    });
  }

  const place = (version: 1 | 2): NcLayout => {
    let header = 4 + 4; // magic, numrecs
    header += dims.length === 0 ? 8 : 8 + dims.reduce((s, d) => s + nameSize(d.name) + 4, 0);
    header += attributeListSize(gatts);
    header += 8;
    for (const v of vars) {
      header += nameSize(v.name) + 4 + 4 * v.dimIds.length + attributeListSize(v.attributes) + 4 + 4;
      header += version === 1 ? 4 : 8;
    }
    let offset = header;
    for (const v of fixed) {
      v.begin = offset;
      offset += v.vsize;
    }
    const beginRecords = offset;
    for (const v of recs) {
      v.begin = offset;
      offset += v.vsize;
    }
    // Exactly one record variable: records are packed without padding (spec, "Note on padding").
    const recordSize = recs.length === 1 ? recs[0].dataBytes : offset - beginRecords;
    return {
      version,
      dimensions: dims,
      recordDimId,
      attributes: gatts,
      variables: vars.map((v) => ({ ...v })),
      headerSize: header,
      beginRecords,
      recordSize,
    };
  };

  const maxBegin = (l: NcLayout) => l.variables.reduce((m, v) => Math.max(m, v.begin), l.headerSize);
  if (requested === 2) return checkCdf2(place(2));
  const v1 = place(1);
  if (maxBegin(v1) <= CDF1_MAX_OFFSET) return v1;
  if (requested === 1) {
    const worst = v1.variables.find((v) => v.begin > CDF1_MAX_OFFSET)!;
    throw new NetcdfFormatError(
      `variable '${worst.name}' would begin at byte ${worst.begin}, beyond the classic (CDF-1) limit ` +
        `${CDF1_MAX_OFFSET}; use version 2 (64-bit offset) or 'auto'`,
    );
  }
  return checkCdf2(place(2));
}

function checkCdf2(l: NcLayout): NcLayout {
  for (const v of l.variables) {
    if (!Number.isSafeInteger(v.begin + v.vsize)) {
      throw new NetcdfFormatError(`variable '${v.name}': offset ${v.begin} is beyond 2^53`);
    }
  }
  return l;
}

function checkUnique(names: string[], where: string): void {
  const seen = new Set<string>();
  for (const n of names) {
    if (seen.has(n)) throw new NetcdfFormatError(`${where}: duplicate attribute name '${n}'`);
    seen.add(n);
  }
}

// ---------------------------------------------------------------------------------------------
// Encoding

/** Big-endian appender for the header. */
class HeaderBuilder {
  readonly bytes: Uint8Array;
  readonly view: DataView;
  pos = 0;
  constructor(size: number) {
    this.bytes = new Uint8Array(size);
    this.view = new DataView(this.bytes.buffer);
  }
  u32(v: number) {
    this.view.setUint32(this.pos, v);
    this.pos += 4;
  }
  i64(v: number) {
    this.view.setBigInt64(this.pos, BigInt(v));
    this.pos += 8;
  }
  raw(b: Uint8Array) {
    this.bytes.set(b, this.pos);
    this.pos = pad4(this.pos + b.length); // header padding is null bytes, already zero
  }
  name(s: string) {
    const b = utf8Bytes(s);
    this.u32(b.length);
    this.raw(b);
  }
  attributes(atts: NcAttribute[]) {
    if (atts.length === 0) {
      this.u32(0);
      this.u32(0);
      return;
    }
    this.u32(NC_ATTRIBUTE_TAG);
    this.u32(atts.length);
    for (const a of atts) {
      this.name(a.name);
      this.u32(a.type);
      this.u32(a.values.length);
      if (a.type === NC_CHAR) {
        this.raw(a.values as Uint8Array);
      } else {
        const n = a.values.length * typeSize(a.type);
        encodeNumbers(a.type, a.values, 0, a.values.length, this.view, this.pos);
        this.pos = pad4(this.pos + n);
      }
    }
  }
}

/** Encode the header for a layout, with the given record count. */
export function encodeHeader(layout: NcLayout, numrecs = 0): Uint8Array {
  const h = new HeaderBuilder(layout.headerSize);
  h.bytes.set([0x43, 0x44, 0x46, layout.version], 0);
  h.pos = 4;
  h.u32(numrecs);
  if (layout.dimensions.length === 0) {
    h.u32(0);
    h.u32(0);
  } else {
    h.u32(NC_DIMENSION_TAG);
    h.u32(layout.dimensions.length);
    for (const d of layout.dimensions) {
      h.name(d.name);
      h.u32(d.length);
    }
  }
  h.attributes(layout.attributes);
  if (layout.variables.length === 0) {
    h.u32(0);
    h.u32(0);
  } else {
    h.u32(NC_VARIABLE_TAG);
    h.u32(layout.variables.length);
    for (const v of layout.variables) {
      h.name(v.name);
      h.u32(v.dimIds.length);
      for (const id of v.dimIds) h.u32(id);
      h.attributes(v.attributes);
      h.u32(v.type);
      h.u32(v.vsize > NC_MAX_VSIZE ? 0xffffffff : v.vsize);
      if (layout.version === 1) h.u32(v.begin);
      else h.i64(v.begin);
    }
  }
  if (h.pos !== layout.headerSize) {
    throw new Error(`internal: header is ${h.pos} bytes, layout said ${layout.headerSize}`);
  }
  return h.bytes;
}

/** Encode numbers [from, to) big-endian at byte offset `at` of `view`. Values must be valid. */
export function encodeNumbers(
  type: NcType,
  values: ArrayLike<number>,
  from: number,
  to: number,
  view: DataView,
  at: number,
): void {
  if ((type === NC_FLOAT || type === NC_DOUBLE) && to - from > 16 && isNumericArray(values)) {
    encodeFloatBlock(type, values, from, to, view, at);
    return;
  }
  switch (type) {
    case NC_BYTE:
    case NC_CHAR:
      for (let k = from; k < to; k++, at++) view.setInt8(at, values[k]);
      return;
    case NC_SHORT:
      for (let k = from; k < to; k++, at += 2) view.setInt16(at, values[k]);
      return;
    case NC_INT:
      for (let k = from; k < to; k++, at += 4) view.setInt32(at, values[k]);
      return;
    case NC_FLOAT:
      for (let k = from; k < to; k++, at += 4) view.setFloat32(at, values[k]);
      return;
    case NC_DOUBLE:
      for (let k = from; k < to; k++, at += 8) view.setFloat64(at, values[k]);
      return;
  }
}

const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
const BLOCK = 4096;
const scratch32 = new Float32Array(BLOCK);
const scratch64 = new Float64Array(BLOCK);
const words32 = new Uint32Array(scratch32.buffer);
const words64 = new Uint32Array(scratch64.buffer);
const swapped = new Uint32Array(2 * BLOCK);
const swappedBytes = new Uint8Array(swapped.buffer);

function isNumericArray(
  values: ArrayLike<number>,
): values is
  | Float32Array
  | Float64Array
  | Int32Array
  | Int16Array
  | Uint8Array
  | Int8Array
  | Uint16Array
  | Uint32Array {
  return (
    ArrayBuffer.isView(values) &&
    !(values instanceof DataView) &&
    !(values instanceof BigInt64Array) &&
    !(values instanceof BigUint64Array)
  );
}

const swap32 = (x: number) => ((x >>> 24) | ((x >>> 8) & 0xff00) | ((x << 8) & 0xff0000) | (x << 24)) >>> 0;

/**
 * Big-endian floats from a typed array in blocks: the conversion to float32 / float64 is done by
 * the typed-array copy, then whole 32-bit words are byte-swapped and copied into the output.
 * Much faster than a DataView call per value, with the same bytes.
 */
function encodeFloatBlock(
  type: NcType,
  values: ArrayLike<number> & { subarray(a: number, b: number): ArrayLike<number> },
  from: number,
  to: number,
  view: DataView,
  at: number,
): void {
  const out = new Uint8Array(view.buffer, view.byteOffset, view.byteLength);
  const size = type === NC_FLOAT ? 4 : 8;
  for (let k = from; k < to; k += BLOCK) {
    const n = Math.min(BLOCK, to - k);
    const part = values.subarray(k, k + n) as unknown as ArrayLike<number>;
    if (type === NC_FLOAT) {
      scratch32.set(part);
      if (LITTLE_ENDIAN_HOST) for (let i = 0; i < n; i++) swapped[i] = swap32(words32[i]);
      else swapped.set(words32.subarray(0, n));
    } else {
      scratch64.set(part);
      if (LITTLE_ENDIAN_HOST) {
        for (let i = 0; i < n; i++) {
          swapped[2 * i] = swap32(words64[2 * i + 1]);
          swapped[2 * i + 1] = swap32(words64[2 * i]);
        }
      } else swapped.set(words64.subarray(0, 2 * n));
    }
    out.set(swappedBytes.subarray(0, n * size), at);
    at += n * size;
  }
}

/** Fill `n` values of `type` with `fill` from byte offset `at`. */
export function encodeFill(type: NcType, fill: number, n: number, view: DataView, at: number): void {
  const size = typeSize(type);
  if (n === 0) return;
  encodeNumbers(type, [fill], 0, 1, view, at);
  // Copy the first encoded value over the rest: cheaper than re-encoding each.
  const bytes = new Uint8Array(view.buffer, view.byteOffset + at, n * size);
  let filled = size;
  while (filled < bytes.length) {
    const len = Math.min(filled, bytes.length - filled);
    bytes.copyWithin(filled, 0, len);
    filled += len;
  }
}

/** Values for one variable (or one record of it), as the caller gives them. */
export type NcValuesInput = ArrayLike<number> | number | string;

/**
 * Check values for a variable and return them as numbers: a string for NC_CHAR becomes its UTF-8
 * bytes, padded with nulls if shorter than the variable. NaN in an integer variable becomes the
 * variable's fill value (it means "missing"); other non-integers are errors.
 */
export function prepareValues(v: NcVariableLayout, input: NcValuesInput, where: string): ArrayLike<number> {
  let values: ArrayLike<number>;
  if (typeof input === 'string') {
    if (v.type !== NC_CHAR) {
      throw new NetcdfFormatError(`${where}: got a string for ${NC_TYPE_NAMES[v.type]} variable '${v.name}'`);
    }
    const b = utf8Bytes(input);
    if (b.length > v.count) {
      throw new NetcdfFormatError(`${where}: text for '${v.name}' is ${b.length} bytes, the variable holds ${v.count}`);
    }
    const padded = new Uint8Array(v.count);
    padded.set(b);
    return padded;
  } else if (typeof input === 'number') {
    values = [input];
  } else if (input !== null && typeof input === 'object' && typeof input.length === 'number') {
    values = input;
  } else {
    throw new NetcdfFormatError(`${where}: values for '${v.name}' must be an array, typed array, number or string`);
  }
  if (values.length !== v.count) {
    const shape = v.shape.map((n) => (n === 0 ? 'record' : String(n))).join(' x ') || 'scalar';
    throw new NetcdfFormatError(
      `${where}: variable '${v.name}' (${shape}) needs ${v.count} values${v.isRecord ? ' per record' : ''}, got ${values.length}`,
    );
  }
  if (v.type === NC_FLOAT || v.type === NC_DOUBLE) {
    if (isNumericArray(values)) return values; // every element is a number
    for (let k = 0; k < values.length; k++) {
      if (typeof values[k] !== 'number') throw new NetcdfFormatError(`${where}: '${v.name}'[${k}] is not a number`);
    }
    return values;
  }
  const [lo, hi] = v.type === NC_CHAR ? [-128, 255] : INT_RANGE[v.type]!;
  let out: number[] | null = null;
  for (let k = 0; k < values.length; k++) {
    const x = values[k];
    if (Number.isNaN(x)) {
      out ??= Array.from(values);
      out[k] = v.fill;
    } else if (typeof x !== 'number' || !Number.isInteger(x) || x < lo || x > hi) {
      throw new NetcdfFormatError(
        `${where}: '${v.name}'[${k}] = ${String(x)} is not representable as ${NC_TYPE_NAMES[v.type]} (integer in ${lo}..${hi})`,
      );
    }
  }
  return out ?? values;
}
