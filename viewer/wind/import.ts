// Gridded winds from a CSV or NetCDF file, read with the model's own readers (model/forcing/csv.ts
// parseWindCsv, gridded.ts readNetcdfVectors) and stored in the scenario as 'painted' sources, so
// the scenario file holds the data itself and runs anywhere without the original file.
//
// A painted grid has no time axis. Data with several time slices become one part per slice, each
// under a piecewise-linear "hat" envelope (1 at its own day, 0 at the neighbours' days, held
// beyond the ends). Their sum is exactly the model's linear interpolation in time between slices,
// held before the first and after the last (model/forcing/gridded.ts timeBracket), and since both
// stress parts and wind parts are summed linearly before anything else, the run is the same as
// with the file.

import { parseWindCsv } from '../../model/forcing/csv.ts';
import { readNetcdfVectors, type GriddedSeries } from '../../model/forcing/gridded.ts';
import type { EnvelopeSpec, WindPart } from '../../model/forcing/spec.ts';
import type { BasinBox } from './design.ts';

/** More slices than this would make a scenario file of many megabytes: refused with the reason. */
export const MAX_SLICES = 48;

export class ImportError extends Error {
  override name = 'ImportError';
}

/** NetCDF classic and 64-bit-offset files start with 'CDF' and a version byte. */
function looksNetcdf(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x43 && bytes[1] === 0x44 && bytes[2] === 0x46;
}

/** Read a file's bytes as a series; every failure is an ImportError naming the file and the reason. */
export function readGridded(fileName: string, bytes: Uint8Array): GriddedSeries {
  const netcdf = looksNetcdf(bytes);
  if (!netcdf && /\.(nc|nc4|cdf|netcdf)$/i.test(fileName)) {
    // HDF5-based NetCDF-4 starts with \x89HDF.
    const hdf = bytes.length >= 4 && bytes[1] === 0x48 && bytes[2] === 0x44 && bytes[3] === 0x46;
    throw new ImportError(
      `${fileName}: ${hdf ? 'a NetCDF-4 (HDF5) file; save it as NetCDF classic or 64-bit offset (e.g. nccopy -k classic)' : 'not a NetCDF classic file (it does not start with CDF)'}`,
    );
  }
  try {
    return netcdf ? readNetcdfVectors(bytes) : parseWindCsv(bytes);
  } catch (e) {
    throw new ImportError(`${fileName}: ${(e as Error).message}`);
  }
}

function round(v: number): number {
  const r = Math.round(v * 1e6) / 1e6;
  return r === 0 ? 0 : r;
}

/** The hat envelope of slice s of days (held at the first and last slice). */
export function hatEnvelope(days: ArrayLike<number>, s: number): EnvelopeSpec {
  const n = days.length;
  const pts: Array<[number, number]> = [];
  if (s > 0) pts.push([days[s - 1], 0]);
  pts.push([days[s], 1]);
  if (s < n - 1) pts.push([days[s + 1], 0]);
  return { kind: 'table', points: pts };
}

/**
 * The parts that hold an imported series. Refuses data that miss the basin entirely (with the two
 * extents) and series with more than MAX_SLICES slices.
 */
export function partsFromSeries(
  series: GriddedSeries,
  name: string,
  quantity: 'stress' | 'wind',
  basin: BasinBox,
): { parts: WindPart[]; notes: string[] } {
  const lonE = series.lon0 + (series.nLon - 1) * series.dLon;
  const latN = series.lat0 + (series.nLat - 1) * series.dLat;
  if (lonE < basin.lonWest || series.lon0 > basin.lonEast || latN < basin.latSouth || series.lat0 > basin.latNorth) {
    throw new ImportError(
      `${name}: the data (lon ${series.lon0} to ${lonE}, lat ${series.lat0} to ${latN}) lie outside the basin (lon ${basin.lonWest} to ${basin.lonEast}, lat ${basin.latSouth} to ${basin.latNorth}); check the longitude convention (0..360 or -180..180)`,
    );
  }
  const nT = series.x.length;
  if (nT > MAX_SLICES) {
    throw new ImportError(
      `${name}: ${nT} time slices; at most ${MAX_SLICES} can be stored in a scenario (cut the file to the run's days, or average it in time)`,
    );
  }
  const notes: string[] = [];
  if (series.missing > 0) notes.push(`${series.missing} missing values were set to 0`);
  const grid = (s: number) => ({
    lon0: series.lon0,
    lat0: series.lat0,
    dLon: series.dLon,
    dLat: series.dLat,
    nLon: series.nLon,
    nLat: series.nLat,
    x: Array.from(series.x[s], round),
    y: Array.from(series.y[s], round),
  });
  const parts: WindPart[] = [];
  for (let s = 0; s < nT; s++) {
    const envelope: EnvelopeSpec = series.days && nT > 1 ? hatEnvelope(series.days, s) : { kind: 'constant' };
    const label = series.days && nT > 1 ? `${name}, day ${series.days[s]}` : name;
    parts.push({ kind: 'fixed', name: label, quantity, source: { kind: 'painted', grid: grid(s) }, envelope });
  }
  if (nT > 1)
    notes.push(`${nT} time slices became ${nT} parts whose table envelopes interpolate linearly between their days`);
  return { parts, notes };
}
