// Files written by model/io read back through netcdfjs (an independent reader from the npm
// registry), directly and through readNetcdf. Layout rules: Unidata netCDF classic format
// specification (NUG Appendix B).

import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { NetCDFReader } from 'netcdfjs';
import { describe, expect, it } from 'vitest';
import {
  NC_BYTE,
  NC_CHAR,
  NC_DOUBLE,
  NC_FLOAT,
  NC_INT,
  NC_SHORT,
  computeLayout,
  type NcFileInput,
} from '../../model/io/netcdf-format.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import {
  MemorySink,
  NetcdfWriter,
  writeNetcdfToMemory,
  type ByteSink,
  type NcRecordInput,
} from '../../model/io/netcdf-writer.ts';

function sampleFile(version: 1 | 2): NcFileInput {
  return {
    version,
    dimensions: [
      { name: 'time', length: 'unlimited' },
      { name: 'lat', length: 3 },
      { name: 'lon', length: 4 },
      { name: 'strlen', length: 5 },
    ],
    attributes: {
      title: 'Pycno round trip: Température °C',
      Conventions: 'CF-1.12',
      empty: '',
      ints: { type: NC_INT, values: [1, -2, 2147483647, -2147483648] },
      bytes: { type: NC_BYTE, values: [-128, -1, 0, 127] },
      shorts: { type: NC_SHORT, values: [-32768, 5, 32767] },
      floats: { type: NC_FLOAT, values: [1.5, -0.1, 3.4e38] },
      doubles: [Math.PI, 1e300, -0, 5e-324],
      one: 42,
    },
    variables: [
      { name: 'lat', type: NC_DOUBLE, dimensions: ['lat'], attributes: { units: 'degrees_north' } },
      { name: 'lon', type: NC_FLOAT, dimensions: ['lon'], attributes: { units: 'degrees_east' } },
      {
        name: 'mask',
        type: NC_BYTE,
        dimensions: ['lat', 'lon'],
        attributes: { flag_values: { type: NC_BYTE, values: [0, 1] } },
      },
      { name: 'code', type: NC_SHORT, dimensions: ['lon'] },
      { name: 'idx', type: NC_INT, dimensions: ['lat'] },
      { name: 'label', type: NC_CHAR, dimensions: ['strlen'] },
      { name: 'scalar', type: NC_DOUBLE, dimensions: [] },
      { name: 'time', type: NC_DOUBLE, dimensions: ['time'], attributes: { units: 'days since 2000-01-01' } },
      { name: 'h', type: NC_FLOAT, dimensions: ['time', 'lat', 'lon'], attributes: { _FillValue: -999, units: 'm' } },
      { name: 'count', type: NC_INT, dimensions: ['time'] },
      { name: 'flag', type: NC_BYTE, dimensions: ['time', 'lon'] },
      { name: 's', type: NC_SHORT, dimensions: ['time', 'lat'] },
      { name: 'tag', type: NC_CHAR, dimensions: ['time', 'strlen'] },
    ],
  };
}

const sampleFixed = {
  lat: [-1.25, 0, 1.25],
  lon: [140.5, 141.5, -0.1, 1e-40],
  mask: [0, 1, -1, 127, -128, 5, 6, 7, 8, 9, 10, 11],
  code: [-32768, 0, 1, 32767],
  idx: [-2147483648, 0, 2147483647],
  label: 'abc',
  scalar: -2.5e-310,
};

/** Record r of the sample: every value depends on r so records cannot be mixed up. */
function sampleRecord(r: number) {
  const h = Array.from({ length: 12 }, (_, k) => Math.sin(r * 12 + k) * 10 ** (k - 6));
  if (r % 2 === 1) h[5] = NaN;
  return {
    time: r * 0.5,
    h,
    count: [r * 1000 - 7],
    flag: [r % 128, -r % 128, 0, -128],
    s: [r, -r, r * 100],
    tag: `t${r}`,
  };
}

