// Gridded vector data (painted in the page, or read from a CSV or NetCDF file) and its
// interpolation onto the model's u and v faces: bilinear in space, linear in time.
//
// Outside the data grid we hold the edge value. A painted grid usually stores cell-centre samples,
// so the model's outermost faces lie half a cell outside it; dropping to zero there would put a
// spurious stress jump (and so a spurious curl) along the coast.

import { NetCDFReader } from 'netcdfjs';
import { NetcdfReadError, readNetcdf } from '../io/netcdf-read.ts';
import type { GriddedVectors, LonLatGrid } from './spec.ts';
import { ForcingError } from './errors.ts';

/** A regular lon/lat grid of vectors, possibly with several time slices. */
export interface GriddedSeries extends LonLatGrid {
  /** Day of each slice, strictly increasing; null when the data have no time axis (one slice). */
  days: Float64Array | null;
  /** One array per slice, nLat * nLon values, row-major from south to north, west to east. */
  x: Float64Array[];
  y: Float64Array[];
  /** How many values were missing (fill values or NaN) and were set to 0. */
  missing: number;
}

/** A value as shown in a message, whatever its type. */
function shown(v: unknown): string {
  if (typeof v === 'number') return String(v);
  const s = JSON.stringify(v) ?? String(v);
  return s.length > 40 ? `${s.slice(0, 40)}...` : s;
}

function checkAxis(what: string, start: number, step: number, n: number): void {
  if (!Number.isInteger(n) || n < 1)
    throw new ForcingError(`${what}: the number of points must be a positive whole number (got ${shown(n)})`);
  if (typeof start !== 'number' || !Number.isFinite(start))
    throw new ForcingError(`${what}: the first coordinate must be a finite number (got ${shown(start)})`);
  if (n > 1 && !(typeof step === 'number' && step > 0 && Number.isFinite(step)))
    throw new ForcingError(`${what}: the spacing must be positive (got ${shown(step)})`);
}

/** Check a painted grid and turn it into a one-slice series. */
export function seriesFromGrid(g: GriddedVectors, what = 'painted grid'): GriddedSeries {
  if (g === null || typeof g !== 'object' || Array.isArray(g))
    throw new ForcingError(
      `${what}: expected an object { lon0, lat0, dLon, dLat, nLon, nLat, x, y } (got ${shown(g)})`,
    );
  checkAxis(`${what} longitude`, g.lon0, g.dLon, g.nLon);
  checkAxis(`${what} latitude`, g.lat0, g.dLat, g.nLat);
  const n = g.nLon * g.nLat;
  if (!Array.isArray(g.x) || !Array.isArray(g.y) || g.x.length !== n || g.y.length !== n) {
    const len = (a: unknown) => (Array.isArray(a) ? String(a.length) : `no list but ${shown(a)}`);
    throw new ForcingError(
      `${what}: x and y must hold nLat * nLon = ${n} values each (got ${len(g.x)} and ${len(g.y)})`,
    );
  }
  const x = Float64Array.from(g.x);
  const y = Float64Array.from(g.y);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(x[k]) || !Number.isFinite(y[k])) {
      const i = k % g.nLon;
      const j = Math.floor(k / g.nLon);
      throw new ForcingError(
        `${what}: value ${k} (lon ${g.lon0 + i * g.dLon}, lat ${g.lat0 + j * g.dLat}) is not a finite number`,
      );
    }
  }
  return {
    lon0: g.lon0,
    lat0: g.lat0,
    dLon: g.dLon,
    dLat: g.dLat,
    nLon: g.nLon,
    nLat: g.nLat,
    days: null,
    x: [x],
    y: [y],
    missing: 0,
  };
}

/** Precomputed bilinear weights of a set of points in a data grid: 4 corners per point. */
export interface Weights {
  readonly n: number;
  readonly corner: Int32Array; // 4 n
  readonly weight: Float64Array; // 4 n
}

