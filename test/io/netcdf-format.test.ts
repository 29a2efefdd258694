// Byte-level checks of the NetCDF writer against the Unidata netCDF classic format specification
// (NUG Appendix B, netcdf-c docs/file_format_specifications.md), as summarised in
// check-values.md section 8.

import { describe, expect, it } from 'vitest';
import {
  NC_BYTE,
  NC_CHAR,
  NC_DOUBLE,
  NC_FLOAT,
  NC_INT,
  NC_SHORT,
  NetcdfFormatError,
  checkName,
  computeLayout,
  encodeHeader,
  type NcFileInput,
} from '../../model/io/netcdf-format.ts';
import { MemorySink, NetcdfWriter, writeNetcdfToMemory, type ByteSink } from '../../model/io/netcdf-writer.ts';

const be32 = (n: number) => [(n >>> 24) & 0xff, (n >>> 16) & 0xff, (n >>> 8) & 0xff, n & 0xff];
const ascii = (s: string) => Array.from(s, (c) => c.charCodeAt(0));

describe('spec test vectors (NUG Appendix B)', () => {
  it('the empty file is 32 bytes: CDF\\x01 then numrecs and three ABSENT lists', async () => {
    const bytes = await writeNetcdfToMemory({ dimensions: [], variables: [] }, {});
    // Spec: magic 'C' 'D' 'F' 1, numrecs 0, dim_list/gatt_list/var_list = ABSENT (ZERO ZERO).
    expect(Array.from(bytes)).toEqual([...ascii('CDF'), 1, ...new Array(28).fill(0)]);
    expect(bytes.length).toBe(32);
  });

  it('the "tiny" file (dim = 5; short vx(dim) = 3,1,4,1,5) matches the spec dump byte for byte', async () => {
    const bytes = await writeNetcdfToMemory(
      { dimensions: [{ name: 'dim', length: 5 }], variables: [{ name: 'vx', type: NC_SHORT, dimensions: ['dim'] }] },
      { vx: [3, 1, 4, 1, 5] },
    );
    // Written out by hand from the spec's annotated dump of tiny.nc.
    const expected = [
      ...ascii('CDF'),
      1,
      ...be32(0), // numrecs
      ...be32(0x0a),
      ...be32(1), // NC_DIMENSION, one dimension
      ...be32(3),
      ...ascii('dim'),
      0,
      ...be32(5),
      ...be32(0),
      ...be32(0), // gatt_list ABSENT
      ...be32(0x0b),
      ...be32(1), // NC_VARIABLE, one variable
      ...be32(2),
      ...ascii('vx'),
      0,
      0,
      ...be32(1),
      ...be32(0), // one dimension, id 0
      ...be32(0),
      ...be32(0), // vatt_list ABSENT
      ...be32(3), // NC_SHORT
      ...be32(12), // vsize = 5 * 2 rounded up to 4
      ...be32(80), // begin
      0,
      3,
      0,
      1,
      0,
      4,
      0,
      1,
      0,
      5,
      0x80,
      0x01, // padding with the default short fill -32767
    ];
    expect(bytes.length).toBe(92);
    expect(Array.from(bytes)).toEqual(expected);
    const view = new DataView(bytes.buffer, bytes.byteOffset);
    expect(view.getInt16(90)).toBe(-32767);
  });
});