/** What the values come back as: floats through float32, text null-padded. */
function expectValues(got: Float64Array | string, want: ArrayLike<number> | number | string, type: number) {
  if (type === NC_CHAR) {
    expect(got).toBe(want);
    return;
  }
  const arr = typeof want === 'number' ? [want] : Array.from(want as ArrayLike<number>);
  // Integer types have no -0; floats go through float32.
  const exp = type === NC_FLOAT ? arr.map(Math.fround) : type === NC_DOUBLE ? arr : arr.map((x) => x + 0);
  expect(got).toBeInstanceOf(Float64Array);
  expect(Array.from(got as Float64Array)).toEqual(exp); // toEqual treats NaN as equal to NaN and tells -0 from 0
}

async function writeSample(version: 1 | 2, nrec: number): Promise<Uint8Array> {
  const recs: NcRecordInput[] = [];
  for (let r = 0; r < nrec; r++) recs.push(sampleRecord(r));
  return writeNetcdfToMemory(sampleFile(version), sampleFixed, recs);
}

describe.each([1, 2] as const)('CDF-%i sample file', (version) => {
  it.each([0, 1, 7])('%i records: readNetcdf returns every dimension, attribute and value exactly', async (nrec) => {
    const bytes = await writeSample(version, nrec);
    const f = readNetcdf(bytes);
    expect(f.version).toBe(version);
    expect(f.numRecords).toBe(nrec);
    expect(f.recordDimension).toBe('time');
    expect(f.dimensions).toEqual([
      { name: 'time', length: nrec, unlimited: true },
      { name: 'lat', length: 3, unlimited: false },
      { name: 'lon', length: 4, unlimited: false },
      { name: 'strlen', length: 5, unlimited: false },
    ]);

    const g = f.attributes;
    expect(Object.keys(g)).toEqual([
      'title',
      'Conventions',
      'empty',
      'ints',
      'bytes',
      'shorts',
      'floats',
      'doubles',
      'one',
    ]);
    expect(g.title).toEqual({ type: 'char', value: 'Pycno round trip: Température °C' });
    expect(g.empty).toEqual({ type: 'char', value: '' });
    expect(g.ints.type).toBe('int');
    expectValues(g.ints.value, [1, -2, 2147483647, -2147483648], NC_INT);
    expect(g.bytes.type).toBe('byte');
    expectValues(g.bytes.value, [-128, -1, 0, 127], NC_BYTE);
    expect(g.shorts.type).toBe('short');
    expectValues(g.shorts.value, [-32768, 5, 32767], NC_SHORT);
    expect(g.floats.type).toBe('float');
    expectValues(g.floats.value, [1.5, -0.1, 3.4e38], NC_FLOAT);
    expect(g.doubles.type).toBe('double');
    expectValues(g.doubles.value, [Math.PI, 1e300, -0, 5e-324], NC_DOUBLE);
    expectValues(g.one.value, [42], NC_DOUBLE);

    const spec = sampleFile(version);
    expect(f.variables.map((v) => v.name)).toEqual(spec.variables.map((v) => v.name));
    for (const v of spec.variables) {
      const got = f.variable(v.name);
      expect(got.dimensions).toEqual(v.dimensions);
      if (v.name in sampleFixed) {
        expectValues(got.values, sampleFixed[v.name as keyof typeof sampleFixed], v.type);
      } else {
        const per = Array.from(
          { length: nrec },
          (_, r) => sampleRecord(r)[v.name as keyof ReturnType<typeof sampleRecord>],
        );
        if (v.type === NC_CHAR) {
          // Each record slab is 5 chars, null-padded; the reader drops only trailing nulls.
          expect(got.values).toBe(
            per
              .map((t) => (t as string).padEnd(5, '\0'))
              .join('')
              .replace(/\0+$/, ''),
          );
        } else {
          expectValues(
            got.values,
            per.flatMap((x) => (typeof x === 'number' ? [x] : (x as number[]))),
            v.type,
          );
        }
      }
    }
    expect(f.variable('h').shape).toEqual([nrec, 3, 4]);
    expect(f.variable('h').attributes._FillValue).toEqual({ type: 'float', value: new Float64Array([-999]) });
    expect(f.variable('h').attributes.units).toEqual({ type: 'char', value: 'm' });
    expectValues(f.variable('mask').attributes.flag_values.value, [0, 1], NC_BYTE);
    if (nrec > 1) expect(Number.isNaN((f.variable('h').values as Float64Array)[12 + 5])).toBe(true);
  });

  it('raw netcdfjs (no wrapper) reads the float and double data of the same file', async () => {
    const nrec = 4;
    const bytes = await writeSample(version, nrec);
    const r = new NetCDFReader(bytes);
    expect(r.version).toBe(version === 1 ? 'classic format' : '64-bit offset format');
    expect(r.recordDimension.length).toBe(nrec);
    expect(r.getDataVariable('lat')).toEqual(sampleFixed.lat);
    expect(r.getDataVariable('time')).toEqual([0, 0.5, 1, 1.5]);
    const h = (r.getDataVariable('h') as number[][]).flat();
    expect(h).toEqual(
      Array.from({ length: nrec }, (_, k) => sampleRecord(k).h)
        .flat()
        .map(Math.fround),
    );
    expect(r.getAttribute('Conventions')).toBe('CF-1.12');
  });
});