/** Fractional index along an axis, held at the ends. */
function axisPosition(v: number, start: number, step: number, count: number): [number, number, number] {
  if (count === 1) return [0, 0, 0];
  let f = (v - start) / step;
  if (f <= 0) f = 0;
  else if (f >= count - 1) f = count - 1;
  const i0 = Math.min(Math.floor(f), count - 2);
  return [i0, i0 + 1, f - i0];
}

export function bilinearWeights(s: GriddedSeries, lons: ArrayLike<number>, lats: ArrayLike<number>): Weights {
  const n = lons.length;
  const corner = new Int32Array(4 * n);
  const weight = new Float64Array(4 * n);
  for (let p = 0; p < n; p++) {
    const [i0, i1, fx] = axisPosition(lons[p], s.lon0, s.dLon, s.nLon);
    const [j0, j1, fy] = axisPosition(lats[p], s.lat0, s.dLat, s.nLat);
    const q = 4 * p;
    corner[q] = j0 * s.nLon + i0;
    corner[q + 1] = j0 * s.nLon + i1;
    corner[q + 2] = j1 * s.nLon + i0;
    corner[q + 3] = j1 * s.nLon + i1;
    weight[q] = (1 - fx) * (1 - fy);
    weight[q + 1] = fx * (1 - fy);
    weight[q + 2] = (1 - fx) * fy;
    weight[q + 3] = fx * fy;
  }
  return { n, corner, weight };
}

/** out[p] (+)= scale * (data interpolated at point p). */
export function applyWeights(
  w: Weights,
  data: Float64Array,
  out: Float64Array,
  scale: number,
  accumulate: boolean,
): void {
  const { corner: c, weight: wt } = w;
  for (let p = 0, q = 0; p < w.n; p++, q += 4) {
    const v = wt[q] * data[c[q]] + wt[q + 1] * data[c[q + 1]] + wt[q + 2] * data[c[q + 2]] + wt[q + 3] * data[c[q + 3]];
    out[p] = accumulate ? out[p] + scale * v : scale * v;
  }
}

/**
 * The two slices around `day` and the weight of the later one; held at the first or last slice
 * outside the data's time span.
 */
export function timeBracket(days: Float64Array | null, day: number): [number, number, number] {
  if (!days || days.length === 1) return [0, 0, 0];
  const n = days.length;
  if (day <= days[0]) return [0, 0, 0];
  if (day >= days[n - 1]) return [n - 1, n - 1, 0];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (days[mid] <= day) lo = mid;
    else hi = mid;
  }
  return [lo, hi, (day - days[lo]) / (days[hi] - days[lo])];
}

// ---------------------------------------------------------------------------------------------
// NetCDF (classic and 64-bit-offset) adapter.

export interface NetcdfVectorOptions {
  /** Names of the eastward and northward variables; see DEFAULT_X_NAMES / DEFAULT_Y_NAMES. */
  xVariable?: string;
  yVariable?: string;
}

/** Variable names tried, in order, when the part does not name them. */
export const DEFAULT_X_NAMES = ['taux', 'u10', 'uwnd', 'u'];
export const DEFAULT_Y_NAMES = ['tauy', 'v10', 'vwnd', 'v'];

interface NcVariable {
  name: string;
  dimensions: number[];
  attributes: Array<{ name: string; value: number | string }>;
  record: boolean;
}

function attr(v: NcVariable, name: string): number | string | undefined {
  return v.attributes.find((a) => a.name === name)?.value;
}

const DAY_FACTORS: Array<[RegExp, number]> = [
  [/^\s*days?\s+since\b/i, 1],
  [/^\s*(hours?|hrs?|h)\s+since\b/i, 1 / 24],
  [/^\s*(minutes?|mins?)\s+since\b/i, 1 / 1440],
  [/^\s*(seconds?|secs?|s)\s+since\b/i, 1 / 86400],
];

/**
 * Read vectors on a lon/lat(/time) grid from NetCDF bytes. Coordinates are found as coordinate
 * variables (1-D, named like their dimension) with units degrees_east / degrees_north, or named
 * lon/longitude and lat/latitude; time by units "<unit> since <date>" (the date is taken as the
 * run's day 0). Latitudes or longitudes that run backwards are reversed. The data variables must
 * have dimensions (lat, lon) or (time, lat, lon).
 */