describe('default fill values (spec, "Note on fill values")', () => {
  // Pad one value of each type by giving a 1-long fixed variable and leaving it unwritten.
  const cases: Array<[string, 1 | 2 | 3 | 4 | 5 | 6, number[]]> = [
    ['byte', NC_BYTE, [0x81]],
    ['char', NC_CHAR, [0x00]],
    ['short', NC_SHORT, [0x80, 0x01]],
    ['int', NC_INT, [0x80, 0x00, 0x00, 0x01]],
    ['float', NC_FLOAT, [0x7c, 0xf0, 0x00, 0x00]],
    ['double', NC_DOUBLE, [0x47, 0x9e, 0x00, 0x00, 0x00, 0x00, 0x00, 0x00]],
  ];
  for (const [label, type, fillBytes] of cases) {
    it(`unwritten ${label} data is the default fill ${fillBytes.map((b) => b.toString(16)).join(' ')}`, async () => {
      const file: NcFileInput = {
        dimensions: [{ name: 'n', length: 1 }],
        variables: [{ name: 'x', type, dimensions: ['n'] }],
      };
      const bytes = await writeNetcdfToMemory(file, {});
      const l = computeLayout(file);
      const begin = l.variables[0].begin;
      expect(Array.from(bytes.subarray(begin, begin + fillBytes.length))).toEqual(fillBytes);
      // Byte and char pad their 1-byte value to 4 with more fill.
      expect(bytes.length - begin).toBe(Math.max(4, fillBytes.length));
      if (fillBytes.length === 1) expect(Array.from(bytes.subarray(begin))).toEqual(new Array(4).fill(fillBytes[0]));
    });
  }

  it('a _FillValue attribute replaces the default in the padding', async () => {
    const bytes = await writeNetcdfToMemory(
      {
        dimensions: [{ name: 'n', length: 3 }],
        variables: [{ name: 'b', type: NC_BYTE, dimensions: ['n'], attributes: { _FillValue: 7 } }],
      },
      { b: [1, -2, 3] },
    );
    expect(Array.from(bytes.subarray(bytes.length - 4))).toEqual([1, 0xfe, 3, 7]);
  });
});

