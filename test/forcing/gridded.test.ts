// Gridded vectors: bilinear interpolation, time interpolation, the CSV layout and the NetCDF adapter.
import { describe, expect, it } from 'vitest';
import {
  applyWeights,
  bilinearWeights,
  readNetcdfVectors,
  seriesFromGrid,
  timeBracket,
} from '../../model/forcing/gridded.ts';
import { parseWindCsv } from '../../model/forcing/csv.ts';
import type { GriddedVectors } from '../../model/forcing/spec.ts';

const linear = (lon: number, lat: number) => 0.3 - 0.002 * lon + 0.01 * lat;

function paintedLinear(): GriddedVectors {
  const g: GriddedVectors = { lon0: 120, lat0: -10, dLon: 2.5, dLat: 1.5, nLon: 25, nLat: 15, x: [], y: [] };
  for (let j = 0; j < g.nLat; j++) {
    for (let i = 0; i < g.nLon; i++) {
      const lon = g.lon0 + i * g.dLon;
      const lat = g.lat0 + j * g.dLat;
      g.x.push(linear(lon, lat));
      g.y.push(2 * lat - lon);
    }
  }
  return g;
}

describe('bilinear interpolation', () => {
  it('reproduces a linear field exactly inside the data grid', () => {
    const s = seriesFromGrid(paintedLinear());
    const lons = Float64Array.from([120, 121.3, 150.01, 179.9, 180]);
    const lats = Float64Array.from([-10, -3.3, 0, 10.9, 11]);
    const w = bilinearWeights(s, lons, lats);
    const out = new Float64Array(lons.length);
    applyWeights(w, s.x[0], out, 1, false);
    lons.forEach((lon, k) => expect(out[k]).toBeCloseTo(linear(lon, lats[k]), 12));
    applyWeights(w, s.y[0], out, 2, false);
    lons.forEach((lon, k) => expect(out[k]).toBeCloseTo(2 * (2 * lats[k] - lon), 10));
  });

  it('holds the edge value outside the data grid', () => {
    const s = seriesFromGrid(paintedLinear());
    const w = bilinearWeights(s, Float64Array.from([100, 200, 150]), Float64Array.from([0, 0, 40]));
    const out = new Float64Array(3);
    applyWeights(w, s.x[0], out, 1, false);
    expect(out[0]).toBeCloseTo(linear(120, 0), 12);
    expect(out[1]).toBeCloseTo(linear(180, 0), 12);
    expect(out[2]).toBeCloseTo(linear(150, 11), 12);
  });

  it('accumulates with a scale', () => {
    const s = seriesFromGrid(paintedLinear());
    const w = bilinearWeights(s, [130], [1]);
    const out = Float64Array.of(5);
    applyWeights(w, s.x[0], out, 0.5, true);
    expect(out[0]).toBeCloseTo(5 + 0.5 * linear(130, 1), 12);
  });

  it('checks a painted grid', () => {
    const g = paintedLinear();
    g.x.pop();
    expect(() => seriesFromGrid(g)).toThrow(/nLat \* nLon = 375/);
    const h = paintedLinear();
    h.y[26] = Number.NaN;
    expect(() => seriesFromGrid(h)).toThrow(/value 26 \(lon 122.5, lat -8.5\)/);
  });

  it('time bracket: linear in time, held beyond the ends', () => {
    const days = Float64Array.from([0, 10, 30]);
    expect(timeBracket(days, -5)).toEqual([0, 0, 0]);
    expect(timeBracket(days, 5)).toEqual([0, 1, 0.5]);
    expect(timeBracket(days, 25)).toEqual([1, 2, 0.75]);
    expect(timeBracket(days, 99)).toEqual([2, 2, 0]);
    expect(timeBracket(null, 7)).toEqual([0, 0, 0]);
  });
});

