// A streaming NetCDF classic / 64-bit-offset writer. It only produces bytes and hands them to a
// ByteSink, so it runs the same in Node and in a browser Web Worker.
//
// Order of work: writeHeader(), then writeFixed() for non-record variables, then appendRecord()
// any number of times, then close(). Each record is written in full before numrecs (4 bytes at
// offset 4) is updated, so a file cut off at any moment is a valid file with the records
// completed so far: the worst case is a partial record past the end that readers ignore.
// With `headerLast`, the header goes to the sink only after the non-record data (at the first
// record or close), its 4-byte magic number last of all: a file cut off before that does not
// start with "CDF" (nothing claimed yet), never a header whose fixed data is missing.

import {
  NetcdfFormatError,
  computeLayout,
  encodeFill,
  encodeHeader,
  encodeNumbers,
  prepareValues,
  typeSize,
  NC_MAX_NUMRECS,
  type NcFileInput,
  type NcLayout,
  type NcValuesInput,
  type NcVariableLayout,
} from './netcdf-format.ts';

/** Where the bytes go. Offsets can exceed 2^32 for CDF-2 files. */
export interface ByteSink {
  write(offset: number, bytes: Uint8Array): void | Promise<void>;
}

/** A growable in-memory sink. */
export class MemorySink implements ByteSink {
  private buf: Uint8Array;
  private len = 0;

  constructor(initialCapacity = 4096) {
    this.buf = new Uint8Array(Math.max(16, initialCapacity));
  }

  write(offset: number, bytes: Uint8Array): void {
    if (!Number.isSafeInteger(offset) || offset < 0) {
      throw new RangeError(`MemorySink.write: bad offset ${offset}`);
    }
    const end = offset + bytes.length;
    if (end > this.buf.length) {
      let cap = this.buf.length;
      while (cap < end) cap *= 2;
      const next = new Uint8Array(cap); // gaps stay zero
      next.set(this.buf.subarray(0, this.len));
      this.buf = next;
    }
    this.buf.set(bytes, offset);
    if (end > this.len) this.len = end;
  }

  get length(): number {
    return this.len;
  }

  /** The bytes written so far (a view: copy it if you keep writing). */
  bytes(): Uint8Array {
    return this.buf.subarray(0, this.len);
  }
}

/** Values for one record: one entry per record variable. */
export type NcRecordInput = Readonly<Record<string, NcValuesInput>>;

// Chunk size for writing large fixed variables, in values: keeps peak memory small.
const FIXED_CHUNK = 1 << 20;

export class NetcdfWriter {
  readonly layout: NcLayout;
  private readonly sink: ByteSink;
  private readonly byName = new Map<string, NcVariableLayout>();
  private readonly recordVars: NcVariableLayout[];
  private readonly fixedWritten = new Set<string>();
  private headerWritten = false;
  private fixedClosed = false;
  private readonly headerLast: boolean;
  /** The header held back until the non-record data is written (headerLast). */
  private heldHeader: Uint8Array | null = null;
  private closed = false;
  private busy = false;
  private numrecs = 0;

  constructor(file: NcFileInput, sink: ByteSink, options: { headerLast?: boolean } = {}) {
    this.layout = computeLayout(file);
    this.sink = sink;
    this.headerLast = options.headerLast ?? false;
    for (const v of this.layout.variables) this.byName.set(v.name, v);
    this.recordVars = this.layout.variables.filter((v) => v.isRecord);
  }

  get version(): 1 | 2 {
    return this.layout.version;
  }

  /** Records written and counted in the header. */
  get numRecords(): number {
    return this.numrecs;
  }

  /** Bytes in the file once the records written so far are in. */
  get byteLength(): number {
    return this.bytesFor(this.numrecs);
  }

  /** Bytes of the whole file with `records` records (what a disk must hold for it). */
  bytesFor(records: number): number {
    const l = this.layout;
    if (this.recordVars.length === 0) {
      return l.variables.reduce((end, v) => Math.max(end, v.begin + v.vsize), l.headerSize);
    }
    return l.beginRecords + records * l.recordSize;
  }

  async writeHeader(): Promise<void> {
    await this.run('writeHeader', async () => {
      if (this.headerWritten) throw new NetcdfFormatError('writeHeader: the header is already written');
      const header = encodeHeader(this.layout, 0);
      if (this.headerLast) this.heldHeader = header;
      else await this.sink.write(0, header);
      this.headerWritten = true;
    });
  }

  /** Write all the data of a non-record variable. */
  async writeFixed(name: string, values: NcValuesInput): Promise<void> {
    await this.run('writeFixed', async () => {
      const where = `writeFixed('${name}')`;
      this.requireHeader(where);
      if (this.fixedClosed) {
        throw new NetcdfFormatError(
          `${where}: non-record data must be written before the first record and before close()`,
        );
      }
      const v = this.byName.get(name);
      if (!v)
        throw new NetcdfFormatError(`${where}: no variable '${name}' (known: ${[...this.byName.keys()].join(', ')})`);
      if (v.isRecord) throw new NetcdfFormatError(`${where}: '${name}' is a record variable; use appendRecord()`);
      if (this.fixedWritten.has(name)) throw new NetcdfFormatError(`${where}: '${name}' is already written`);
      const vals = prepareValues(v, values, where);
      await this.writeFixedData(v, vals);
      this.fixedWritten.add(name);
    });
  }