describe('header structure', () => {
  it('text and numeric attributes are encoded as name, nc_type, nelems, values, null padding', async () => {
    const file: NcFileInput = {
      dimensions: [],
      attributes: { ab: 'xyz', s: { type: NC_SHORT, values: [1, -2, 3] } },
      variables: [],
    };
    const h = encodeHeader(computeLayout(file));
    const expected = [
      ...ascii('CDF'),
      1,
      ...be32(0),
      ...be32(0),
      ...be32(0), // no dimensions
      ...be32(0x0c),
      ...be32(2),
      ...be32(2),
      ...ascii('ab'),
      0,
      0,
      ...be32(2 /* NC_CHAR */),
      ...be32(3),
      ...ascii('xyz'),
      0,
      ...be32(1),
      ...ascii('s'),
      0,
      0,
      0,
      ...be32(3 /* NC_SHORT */),
      ...be32(3),
      0,
      1,
      0xff,
      0xfe,
      0,
      3,
      0,
      0,
      ...be32(0),
      ...be32(0), // no variables
    ];
    expect(Array.from(h)).toEqual(expected);
  });

  it('numbers given bare become NC_DOUBLE; a bare _FillValue takes the variable type', () => {
    const l = computeLayout({
      dimensions: [{ name: 'n', length: 2 }],
      variables: [{ name: 'v', type: NC_FLOAT, dimensions: ['n'], attributes: { _FillValue: -1, scale: 2 } }],
    });
    const atts = l.variables[0].attributes;
    expect(atts.map((a) => [a.name, a.type])).toEqual([
      ['_FillValue', NC_FLOAT],
      ['scale', NC_DOUBLE],
    ]);
    expect(l.variables[0].fill).toBe(-1);
  });

  it('record variables: begin follows the fixed data, record size is the sum of vsizes', () => {
    const l = computeLayout({
      dimensions: [
        { name: 'time', length: 'unlimited' },
        { name: 'x', length: 3 },
      ],
      variables: [
        { name: 'time', type: NC_DOUBLE, dimensions: ['time'] },
        { name: 'x', type: NC_FLOAT, dimensions: ['x'] },
        { name: 'b', type: NC_BYTE, dimensions: ['time', 'x'] },
        { name: 's', type: NC_SHORT, dimensions: ['time', 'x'] },
      ],
    });
    const [time, x, b, s] = l.variables;
    expect(x.begin).toBe(l.headerSize);
    expect(l.beginRecords).toBe(l.headerSize + 12);
    expect(time.begin).toBe(l.beginRecords);
    expect([time.vsize, b.vsize, s.vsize]).toEqual([8, 4, 8]);
    expect(b.begin).toBe(l.beginRecords + 8);
    expect(s.begin).toBe(l.beginRecords + 12);
    expect(l.recordSize).toBe(20);
  });

  it('exactly one record variable of type short: records are packed, vsize still rounded (spec, "Note on padding")', async () => {
    const file: NcFileInput = {
      dimensions: [
        { name: 't', length: 'unlimited' },
        { name: 'k', length: 3 },
      ],
      variables: [{ name: 's', type: NC_SHORT, dimensions: ['t', 'k'] }],
    };
    const l = computeLayout(file);
    expect(l.variables[0].vsize).toBe(8);
    expect(l.recordSize).toBe(6);
    const bytes = await writeNetcdfToMemory(file, {}, [{ s: [1, 2, 3] }, { s: [4, 5, 6] }]);
    expect(bytes.length).toBe(l.headerSize + 12);
    expect(Array.from(bytes.subarray(l.headerSize))).toEqual([0, 1, 0, 2, 0, 3, 0, 4, 0, 5, 0, 6]);
    expect(new DataView(bytes.buffer).getUint32(4)).toBe(2); // numrecs
  });

  it('picks CDF-1 for small files and CDF-2 when a begin offset passes 2^31 - 1', async () => {
    const small = computeLayout({
      dimensions: [{ name: 'n', length: 4 }],
      variables: [{ name: 'a', type: NC_FLOAT, dimensions: ['n'] }],
    });
    expect(small.version).toBe(1);

    // 300e6 doubles = 2.4 GB before 'b': its begin needs the 64-bit OFFSET of CDF-2.
    const big: NcFileInput = {
      dimensions: [
        { name: 'n', length: 300_000_000 },
        { name: 'm', length: 2 },
      ],
      variables: [
        { name: 'a', type: NC_DOUBLE, dimensions: ['n'] },
        { name: 'b', type: NC_INT, dimensions: ['m'] },
      ],
    };
    const l = computeLayout(big);
    expect(l.version).toBe(2);
    const bBegin = l.headerSize + 2_400_000_000;
    expect(l.variables[1].begin).toBe(bBegin);
    expect(() => computeLayout({ ...big, version: 1 })).toThrow(/beyond the classic \(CDF-1\) limit 2147483647/);

    // Write only the header to a sink that keeps the writes, and decode the 64-bit begin.
    const writes: Array<[number, Uint8Array]> = [];
    const sink: ByteSink = { write: (o, b) => void writes.push([o, b.slice()]) };
    await new NetcdfWriter(big, sink).writeHeader();
    const [[off, h]] = writes;
    expect(off).toBe(0);
    expect(Array.from(h.subarray(0, 4))).toEqual([...ascii('CDF'), 2]);
    const v = new DataView(h.buffer);
    expect(v.getBigInt64(h.length - 8)).toBe(BigInt(bBegin));
    expect(v.getUint32(h.length - 12)).toBe(8); // vsize of b
    // Each variable entry is name (8) + nelems (4) + dimid (4) + ABSENT (8) + type + vsize + begin (16).
    expect(v.getBigInt64(h.length - 40 - 8)).toBe(BigInt(l.headerSize)); // begin of a
    expect(v.getUint32(h.length - 40 - 12)).toBe(2_400_000_000); // vsize of a
  });

  it('forced CDF-2 differs from CDF-1 only in the version byte and 8-byte begins', async () => {
    const base: NcFileInput = {
      dimensions: [{ name: 'n', length: 2 }],
      variables: [{ name: 'a', type: NC_INT, dimensions: ['n'] }],
    };
    const one = await writeNetcdfToMemory({ ...base, version: 1 }, { a: [7, -8] });
    const two = await writeNetcdfToMemory({ ...base, version: 2 }, { a: [7, -8] });
    expect(two.length).toBe(one.length + 4);
    expect(one[3]).toBe(1);
    expect(two[3]).toBe(2);
    const h1 = computeLayout({ ...base, version: 1 }).headerSize;
    expect(Array.from(two.subarray(4, h1 - 4))).toEqual(Array.from(one.subarray(4, h1 - 4)));
    expect(Array.from(two.subarray(h1 - 4, h1 + 4))).toEqual([0, 0, 0, 0, ...be32(h1 + 4)]);
    expect(Array.from(one.subarray(h1 - 4, h1))).toEqual(be32(h1));
  });
});

