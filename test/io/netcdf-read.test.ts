// readNetcdf refusals: each bad input must give a NetcdfReadError that says what is wrong and
// where. Header grammar: Unidata netCDF classic format specification (NUG Appendix B).

import { describe, expect, it } from 'vitest';
import { NC_DOUBLE, NC_FLOAT, NC_INT, computeLayout, type NcFileInput } from '../../model/io/netcdf-format.ts';
import { NetcdfReadError, readNetcdf } from '../../model/io/netcdf-read.ts';
import { writeNetcdfToMemory } from '../../model/io/netcdf-writer.ts';

const be32 = (n: number) => [(n >>> 24) & 0xff, (n >>> 16) & 0xff, (n >>> 8) & 0xff, n & 0xff];
const ascii = (s: string) => Array.from(s, (c) => c.charCodeAt(0));

const file: NcFileInput = {
  dimensions: [
    { name: 'time', length: 'unlimited' },
    { name: 'x', length: 3 },
  ],
  attributes: { title: 'refusals' },
  variables: [
    { name: 'x', type: NC_DOUBLE, dimensions: ['x'], attributes: { units: 'm' } },
    { name: 'time', type: NC_DOUBLE, dimensions: ['time'] },
    { name: 'f', type: NC_FLOAT, dimensions: ['time', 'x'] },
  ],
};
const layout = computeLayout(file);
const records = [0, 1, 2].map((r) => ({ time: r, f: [r, NaN, -Infinity] }));
const good = await writeNetcdfToMemory(file, { x: [NaN, Infinity, -0] }, records);

function refusal(bytes: Uint8Array): NetcdfReadError {
  try {
    readNetcdf(bytes);
  } catch (e) {
    expect(e).toBeInstanceOf(NetcdfReadError);
    return e as NetcdfReadError;
  }
  throw new Error('readNetcdf accepted the bytes');
}

/** A minimal CDF-1 header: one dimension, one variable with no attributes. */
function craft(opts: { dimLength: number; type: number; vsize: number; begin: number; tail?: number }): Uint8Array {
  const bytes = [
    ...ascii('CDF'),
    1,
    ...be32(0),
    ...be32(0x0a),
    ...be32(1),
    ...be32(1),
    ...ascii('n'),
    0,
    0,
    0,
    ...be32(opts.dimLength),
    ...be32(0),
    ...be32(0),
    ...be32(0x0b),
    ...be32(1),
    ...be32(1),
    ...ascii('v'),
    0,
    0,
    0,
    ...be32(1),
    ...be32(0),
    ...be32(0),
    ...be32(0),
    ...be32(opts.type),
    ...be32(opts.vsize),
    ...be32(opts.begin),
    ...new Array(opts.tail ?? 0).fill(0),
  ];
  return new Uint8Array(bytes);
}

describe('readNetcdf reads a good file, NaN and infinities included', () => {
  it('NaN, +-Infinity and -0 come back as written', () => {
    const f = readNetcdf(good);
    const x = f.variable('x').values as Float64Array;
    expect(Number.isNaN(x[0])).toBe(true);
    expect(x[1]).toBe(Infinity);
    expect(Object.is(x[2], -0)).toBe(true);
    const fv = Array.from(f.variable('f').values as Float64Array);
    expect(fv).toEqual([0, NaN, -Infinity, 1, NaN, -Infinity, 2, NaN, -Infinity]);
    expect(f.attributes.title.value).toBe('refusals');
  });
  it('options.only decodes just the named variables', () => {
    const f = readNetcdf(good, { only: ['time'] });
    expect(Array.from(f.variable('time').values as Float64Array)).toEqual([0, 1, 2]);
    expect((f.variable('f').values as Float64Array).length).toBe(0);
    expect(f.variable('f').shape).toEqual([3, 3]);
  });
  it('asking for a missing variable names the ones there are', () => {
    expect(() => readNetcdf(good).variable('h')).toThrow(/no variable 'h' \(have: x, time, f\)/);
  });
});

describe('not a NetCDF file, or an unsupported version', () => {
  it('wrong magic', () => {
    expect(refusal(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0, 0, 0, 0])).message).toMatch(
      /not a NetCDF file: the first bytes are 50 4b 03 04, expected 'CDF'/,
    );
    expect(refusal(new TextEncoder().encode('{"scenario": 1}')).message).toMatch(/not a NetCDF file/);
  });
  it('too short to hold the magic', () => {
    expect(refusal(new Uint8Array([0x43, 0x44])).message).toMatch(/not a NetCDF file: only 2 bytes/);
    expect(refusal(new Uint8Array(0)).message).toMatch(/only 0 bytes/);
  });
  it('HDF5 (NetCDF-4), CDF-5 and unknown version bytes', () => {
    expect(refusal(new Uint8Array([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a])).message).toMatch(
      /HDF5 \(NetCDF-4\)/,
    );
    const v5 = good.slice();
    v5[3] = 5;
    expect(refusal(v5).message).toMatch(/unsupported version: CDF-5/);
    const v3 = good.slice();
    v3[3] = 3;
    expect(refusal(v3).message).toMatch(/unsupported version: byte 3 is 3/);
  });
});