describe('single record variable of a small type (packed records)', () => {
  it.each([
    [
      'short',
      NC_SHORT,
      [
        [1, -2, 3],
        [4, 5, -32768],
        [7, 8, 9],
      ],
    ],
    [
      'byte',
      NC_BYTE,
      [
        [1, -2, 3],
        [4, 5, -128],
        [7, 8, 127],
      ],
    ],
  ] as const)('%s: %j reads back', async (_label, type, recs) => {
    const file: NcFileInput = {
      dimensions: [
        { name: 't', length: 'unlimited' },
        { name: 'k', length: 3 },
      ],
      variables: [{ name: 'x', type, dimensions: ['t', 'k'] }],
    };
    const bytes = await writeNetcdfToMemory(
      file,
      {},
      recs.map((x) => ({ x })),
    );
    const l = computeLayout(file);
    expect(bytes.length).toBe(l.headerSize + 3 * 3 * (type === NC_SHORT ? 2 : 1));
    const f = readNetcdf(bytes);
    expect(f.numRecords).toBe(3);
    expect(Array.from(f.variable('x').values as Float64Array)).toEqual(recs.flat());
  });
});

describe('a file with only fixed variables, and only a record dimension', () => {
  it('no record dimension at all', async () => {
    const bytes = await writeNetcdfToMemory(
      { dimensions: [{ name: 'n', length: 2 }], variables: [{ name: 'a', type: NC_DOUBLE, dimensions: ['n'] }] },
      { a: [1, 2] },
    );
    const f = readNetcdf(bytes);
    expect(f.recordDimension).toBe(null);
    expect(f.numRecords).toBe(0);
    expect(Array.from(f.variable('a').values as Float64Array)).toEqual([1, 2]);
  });
  it('an unwritten fixed variable reads as its fill value', async () => {
    const bytes = await writeNetcdfToMemory(
      {
        dimensions: [{ name: 'n', length: 2 }],
        variables: [
          { name: 'a', type: NC_FLOAT, dimensions: ['n'] },
          { name: 'b', type: NC_INT, dimensions: ['n'], attributes: { _FillValue: 12345 } },
        ],
      },
      {},
    );
    const f = readNetcdf(bytes);
    expect(Array.from(f.variable('a').values as Float64Array)).toEqual([
      Math.fround(9.969209968386869e36),
      Math.fround(9.969209968386869e36),
    ]);
    expect(Array.from(f.variable('b').values as Float64Array)).toEqual([12345, 12345]);
  });
});

/** A sink that stops (throws) at a chosen write, after writing only `keep` bytes of it. */
class CrashingSink implements ByteSink {
  readonly mem = new MemorySink();
  private n = 0;
  constructor(
    private readonly crashAt: number,
    private readonly keep: number,
  ) {}
  write(offset: number, bytes: Uint8Array): void {
    if (this.n++ === this.crashAt) {
      this.mem.write(offset, bytes.subarray(0, this.keep));
      throw new Error('simulated crash');
    }
    this.mem.write(offset, bytes);
  }
}