export function readNetcdfVectors(bytes: Uint8Array, opts: NetcdfVectorOptions = {}): GriddedSeries {
  // The bounds-checked header walk first: netcdfjs alone throws bare RangeErrors and TypeErrors on
  // damaged headers, and sizes arrays from whatever lengths the header claims.
  try {
    readNetcdf(bytes, { only: [] });
  } catch (err) {
    if (err instanceof NetcdfReadError) throw new ForcingError(`not a readable NetCDF classic file: ${err.message}`);
    throw err;
  }
  let reader: NetCDFReader;
  try {
    reader = new NetCDFReader(bytes);
  } catch (err) {
    throw new ForcingError(`not a readable NetCDF classic file: ${(err as Error).message}`);
  }
  const dims = reader.dimensions;
  const vars = reader.variables as unknown as NcVariable[];
  const coord = (v: NcVariable) => v.dimensions.length === 1 && dims[v.dimensions[0]].name === v.name;
  const units = (v: NcVariable) =>
    String(attr(v, 'units') ?? '')
      .trim()
      .toLowerCase();
  const findCoord = (unitNames: string[], names: string[]) =>
    vars.find((v) => coord(v) && unitNames.includes(units(v))) ??
    vars.find((v) => coord(v) && names.includes(v.name.toLowerCase()));
  const lonVar = findCoord(['degrees_east', 'degree_east', 'degree_e', 'degrees_e'], ['lon', 'longitude']);
  const latVar = findCoord(['degrees_north', 'degree_north', 'degree_n', 'degrees_n'], ['lat', 'latitude']);
  if (!lonVar || !latVar)
    throw new ForcingError(
      'NetCDF file: no longitude or latitude coordinate variable (units degrees_east / degrees_north)',
    );
  const pick = (given: string | undefined, defaults: string[], what: string): NcVariable => {
    const names = given ? [given] : defaults;
    const v = vars.find((c) => names.includes(c.name));
    if (!v) {
      const have =
        vars
          .filter((c) => !coord(c))
          .map((c) => c.name)
          .join(', ') || 'none';
      throw new ForcingError(
        `NetCDF file: no ${what} variable named ${names.map((s) => `'${s}'`).join(' or ')} (data variables: ${have})`,
      );
    }
    return v;
  };
  const xVar = pick(opts.xVariable, DEFAULT_X_NAMES, 'eastward');
  const yVar = pick(opts.yVariable, DEFAULT_Y_NAMES, 'northward');

  const numbers = (v: NcVariable): number[] => {
    let raw: unknown[];
    try {
      raw = reader.getDataVariable(v as never) as unknown[];
    } catch (err) {
      throw new ForcingError(`NetCDF file: variable '${v.name}' cannot be read: ${(err as Error).message}`);
    }
    const out: number[] = [];
    for (const r of raw) {
      if (Array.isArray(r)) for (const q of r) out.push(Number(q));
      else out.push(Number(r));
    }
    return out;
  };

  const lonDim = lonVar.dimensions[0];
  const latDim = latVar.dimensions[0];
  const lons = numbers(lonVar);
  const lats = numbers(latVar);
  const axis = (what: string, vals: number[]): { start: number; step: number; reversed: boolean } => {
    const n = vals.length;
    if (n === 0) throw new ForcingError(`NetCDF file: the ${what} axis is empty`);
    if (n === 1) return { start: vals[0], step: 1, reversed: false };
    const reversed = vals[1] < vals[0];
    const v = reversed ? [...vals].reverse() : vals;
    const step = (v[n - 1] - v[0]) / (n - 1);
    for (let k = 1; k < n; k++) {
      // Coordinates are often float32: allow a relative slack well above its precision.
      if (!(Math.abs(v[k] - v[k - 1] - step) <= 1e-3 * Math.abs(step))) {
        throw new ForcingError(
          `NetCDF file: the ${what} axis is not evenly spaced (${v[k - 1]} to ${v[k]}; expected steps of ${step})`,
        );
      }
    }
    return { start: v[0], step, reversed };
  };
  const ax = axis('longitude', lons);
  const ay = axis('latitude', lats);
  const nLon = lons.length;
  const nLat = lats.length;

  // Time axis: the dimension in front of (lat, lon), if any.
  const layout = (v: NcVariable): number | null => {
    const d = v.dimensions;
    if (d.length === 2 && d[0] === latDim && d[1] === lonDim) return null;
    if (d.length === 3 && d[1] === latDim && d[2] === lonDim) return d[0];
    const names = d.map((k) => dims[k].name).join(', ');
    throw new ForcingError(
      `NetCDF file: variable '${v.name}' has dimensions (${names}); expected (${dims[latDim].name}, ${dims[lonDim].name}) or (time, ${dims[latDim].name}, ${dims[lonDim].name})`,
    );
  };
  const tDimX = layout(xVar);
  const tDimY = layout(yVar);
  if (tDimX !== tDimY)
    throw new ForcingError(`NetCDF file: '${xVar.name}' and '${yVar.name}' do not share the same dimensions`);
  let days: Float64Array | null = null;
  let nT = 1;
  if (tDimX !== null) {
    const tName = dims[tDimX].name;
    const tVar = vars.find((v) => coord(v) && v.dimensions[0] === tDimX);
    if (!tVar) throw new ForcingError(`NetCDF file: the time dimension '${tName}' has no coordinate variable`);
    const u = String(attr(tVar, 'units') ?? '');
    const factor = DAY_FACTORS.find(([re]) => re.test(u))?.[1];
    if (factor === undefined)
      throw new ForcingError(`NetCDF file: time units '${u}' are not '<days|hours|minutes|seconds> since <date>'`);
    const t = numbers(tVar).map((x) => x * factor);
    nT = t.length;
    if (nT === 0) throw new ForcingError('NetCDF file: the time axis is empty');
    for (let k = 1; k < nT; k++) {
      if (!(t[k] > t[k - 1]))
        throw new ForcingError(`NetCDF file: times must increase (step ${k}: ${t[k - 1]} then ${t[k]} days)`);
    }
    days = Float64Array.from(t);
  }

  let missing = 0;
  const slices = (v: NcVariable): Float64Array[] => {
    const vals = numbers(v);
    if (vals.length !== nT * nLat * nLon) {
      throw new ForcingError(`NetCDF file: '${v.name}' holds ${vals.length} values, expected ${nT * nLat * nLon}`);
    }
    const scale = Number(attr(v, 'scale_factor') ?? 1);
    const offset = Number(attr(v, 'add_offset') ?? 0);
    const fills = [attr(v, '_FillValue'), attr(v, 'missing_value')].filter((a) => a !== undefined).map(Number);
    const out: Float64Array[] = [];
    for (let s = 0; s < nT; s++) {
      const a = new Float64Array(nLat * nLon);
      for (let j = 0; j < nLat; j++) {
        const jj = ay.reversed ? nLat - 1 - j : j;
        for (let i = 0; i < nLon; i++) {
          const ii = ax.reversed ? nLon - 1 - i : i;
          const r = vals[(s * nLat + jj) * nLon + ii];
          // Packed values are compared with the fill value before unpacking (CF rule); 9.97e36 is
          // NetCDF's default fill for floats.
          if (!Number.isFinite(r) || fills.includes(r) || Math.abs(r) >= 9.96e36) {
            missing++;
            a[j * nLon + i] = 0;
          } else a[j * nLon + i] = r * scale + offset;
        }
      }
      out.push(a);
    }
    return out;
  };
  const x = slices(xVar);
  const y = slices(yVar);
  return { lon0: ax.start, lat0: ay.start, dLon: ax.step, dLat: ay.step, nLon, nLat, days, x, y, missing };
}