describe('CSV layout', () => {
  it('reads lon,lat,x,y in any row order', () => {
    const text = '# trades\nlon,lat,x,y\n130,0,-0.05,0.01\n131,1,-0.02,0.03\n130,1,-0.04,0.02\n131,0,-0.03,0.00\n';
    const s = parseWindCsv(text);
    expect([s.lon0, s.lat0, s.dLon, s.dLat, s.nLon, s.nLat, s.days]).toEqual([130, 0, 1, 1, 2, 2, null]);
    expect(Array.from(s.x[0])).toEqual([-0.05, -0.03, -0.04, -0.02]);
    expect(Array.from(s.y[0])).toEqual([0.01, 0, 0.02, 0.03]);
  });

  it('reads a day column, bytes and CRLF, columns in any order', () => {
    const rows = ['x,y,day,lat,lon'];
    for (const day of [0, 30])
      for (const lat of [-1, 1])
        for (const lon of [140, 142, 144]) rows.push(`${day + lon / 100},${lat},${day},${lat},${lon}`);
    const s = parseWindCsv(new TextEncoder().encode(rows.join('\r\n')));
    expect(Array.from(s.days ?? [])).toEqual([0, 30]);
    expect([s.nLon, s.nLat, s.dLon, s.dLat]).toEqual([3, 2, 2, 2]);
    expect(s.x[1][4]).toBeCloseTo(30 + 142 / 100, 12);
    expect(s.y[0][3]).toBe(1);
  });

  it('errors name the line', () => {
    expect(() => parseWindCsv('lon,lat,speed,y\n1,2,3,4')).toThrow(
      'CSV line 1, column 3: the header names a column other than lon, lat, x, y and day',
    );
    expect(() => parseWindCsv('lon,lat,x\n')).toThrow(/line 1: the header has no 'y' column/);
    expect(() => parseWindCsv('#c\n\nlon,lat,x,y\n1,2,3,4\n1,3,abc,4\n')).toThrow(
      "CSV line 5, column 3 ('x'): the value is not a number (a field of 3 characters)",
    );
    expect(() => parseWindCsv('lon,lat,x,y\n1,2,3\n')).toThrow(
      'CSV line 2: 3 values, but the header (line 1) names 4 columns',
    );
    expect(() => parseWindCsv('lon,lat,x,y\n1,2,3,4\n2,2,3,4\n1,2,5,5\n')).toThrow(
      'CSV line 4: lon 1, lat 2 was already given on line 2',
    );
    expect(() => parseWindCsv('lon,lat,x,y\n0,0,1,1\n1,0,1,1\n3,0,1,1\n')).toThrow(
      /lon values are not evenly spaced: 1 then 3 \(line 4\)/,
    );
    expect(() => parseWindCsv('lon,lat,x,y\n0,0,1,1\n1,0,1,1\n0,1,1,1\n')).toThrow(
      /do not form a full grid: 3 rows for 2 longitudes x 2 latitudes; no row for lon 1, lat 1/,
    );
    expect(() => parseWindCsv('lon,lat,day,x,y\n0,0,0,1,1\n0,0,5,1,1\n1,0,0,1,1\n')).toThrow(
      /no row for lon 1, lat 0, day 5/,
    );
    expect(() => parseWindCsv('# only a comment\n')).toThrow(/empty/);
    expect(() => parseWindCsv('lon,lat,x,y\n')).toThrow(/no data rows/);
  });
});

// A minimal NetCDF classic (CDF-1) writer, written here from the format description
// (Unidata NUG Appendix B, check-values.md section 8), so the adapter is tested on real bytes.
interface NcVar {
  name: string;
  dims: number[];
  attrs: Record<string, string | number>;
  data: number[];
}
function writeClassic(
  dims: Array<[string, number]>,
  vars: NcVar[],
  recordDim: number | null,
  numrecs: number,
): Uint8Array {
  const parts: number[] = [];
  const int = (v: number) => parts.push((v >>> 24) & 255, (v >>> 16) & 255, (v >>> 8) & 255, v & 255);
  const name = (s: string) => {
    int(s.length);
    for (const c of s) parts.push(c.charCodeAt(0));
    while (parts.length % 4) parts.push(0);
  };
  const isRec = (v: NcVar) => recordDim !== null && v.dims[0] === recordDim;
  const sliceLen = (v: NcVar) => v.dims.filter((d) => d !== recordDim).reduce((a, d) => a * dims[d][1], 1);
  const header = (begins: number[]) => {
    parts.length = 0;
    for (const c of 'CDF') parts.push(c.charCodeAt(0));
    parts.push(1);
    int(numrecs);
    int(10);
    int(dims.length);
    for (const [n, len] of dims) {
      name(n);
      int(len);
    }
    int(0);
    int(0); // no global attributes
    int(11);
    int(vars.length);
    vars.forEach((v, k) => {
      name(v.name);
      int(v.dims.length);
      for (const d of v.dims) int(d);
      const attrs = Object.entries(v.attrs);
      if (attrs.length === 0) {
        int(0);
        int(0);
      } else {
        int(12);
        int(attrs.length);
        for (const [an, av] of attrs) {
          name(an);
          if (typeof av === 'string') {
            int(2);
            name(av);
          } else {
            int(6);
            int(1);
            const b = new DataView(new ArrayBuffer(8));
            b.setFloat64(0, av);
            for (let q = 0; q < 8; q++) parts.push(b.getUint8(q));
          }
        }
      }
      int(6); // NC_DOUBLE
      int(sliceLen(v) * 8);
      int(begins[k]);
    });
    return parts.length;
  };
  const size = header(vars.map(() => 0));
  const begins: number[] = [];
  let at = size;
  for (const v of vars) {
    if (isRec(v)) continue;
    begins[vars.indexOf(v)] = at;
    at += sliceLen(v) * 8;
  }
  const recStart = at;
  let recStep = 0;
  for (const v of vars) {
    if (!isRec(v)) continue;
    begins[vars.indexOf(v)] = recStart + recStep;
    recStep += sliceLen(v) * 8;
  }
  header(begins);
  const out = new DataView(new ArrayBuffer(recStart + recStep * numrecs));
  new Uint8Array(out.buffer).set(parts);
  for (const v of vars) {
    const k = vars.indexOf(v);
    const n = sliceLen(v);
    if (!isRec(v)) v.data.forEach((x, q) => out.setFloat64(begins[k] + 8 * q, x));
    else
      for (let r = 0; r < numrecs; r++)
        for (let q = 0; q < n; q++) out.setFloat64(begins[k] + r * recStep + 8 * q, v.data[r * n + q]);
  }
  return new Uint8Array(out.buffer);
}