describe('interrupted writes leave a valid file (records first, then numrecs)', () => {
  // Writes: header, 7 fixed variables (one write each: all small), then per record: data, numrecs.
  const fixedWrites = 1 + 7;
  const file = sampleFile(1);
  const l = computeLayout(file);

  async function writeUntilCrash(sink: CrashingSink): Promise<number> {
    const w = new NetcdfWriter(file, sink);
    try {
      await w.writeHeader();
      for (const [k, v] of Object.entries(sampleFixed)) await w.writeFixed(k, v);
      for (let r = 0; r < 5; r++) await w.appendRecord(sampleRecord(r));
    } catch (e) {
      expect((e as Error).message).toBe('simulated crash');
    }
    return w.numRecords;
  }

  it('a crash half way through the 4th record: the file reads as 3 records', async () => {
    const sink = new CrashingSink(fixedWrites + 2 * 3, Math.floor(l.recordSize / 2));
    expect(await writeUntilCrash(sink)).toBe(3);
    const bytes = sink.mem.bytes();
    expect(bytes.length).toBe(l.beginRecords + 3 * l.recordSize + Math.floor(l.recordSize / 2));
    expect(new DataView(bytes.buffer).getUint32(4)).toBe(3);
    const f = readNetcdf(bytes);
    expect(f.numRecords).toBe(3);
    expect(Array.from(f.variable('h').values as Float64Array)).toEqual(
      [0, 1, 2].flatMap((r) => sampleRecord(r).h).map(Math.fround),
    );
    expect(Array.from(f.variable('time').values as Float64Array)).toEqual([0, 0.5, 1]);
    // netcdfjs on its own agrees.
    expect(new NetCDFReader(bytes).getDataVariable('count')).toEqual([-7, 993, 1993]);
  });

  it('a crash after the 4th record but before its numrecs update: still 3 records', async () => {
    const sink = new CrashingSink(fixedWrites + 2 * 3 + 1, 0);
    expect(await writeUntilCrash(sink)).toBe(3);
    const bytes = sink.mem.bytes();
    expect(bytes.length).toBe(l.beginRecords + 4 * l.recordSize);
    const f = readNetcdf(bytes);
    expect(f.numRecords).toBe(3);
    expect(Array.from(f.variable('count').values as Float64Array)).toEqual([-7, 993, 1993]);
  });

  it('numrecs = STREAMING (FF FF FF FF): the record count comes from the file length', async () => {
    const bytes = await writeSample(1, 4);
    const cut = bytes.slice(0, l.beginRecords + 3 * l.recordSize + 10);
    new DataView(cut.buffer).setUint32(4, 0xffffffff);
    const f = readNetcdf(cut);
    expect(f.numRecords).toBe(3);
    expect(Array.from(f.variable('time').values as Float64Array)).toEqual([0, 0.5, 1]);
  });
});

describe('large record counts', () => {
  it('500 records of a 2 x 3 double field plus time', async () => {
    const file: NcFileInput = {
      dimensions: [
        { name: 'time', length: 'unlimited' },
        { name: 'y', length: 2 },
        { name: 'x', length: 3 },
      ],
      variables: [
        { name: 'time', type: NC_DOUBLE, dimensions: ['time'] },
        { name: 'u', type: NC_DOUBLE, dimensions: ['time', 'y', 'x'] },
      ],
    };
    const sink = new MemorySink(64);
    const w = new NetcdfWriter(file, sink);
    await w.writeHeader();
    const all: number[] = [];
    for (let r = 0; r < 500; r++) {
      const u = Float64Array.from({ length: 6 }, (_, k) => Math.exp(-r / 100) * (k + 1) + r);
      all.push(...u);
      await w.appendRecord({ time: r / 4, u });
    }
    await w.close();
    expect(w.byteLength).toBe(sink.length);
    const f = readNetcdf(sink.bytes());
    expect(f.numRecords).toBe(500);
    expect(Array.from(f.variable('u').values as Float64Array)).toEqual(all);
    expect((f.variable('time').values as Float64Array)[499]).toBe(499 / 4);
  });
});

