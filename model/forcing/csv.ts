// Gridded winds or stresses from CSV text. Layout (docs/wind.md):
//
//   # comment lines start with '#'; blank lines are skipped
//   lon,lat,x,y            <- header, names in any order, or lon,lat,day,x,y for several times
//   130,-2,-0.05,0
//   ...
//
// One row per grid point (and day). Longitudes and latitudes must each be evenly spaced and every
// combination must be present exactly once, so the rows form a regular grid.

import { decodeUtf8Text, TextEncodingError } from '../io/text-decode.ts';
import { ForcingError } from './errors.ts';
import type { GriddedSeries } from './gridded.ts';

const REQUIRED = ['lon', 'lat', 'x', 'y'] as const;

// Messages name the line and column and say what is wrong, but never repeat the file's text: a
// path in a scenario (or in a run file from someone else) can name any readable file as a wind
// file, and its contents are nobody's business. Numbers are shown once read as numbers.

/** "empty" or "not a number (12 characters)": what a field is, without its text. */
function notNumber(field: string, value: number): string {
  if (field === '') return 'is empty; every field must hold a number';
  const size = `a field of ${field.length} character${field.length === 1 ? '' : 's'}`;
  return Number.isNaN(value) ? `is not a number (${size})` : `is too large for a number (${size})`;
}
const COLUMNS = new Set(['lon', 'lat', 'day', 'x', 'y']);

/** Distinct values, sorted, with the first line where each appears. */
function distinct(values: Float64Array, lines: Int32Array): { v: number[]; line: number[] } {
  const first = new Map<number, number>();
  for (let k = 0; k < values.length; k++) if (!first.has(values[k])) first.set(values[k], lines[k]);
  const v = [...first.keys()].sort((a, b) => a - b);
  return { v, line: v.map((x) => first.get(x) as number) };
}

function regular(what: string, d: { v: number[]; line: number[] }): { start: number; step: number } {
  const v = d.v;
  if (v.length === 1) return { start: v[0], step: 1 };
  const first = v[1] - v[0];
  for (let k = 1; k < v.length; k++) {
    if (Math.abs(v[k] - v[k - 1] - first) > 1e-6 * first) {
      throw new ForcingError(
        `CSV: the ${what} values are not evenly spaced: ${v[k - 1]} then ${v[k]} (line ${d.line[k]}), expected steps of ${first}`,
      );
    }
  }
  // The end-to-end mean step is the most accurate once the spacing is known to be even.
  return { start: v[0], step: (v[v.length - 1] - v[0]) / (v.length - 1) };
}

export function parseWindCsv(content: string | Uint8Array): GriddedSeries {
  let text: string;
  try {
    text = typeof content === 'string' ? content : decodeUtf8Text(content);
  } catch (e) {
    if (e instanceof TextEncodingError) throw new ForcingError(`CSV: ${e.message}`);
    throw e;
  }
  const lines = text.split(/\r\n|\n|\r/);
  let header: string[] | null = null;
  let headerLine = 0;
  const col: Record<string, number> = Object.create(null);
  const rows: number[][] = [];
  const rowLine: number[] = [];
  for (let n = 0; n < lines.length; n++) {
    const raw = lines[n].trim();
    const lineNo = n + 1;
    if (raw === '' || raw.startsWith('#')) continue;
    const fields = raw.split(',').map((f) => f.trim());
    if (!header) {
      header = fields.map((f) => f.toLowerCase().replace(/^\uFEFF/, ''));
      headerLine = lineNo;
      header.forEach((name, k) => {
        if (!COLUMNS.has(name)) {
          throw new ForcingError(
            `CSV line ${lineNo}, column ${k + 1}: the header names a column other than lon, lat, x, y and day (the first line that is not blank or a # comment must be the header lon,lat,x,y or lon,lat,day,x,y)`,
          );
        }
        if (name in col)
          throw new ForcingError(`CSV line ${lineNo}, column ${k + 1}: column '${name}' appears twice in the header`);
        col[name] = k;
      });
      for (const r of REQUIRED)
        if (!(r in col))
          throw new ForcingError(
            `CSV line ${lineNo}: the header has no '${r}' column (expected lon, lat, x, y and optionally day)`,
          );
      continue;
    }
    if (fields.length !== header.length) {
      throw new ForcingError(
        `CSV line ${lineNo}: ${fields.length} values, but the header (line ${headerLine}) names ${header.length} columns`,
      );
    }
    const row = fields.map((f, k) => {
      const v = f === '' ? NaN : Number(f);
      if (!Number.isFinite(v))
        throw new ForcingError(`CSV line ${lineNo}, column ${k + 1} ('${header![k]}'): the value ${notNumber(f, v)}`);
      return v;
    });
    rows.push(row);
    rowLine.push(lineNo);
  }
  if (!header) throw new ForcingError('CSV: the file is empty (no header line)');
  if (rows.length === 0) throw new ForcingError(`CSV: no data rows after the header (line ${headerLine})`);

  const n = rows.length;
  const line = Int32Array.from(rowLine);
  const column = (name: string) => Float64Array.from(rows, (r) => r[col[name]]);
  const lon = column('lon');
  const lat = column('lat');
  const hasDay = 'day' in col;
  const day = hasDay ? column('day') : new Float64Array(n);
  const dl = distinct(lon, line);
  const dp = distinct(lat, line);
  const dd = distinct(day, line);
  const ax = regular('lon', dl);
  const ay = regular('lat', dp);
  const nLon = dl.v.length;
  const nLat = dp.v.length;
  const nT = dd.v.length;
  const lonIndex = new Map(dl.v.map((v, k) => [v, k]));
  const latIndex = new Map(dp.v.map((v, k) => [v, k]));
  const dayIndex = new Map(dd.v.map((v, k) => [v, k]));
  const seen = new Int32Array(nT * nLat * nLon); // line number of the row that filled each slot
  const x = Array.from({ length: nT }, () => new Float64Array(nLat * nLon));
  const y = Array.from({ length: nT }, () => new Float64Array(nLat * nLon));
  const where = (k: number) => `lon ${lon[k]}, lat ${lat[k]}${hasDay ? `, day ${day[k]}` : ''}`;
  for (let k = 0; k < n; k++) {
    const s = dayIndex.get(day[k]) as number;
    const cell = (latIndex.get(lat[k]) as number) * nLon + (lonIndex.get(lon[k]) as number);
    const slot = s * nLat * nLon + cell;
    if (seen[slot]) throw new ForcingError(`CSV line ${line[k]}: ${where(k)} was already given on line ${seen[slot]}`);
    seen[slot] = line[k];
    x[s][cell] = rows[k][col.x];
    y[s][cell] = rows[k][col.y];
  }
  if (n !== seen.length) {
    const gap = seen.indexOf(0);
    const s = Math.floor(gap / (nLat * nLon));
    const cell = gap % (nLat * nLon);
    const at = `lon ${dl.v[cell % nLon]}, lat ${dp.v[Math.floor(cell / nLon)]}${hasDay ? `, day ${dd.v[s]}` : ''}`;
    throw new ForcingError(
      `CSV: the rows do not form a full grid: ${n} rows for ${nLon} longitudes x ${nLat} latitudes${hasDay ? ` x ${nT} days` : ''}; no row for ${at}`,
    );
  }
  return {
    lon0: ax.start,
    lat0: ay.start,
    dLon: ax.step,
    dLat: ay.step,
    nLon,
    nLat,
    days: hasDay ? Float64Array.from(dd.v) : null,
    x,
    y,
    missing: 0,
  };
}