  /** Append one record; `values` must hold exactly the record variables. */
  async appendRecord(values: NcRecordInput): Promise<void> {
    await this.run('appendRecord', async () => {
      const where = `appendRecord (record ${this.numrecs})`;
      this.requireHeader(where);
      if (this.recordVars.length === 0) throw new NetcdfFormatError(`${where}: the file has no record variables`);
      if (typeof values !== 'object' || values === null)
        throw new NetcdfFormatError(`${where}: values must be an object`);
      if (this.numrecs >= NC_MAX_NUMRECS)
        throw new NetcdfFormatError(`${where}: the record count would exceed ${NC_MAX_NUMRECS}`);
      for (const k of Object.keys(values)) {
        const v = this.byName.get(k);
        if (!v) throw new NetcdfFormatError(`${where}: no variable '${k}'`);
        if (!v.isRecord) throw new NetcdfFormatError(`${where}: '${k}' is not a record variable; use writeFixed()`);
      }
      const missing = this.recordVars.filter((v) => !(v.name in values)).map((v) => v.name);
      if (missing.length > 0) throw new NetcdfFormatError(`${where}: missing record variable(s) ${missing.join(', ')}`);
      const prepared = this.recordVars.map((v) => prepareValues(v, values[v.name], where));

      await this.fillUnwrittenFixed();
      const l = this.layout;
      const rec = new Uint8Array(l.recordSize);
      const view = new DataView(rec.buffer);
      this.recordVars.forEach((v, k) => {
        const at = v.begin - l.beginRecords;
        encodeNumbers(v.type, prepared[k], 0, v.count, view, at);
        // With a single record variable there is no padding (recordSize = dataBytes).
        const padBytes = Math.min(v.vsize, l.recordSize - at) - v.dataBytes;
        encodeFill(v.type, v.fill, padBytes / typeSize(v.type), view, at + v.dataBytes);
      });
      // Data first, then the count: a crash in between leaves the previous, valid count.
      await this.sink.write(l.beginRecords + this.numrecs * l.recordSize, rec);
      const n = new Uint8Array(4);
      new DataView(n.buffer).setUint32(0, this.numrecs + 1);
      await this.sink.write(4, n);
      this.numrecs++;
    });
  }

  /** End the non-record data (unwritten variables get their fill value; a held header goes in). */
  async finishFixed(): Promise<void> {
    await this.run('finishFixed', async () => {
      this.requireHeader('finishFixed');
      await this.fillUnwrittenFixed();
    });
  }

  /** Fill any unwritten non-record variables with their fill value; no more writes after this. */
  async close(): Promise<void> {
    await this.run('close', async () => {
      if (this.closed) return;
      this.requireHeader('close');
      await this.fillUnwrittenFixed();
      this.closed = true;
    });
  }

  private requireHeader(where: string): void {
    if (this.closed) throw new NetcdfFormatError(`${where}: the writer is closed`);
    if (!this.headerWritten) throw new NetcdfFormatError(`${where}: call writeHeader() first`);
  }

  // Refuse overlapping calls: each one must finish (be awaited) before the next starts, or the
  // record-then-numrecs order could be broken.
  private async run(what: string, f: () => Promise<void>): Promise<void> {
    if (this.busy) throw new NetcdfFormatError(`${what}: the previous call has not finished (await each call)`);
    this.busy = true;
    try {
      await f();
    } finally {
      this.busy = false;
    }
  }

  private async fillUnwrittenFixed(): Promise<void> {
    if (this.fixedClosed) return;
    for (const v of this.layout.variables) {
      if (!v.isRecord && !this.fixedWritten.has(v.name)) await this.writeFixedData(v, null);
    }
    const held = this.heldHeader;
    if (held) {
      await this.sink.write(4, held.subarray(4));
      await this.sink.write(0, held.subarray(0, 4));
      this.heldHeader = null;
    }
    this.fixedClosed = true;
  }

  /** Write a fixed variable in chunks, padding its vsize with fill; null values = all fill. */
  private async writeFixedData(v: NcVariableLayout, vals: ArrayLike<number> | null): Promise<void> {
    const size = typeSize(v.type);
    const total = v.vsize / size; // vsize is a multiple of every type size that pads
    for (let from = 0; from < total; from += FIXED_CHUNK) {
      const to = Math.min(total, from + FIXED_CHUNK);
      const chunk = new Uint8Array((to - from) * size);
      const view = new DataView(chunk.buffer);
      const dataEnd = vals ? Math.min(to, v.count) : from;
      if (dataEnd > from) encodeNumbers(v.type, vals!, from, dataEnd, view, 0);
      const fillFrom = Math.max(from, dataEnd);
      encodeFill(v.type, v.fill, to - fillFrom, view, (fillFrom - from) * size);
      await this.sink.write(v.begin + from * size, chunk);
    }
  }
}

/** Write a whole file to memory in one call (handy for small files and tests). */
export async function writeNetcdfToMemory(
  file: NcFileInput,
  fixed: Readonly<Record<string, NcValuesInput>>,
  records: readonly NcRecordInput[] = [],
): Promise<Uint8Array> {
  const sink = new MemorySink();
  const w = new NetcdfWriter(file, sink);
  await w.writeHeader();
  for (const [name, vals] of Object.entries(fixed)) await w.writeFixed(name, vals);
  for (const r of records) await w.appendRecord(r);
  await w.close();
  return sink.bytes().slice();
}