// --- a second, independent reader: netCDF4 (netcdf-c) or scipy.io under the system Python ---------

const PY = '/usr/bin/python3';
function pythonHas(module: string): boolean {
  const r = spawnSync(PY, ['-c', `import ${module}`], { encoding: 'utf8' });
  return r.status === 0;
}

// Prints the file as JSON: [type, values] for attributes, non-finite numbers as strings.
const PY_DUMP = String.raw`
import json, math, sys
import numpy as np
which, path = sys.argv[1], sys.argv[2]
def num(x):
    x = float(x)
    return x if math.isfinite(x) else repr(x)
def nums(a):
    return [num(x) for x in np.asarray(a).reshape(-1).tolist()]
NAMES = {'int8': 'byte', 'int16': 'short', 'int32': 'int', 'float32': 'float', 'float64': 'double'}
def tname(dt):
    dt = np.dtype(dt)
    return 'char' if dt.kind == 'S' else NAMES[dt.name]
def text(b):
    return b.rstrip(b'\0').decode('utf-8')
def att(v):
    if isinstance(v, str): return ['char', v]
    if isinstance(v, bytes): return ['char', text(v)]
    a = np.asarray(v)
    return [tname(a.dtype), nums(a)]
def values(data):
    data = np.asarray(data)
    if data.dtype.kind == 'S': return text(np.ascontiguousarray(data).tobytes())  # tolist() would drop inner nulls
    return nums(data)
out = {'vars': {}}
if which == 'netCDF4':
    import netCDF4
    ds = netCDF4.Dataset(path, 'r')
    ds.set_auto_maskandscale(False)
    ds.set_auto_chartostring(False)
    out['format'] = ds.data_model
    out['dims'] = [[d.name, len(d), d.isunlimited()] for d in ds.dimensions.values()]
    out['gatts'] = {k: att(ds.getncattr(k)) for k in ds.ncattrs()}
    for name, v in ds.variables.items():
        out['vars'][name] = {'type': tname(v.dtype), 'dims': list(v.dimensions),
                             'atts': {k: att(v.getncattr(k)) for k in v.ncattrs()}, 'values': values(v[...])}
else:
    from scipy.io import netcdf_file
    f = netcdf_file(path, 'r', mmap=False, maskandscale=False)
    out['format'] = 'CDF-%d' % f.version_byte
    out['dims'] = [[d, f.dimensions[d] if f.dimensions[d] is not None else f._recs, f.dimensions[d] is None] for d in f._dims]
    out['gatts'] = {k: att(v) for k, v in f._attributes.items()}
    for name, v in f.variables.items():
        out['vars'][name] = {'type': tname(v.data.dtype), 'dims': list(v.dimensions),
                             'atts': {k: att(a) for k, a in v._attributes.items()}, 'values': values(v.data)}
    f.close()
print(json.dumps(out))
`;

const fromPy = (x: unknown) => (x === 'nan' ? NaN : x === 'inf' ? Infinity : x === '-inf' ? -Infinity : x);