describe('NetCDF adapter', () => {
  // time (record, hours), lat north-to-south, lon west-to-east; packed with a scale factor.
  const lons = [140, 145, 150, 155];
  const latsNS = [4, 2, 0, -2];
  const hours = [0, 240];
  const field = (h: number, lat: number, lon: number) => h / 24 + 0.1 * lat + 0.01 * lon;
  const build = (fillAt?: number) => {
    const tx: number[] = [];
    const ty: number[] = [];
    for (const h of hours)
      for (const lat of latsNS)
        for (const lon of lons) {
          tx.push(field(h, lat, lon) / 0.5); // stored packed: value = stored * 0.5 + 1
          ty.push(-lat);
        }
    if (fillAt !== undefined) tx[fillAt] = -999;
    return writeClassic(
      [
        ['time', 0],
        ['lat', 4],
        ['lon', 4],
      ],
      [
        { name: 'time', dims: [0], attrs: { units: 'hours since 2000-01-01' }, data: hours },
        { name: 'lat', dims: [1], attrs: { units: 'degrees_north' }, data: latsNS },
        { name: 'lon', dims: [2], attrs: { units: 'degrees_east' }, data: lons },
        { name: 'taux', dims: [0, 1, 2], attrs: { scale_factor: 0.5, _FillValue: -999 }, data: tx.map((v) => v) },
        { name: 'tauy', dims: [0, 1, 2], attrs: {}, data: ty },
      ],
      0,
      hours.length,
    );
  };

  it('reads a record time axis, flips latitude, converts hours to days, unpacks', () => {
    // taux stored as (value / 0.5) with scale_factor 0.5 and no offset.
    const s = readNetcdfVectors(build());
    expect([s.lon0, s.dLon, s.nLon, s.lat0, s.dLat, s.nLat]).toEqual([140, 5, 4, -2, 2, 4]);
    expect(Array.from(s.days ?? [])).toEqual([0, 10]);
    // row j = 0 is now the southernmost latitude (-2)
    expect(s.x[1][0 * 4 + 2]).toBeCloseTo(field(240, -2, 150), 12);
    expect(s.x[0][3 * 4 + 1]).toBeCloseTo(field(0, 4, 145), 12);
    expect(s.y[0][0]).toBe(2);
    expect(s.missing).toBe(0);
  });

  it('counts fill values as missing and sets them to zero', () => {
    const s = readNetcdfVectors(build(0)); // time 0, lat 4 (north row), lon 140
    expect(s.missing).toBe(1);
    expect(s.x[0][3 * 4]).toBe(0);
  });

  it('names the variables it can choose from', () => {
    expect(() => readNetcdfVectors(build(), { xVariable: 'uas' })).toThrow(
      /no eastward variable named 'uas' \(data variables: taux, tauy\)/,
    );
    expect(() => readNetcdfVectors(new Uint8Array([1, 2, 3, 4]))).toThrow(/not a readable NetCDF/);
  });
});