describe('truncated files', () => {
  it('every cut inside the header is refused as a truncated header, naming the byte', () => {
    for (let n = 4; n < layout.headerSize; n++) {
      const e = refusal(good.subarray(0, n));
      expect(e.message).toMatch(/truncated/);
      expect(e.message).toMatch(/byte \d+/);
    }
  });
  it('a cut inside the fixed data names the variable and the bytes it needs', () => {
    const e = refusal(good.subarray(0, layout.headerSize + 10));
    expect(e.message).toBe(
      `truncated or corrupt file: variable 'x' (double, 3, 3 values) needs bytes ${layout.headerSize}..${layout.headerSize + 24} ` +
        `but the file has only ${layout.headerSize + 10} bytes`,
    );
  });
  it('numrecs larger than the records present', () => {
    const b = good.slice();
    new DataView(b.buffer).setUint32(4, 10);
    expect(refusal(b).message).toMatch(
      /truncated file: the header counts 10 records, but variable 'time' \(double, records\) has data for only 3/,
    );
  });
});

describe('corrupt or hostile headers are refused before anything big is allocated', () => {
  it('a huge dimension length: the data cannot fit in the file', () => {
    const b = craft({ dimLength: 0x7fffffff, type: NC_DOUBLE, vsize: 0xffffffff, begin: 80, tail: 16 });
    expect(b.length).toBe(96);
    const t0 = performance.now();
    const e = refusal(b);
    expect(performance.now() - t0).toBeLessThan(50); // no 17 GB array was built
    expect(e.message).toBe(
      "truncated or corrupt file: variable 'v' (double, 2147483647, 2147483647 values) needs bytes 80..17179869256 but the file has only 96 bytes",
    );
  });
  it('a dimension length of 2^32 - 1 is caught the same way', () => {
    const e = refusal(craft({ dimLength: 0xffffffff, type: NC_INT, vsize: 0xffffffff, begin: 80, tail: 16 }));
    expect(e.message).toMatch(/variable 'v' \(int, 4294967295, 4294967295 values\) needs bytes 80\.\.17179869260/);
  });
  it('a list that claims more entries than the file could hold', () => {
    const b = craft({ dimLength: 2, type: NC_INT, vsize: 8, begin: 80, tail: 8 });
    new DataView(b.buffer).setUint32(12, 0x7fffffff); // number of dimensions
    expect(refusal(b).message).toMatch(
      /dimension list at byte 8 claims 2147483647 entries, which cannot fit in the \d+ bytes left/,
    );
  });
  it('a vsize that disagrees with the dimensions', () => {
    expect(refusal(craft({ dimLength: 2, type: NC_INT, vsize: 12, begin: 80, tail: 8 })).message).toMatch(
      /variable 'v' \(header byte 44\) has vsize 12, but its dimensions give 8/,
    );
  });
  it('an unknown type code', () => {
    expect(refusal(craft({ dimLength: 2, type: 9, vsize: 8, begin: 80, tail: 8 })).message).toMatch(
      /variable 'v' at byte 68 has type code 9 \(classic types are 1\.\.6\)/,
    );
  });
  it('a begin offset inside the header', () => {
    expect(refusal(craft({ dimLength: 2, type: NC_INT, vsize: 8, begin: 8, tail: 8 })).message).toMatch(
      /variable 'v' begins at byte 8, inside the header \(which ends at 80\)/,
    );
  });
  it('a wrong list tag', () => {
    const b = craft({ dimLength: 2, type: NC_INT, vsize: 8, begin: 80, tail: 8 });
    new DataView(b.buffer).setUint32(8, 0x0b);
    expect(refusal(b).message).toMatch(/expected dimension list tag 10 \(or ABSENT\) at byte 8, found 11/);
  });
  it('the crafted header is otherwise valid: with matching data it reads', () => {
    const b = craft({ dimLength: 2, type: NC_INT, vsize: 8, begin: 80, tail: 8 });
    new DataView(b.buffer).setInt32(80, -5);
    new DataView(b.buffer).setInt32(84, 6);
    expect(Array.from(readNetcdf(b).variable('v').values as Float64Array)).toEqual([-5, 6]);
  });
});

describe('errors from netcdfjs itself are rewrapped with what and where', () => {
  it('a CDF-2 begin past 4 GiB (netcdfjs reads only 32-bit offsets)', async () => {
    // A record variable with no records may begin anywhere; netcdfjs refuses offsets >= 2^32.
    const f2: NcFileInput = {
      version: 2,
      dimensions: [{ name: 't', length: 'unlimited' }],
      variables: [{ name: 'r', type: NC_INT, dimensions: ['t'] }],
    };
    const b = await writeNetcdfToMemory(f2, {});
    const l = computeLayout(f2);
    new DataView(b.buffer).setBigInt64(l.headerSize - 8, 2n ** 32n + 64n);
    const e = refusal(b);
    expect(e.message).toMatch(/^reading the header: the netcdfjs reader failed: .*offsets larger than 4GB/);
  });
});