describe.each(['netCDF4', 'scipy.io'])('second reader: %s under /usr/bin/python3', (module) => {
  const available = pythonHas(module);
  for (const version of [1, 2] as const)
    it(`reads every value of a CDF-${version} file as written`, async (ctx) => {
      ctx.skip(
        !available,
        `${PY} cannot import ${module} (Debian: apt-get install python3-${module === 'netCDF4' ? 'netcdf4' : 'scipy'})`,
      );
      const nrec = 3;
      const bytes = await writeSample(version, nrec);
      const dir = mkdtempSync(join(tmpdir(), 'pycno-nc-'));
      try {
        const path = join(dir, `sample-cdf${version}.nc`);
        writeFileSync(path, bytes);
        const r = spawnSync(PY, ['-c', PY_DUMP, module === 'netCDF4' ? 'netCDF4' : 'scipy', path], {
          encoding: 'utf8',
        });
        expect(r.stderr).toBe('');
        expect(r.status).toBe(0);
        const py = JSON.parse(r.stdout);
        const spec = sampleFile(version);
        if (module === 'netCDF4') expect(py.format).toBe(version === 1 ? 'NETCDF3_CLASSIC' : 'NETCDF3_64BIT_OFFSET');
        else expect(py.format).toBe(`CDF-${version}`);
        expect(py.dims).toEqual([
          ['time', nrec, true],
          ['lat', 3, false],
          ['lon', 4, false],
          ['strlen', 5, false],
        ]);

        // Attributes: compared with the values given to the writer, via our reader's typing.
        const ours = readNetcdf(bytes);
        const asPy = (atts: Record<string, { type: string; value: string | Float64Array }>) =>
          Object.fromEntries(
            Object.entries(atts).map(([k, a]) => [
              k,
              [a.type, typeof a.value === 'string' ? a.value : Array.from(a.value)],
            ]),
          );
        expect(py.gatts).toEqual(asPy(ours.attributes));
        expect(py.gatts.title).toEqual(['char', 'Pycno round trip: Température °C']);
        expect(py.gatts.shorts).toEqual(['short', [-32768, 5, 32767]]);
        expect(py.gatts.floats).toEqual(['float', [1.5, -0.1, 3.4e38].map(Math.fround)]);

        expect(Object.keys(py.vars)).toEqual(spec.variables.map((v) => v.name));
        for (const v of spec.variables) {
          const pv = py.vars[v.name];
          expect(pv.type).toBe(['', 'byte', 'char', 'short', 'int', 'float', 'double'][v.type]);
          expect(pv.dims).toEqual(v.dimensions);
          expect(pv.atts).toEqual(asPy(ours.variable(v.name).attributes));
          let want: ArrayLike<number> | number | string;
          if (v.name in sampleFixed) want = sampleFixed[v.name as keyof typeof sampleFixed];
          else {
            const per = Array.from(
              { length: nrec },
              (_, k) => sampleRecord(k)[v.name as keyof ReturnType<typeof sampleRecord>],
            );
            want =
              v.type === NC_CHAR
                ? per
                    .map((t) => (t as string).padEnd(5, '\0'))
                    .join('')
                    .replace(/\0+$/, '')
                : per.flatMap((x) => (typeof x === 'number' ? [x] : (x as number[])));
          }
          if (v.type === NC_CHAR) expect(pv.values).toBe(want);
          else expectValues(Float64Array.from(pv.values.map(fromPy)), want, v.type);
        }
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    });

  // The reference library decides the single-small-record-variable special case (no padding).
  it('reads a file whose only record variable is short (packed records)', async (ctx) => {
    ctx.skip(!available, `${PY} cannot import ${module}`);
    const file: NcFileInput = {
      dimensions: [
        { name: 't', length: 'unlimited' },
        { name: 'k', length: 3 },
      ],
      variables: [{ name: 'x', type: NC_SHORT, dimensions: ['t', 'k'] }],
    };
    const recs = [
      [1, -2, 3],
      [4, 5, -32768],
      [7, 8, 9],
    ];
    const bytes = await writeNetcdfToMemory(
      file,
      {},
      recs.map((x) => ({ x })),
    );
    const dir = mkdtempSync(join(tmpdir(), 'pycno-nc-'));
    try {
      const path = join(dir, 'packed.nc');
      writeFileSync(path, bytes);
      const r = spawnSync(PY, ['-c', PY_DUMP, module === 'netCDF4' ? 'netCDF4' : 'scipy', path], { encoding: 'utf8' });
      expect(r.stderr).toBe('');
      const py = JSON.parse(r.stdout);
      expect(py.dims).toEqual([
        ['t', 3, true],
        ['k', 3, false],
      ]);
      expect(py.vars.x.values).toEqual(recs.flat());
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