describe('names (spec grammar: ID1 = alphanumeric | _, no /, no control characters, no trailing space)', () => {
  it.each(['time', 'h_anom', '_FillValue', '2d', 'a.b-c+d@e', 'has space', 'Température', 'x~y'])('accepts %j', (n) => {
    expect(() => checkName(n, 'test')).not.toThrow();
  });
  it.each([
    ['', /non-empty/],
    ['-x', /must begin/],
    ['.x', /must begin/],
    [' x', /must begin/],
    ['a/b', /forbidden character.*'\/'/],
    ['a\nb', /forbidden character \(code 10\)/],
    ['trail ', /white space/],
    ['e\u0301', /NFC/],
    ['x'.repeat(257), /longer than 256 bytes/],
  ])('refuses %j', (n, re) => {
    expect(() => checkName(n, 'test')).toThrow(re);
  });
});

describe('input validation: what and where', () => {
  const ok: NcFileInput = {
    dimensions: [
      { name: 'time', length: 'unlimited' },
      { name: 'lat', length: 2 },
    ],
    variables: [
      { name: 'lat', type: NC_FLOAT, dimensions: ['lat'] },
      { name: 'h', type: NC_FLOAT, dimensions: ['time', 'lat'] },
    ],
  };

  it('unknown dimension names', () => {
    expect(() => computeLayout({ ...ok, variables: [{ name: 'u', type: NC_FLOAT, dimensions: ['lon'] }] })).toThrow(
      /variable 0 'u': unknown dimension 'lon' \(known: time, lat\)/,
    );
  });
  it('more than one unlimited dimension', () => {
    expect(() =>
      computeLayout({
        dimensions: [
          { name: 't', length: 'unlimited' },
          { name: 's', length: 'unlimited' },
        ],
        variables: [],
      }),
    ).toThrow(/dimension 1 's': a second unlimited dimension \('t' is already unlimited\)/);
  });
  it('record dimension not first, repeated dimension, zero or fractional length', () => {
    expect(() =>
      computeLayout({ ...ok, variables: [{ name: 'q', type: NC_INT, dimensions: ['lat', 'time'] }] }),
    ).toThrow(/'q': the record dimension 'time' must be the first/);
    expect(() =>
      computeLayout({ ...ok, variables: [{ name: 'q', type: NC_INT, dimensions: ['lat', 'lat'] }] }),
    ).toThrow(/repeated/);
    expect(() => computeLayout({ dimensions: [{ name: 'z', length: 0 }], variables: [] })).toThrow(
      /write length: 'unlimited'/,
    );
    expect(() => computeLayout({ dimensions: [{ name: 'z', length: 2.5 }], variables: [] })).toThrow(
      /dimension 0 'z': length must be an integer/,
    );
  });
  it('duplicate names, bad types, bad attribute values', () => {
    expect(() =>
      computeLayout({
        dimensions: [
          { name: 'a', length: 1 },
          { name: 'a', length: 2 },
        ],
        variables: [],
      }),
    ).toThrow(/dimension 1 'a': duplicate/);
    expect(() => computeLayout({ ...ok, variables: [{ name: 'v', type: 7 as never, dimensions: [] }] })).toThrow(
      /'v': unknown type 7/,
    );
    expect(() => computeLayout({ ...ok, attributes: { n: { type: NC_SHORT, values: [40000] } } })).toThrow(
      /global attributes, attribute 'n', value 0: 40000 is not representable as short/,
    );
    expect(() => computeLayout({ ...ok, attributes: { 'bad/name': 'x' } })).toThrow(/attribute 'bad\/name'/);
    expect(() =>
      computeLayout({
        ...ok,
        variables: [
          { name: 'v', type: NC_INT, dimensions: [], attributes: { _FillValue: { type: NC_FLOAT, values: [1] } } },
        ],
      }),
    ).toThrow(/_FillValue': type float differs from the variable's type int/);
  });

  it('wrong value-array lengths for fixed and record variables, wrong names, order of calls', async () => {
    const w = new NetcdfWriter(ok, new MemorySink());
    await expect(w.writeFixed('lat', [1, 2])).rejects.toThrow(/call writeHeader\(\) first/);
    await w.writeHeader();
    await expect(w.writeFixed('lat', [1, 2, 3])).rejects.toThrow(
      /writeFixed\('lat'\): variable 'lat' \(2\) needs 2 values, got 3/,
    );
    await expect(w.writeFixed('h', [1, 2])).rejects.toThrow(/'h' is a record variable; use appendRecord/);
    await expect(w.writeFixed('nope', [1])).rejects.toThrow(/no variable 'nope'/);
    await w.writeFixed('lat', new Float32Array([-1, 1]));
    await expect(w.writeFixed('lat', [1, 2])).rejects.toThrow(/already written/);
    await expect(w.appendRecord({ h: [1] })).rejects.toThrow(
      /appendRecord \(record 0\): variable 'h' \(record x 2\) needs 2 values per record, got 1/,
    );
    await expect(w.appendRecord({})).rejects.toThrow(/missing record variable\(s\) h/);
    await expect(w.appendRecord({ h: [1, 2], lat: [1, 2] })).rejects.toThrow(/'lat' is not a record variable/);
    await w.appendRecord({ h: [1, 2] });
    await expect(w.appendRecord({ h: [1, 'x' as never] })).rejects.toThrow(/record 1\): 'h'\[1\] is not a number/);
    expect(w.numRecords).toBe(1);
  });

  it('integer variables refuse fractions and out-of-range values, and store NaN as the fill value', async () => {
    const file: NcFileInput = {
      dimensions: [{ name: 'n', length: 3 }],
      variables: [{ name: 'i', type: NC_SHORT, dimensions: ['n'], attributes: { _FillValue: -9 } }],
    };
    const w = new NetcdfWriter(file, new MemorySink());
    await w.writeHeader();
    await expect(w.writeFixed('i', [1, 2.5, 3])).rejects.toThrow(/'i'\[1\] = 2.5 is not representable as short/);
    await expect(w.writeFixed('i', [1, 2, 40000])).rejects.toThrow(/'i'\[2\] = 40000/);
    const sink = new MemorySink();
    const w2 = new NetcdfWriter(file, sink);
    await w2.writeHeader();
    await w2.writeFixed('i', [1, NaN, 3]);
    const b = sink.bytes();
    expect(new DataView(b.buffer).getInt16(b.length - 6)).toBe(-9);
  });

  it('overlapping (un-awaited) calls are refused so the record/numrecs order holds', async () => {
    const w = new NetcdfWriter(ok, new MemorySink());
    await w.writeHeader();
    const first = w.appendRecord({ h: [1, 2] });
    await expect(w.appendRecord({ h: [3, 4] })).rejects.toThrow(/previous call has not finished/);
    await first;
    expect(w.numRecords).toBe(1);
  });
});

describe('MemorySink', () => {
  it('grows, keeps earlier bytes and zero-fills gaps', () => {
    const s = new MemorySink(16);
    s.write(0, new Uint8Array([1, 2, 3]));
    s.write(100, new Uint8Array([9]));
    s.write(1, new Uint8Array([7]));
    const b = s.bytes();
    expect(b.length).toBe(101);
    expect(Array.from(b.subarray(0, 4))).toEqual([1, 7, 3, 0]);
    expect(b[100]).toBe(9);
    expect(b.subarray(3, 100).every((x) => x === 0)).toBe(true);
  });
});

it('a non-object file description is refused with a NetcdfFormatError', () => {
  expect(() => computeLayout(null as never)).toThrow(NetcdfFormatError);
});
