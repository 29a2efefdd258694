// Reading a sweep summary (summary-file.ts) back: for `pycno report` (spread plots) and the page.
// A file that is not a summary, or a damaged one, is refused with a message that names it.

import { readNetcdf, NetcdfReadError, type NcFile } from '../io/netcdf-read.ts';
import { NC_FILL_DOUBLE, NC_FILL_FLOAT } from '../io/netcdf-format.ts';
import { MEMBER_SCALARS, MEMBER_STATES, SEED_PATH, SUMMARY_FILE_KIND, type MemberState } from './summary-file.ts';

export class SummaryFileError extends Error {
  override name = 'SummaryFileError';
}

export interface SummaryMemberRead {
  id: number;
  values: Record<string, string>;
  file: string;
  state: MemberState;
  exit: number | null;
  message: string | null;
  group: number;
  /** MEMBER_SCALARS by name; NaN where the member has no result. */
  scalars: Record<string, number>;
  arrivalDay: number[];
}

export interface SummaryGroupRead {
  values: Record<string, string>;
  members: number;
  /** (time, probe) h' mean and standard deviation, NaN where missing. */
  probeMean: Float64Array[];
  probeStd: Float64Array[];
  energyMean: Float64Array;
  energyStd: Float64Array;
  /** Hovmoller rows: (time, lon) per row, mean and standard deviation. */
  hovmollerMean: Float64Array[];
  hovmollerStd: Float64Array[];
}

export interface SummaryData {
  title: string;
  scenarioJson: string;
  vary: Array<{ path: string; values: string[] }>;
  members: SummaryMemberRead[];
  probes: Array<{ name: string; lon: number; lat: number }>;
  /** Seed statistics: days, longitudes, the Hovmoller rows' latitudes and per group. */
  days: Float64Array | null;
  lon: Float64Array | null;
  hovmollerLat: number[];
  groups: SummaryGroupRead[];
}

export function isSummaryFile(bytes: Uint8Array): boolean {
  try {
    const f = readNetcdf(bytes, { only: [] });
    const a = f.attributes.pycno_file;
    return !!a && a.value === SUMMARY_FILE_KIND;
  } catch {
    return false;
  }
}

// The float and double fill values are the same number (9.96921e36).
const missing = (x: number) => x === NC_FILL_DOUBLE || x === NC_FILL_FLOAT || !Number.isFinite(x);
const clean = (a: ArrayLike<number>) => Float64Array.from(a, (x) => (missing(x) ? NaN : x));

export function readSummary(bytes: Uint8Array, label = 'the file'): SummaryData {
  let f: NcFile;
  try {
    f = readNetcdf(bytes);
  } catch (e) {
    if (e instanceof NetcdfReadError) throw new SummaryFileError(`${label}: ${e.message}`);
    throw e;
  }
  const text = (name: string) => {
    const a = f.attributes[name];
    return a && typeof a.value === 'string' ? a.value : undefined;
  };
  if (text('pycno_file') !== SUMMARY_FILE_KIND)
    throw new SummaryFileError(
      `${label}: not a Pycno sweep summary (its pycno_file is ${JSON.stringify(text('pycno_file') ?? null)})`,
    );
  const has = (n: string) => f.variables.some((v) => v.name === n);
  const nums = (n: string): Float64Array => {
    if (!has(n)) throw new SummaryFileError(`${label}: damaged sweep summary: variable '${n}' is missing`);
    const v = f.variable(n).values;
    if (typeof v === 'string') throw new SummaryFileError(`${label}: damaged sweep summary: variable '${n}' is text`);
    return v;
  };
  let vary: SummaryData['vary'];
  let listed: Array<{
    member: number;
    values: Record<string, string>;
    file: string;
    state: string;
    exit: number | null;
    message: string | null;
  }>;
  try {
    vary = JSON.parse(text('pycno_vary') ?? 'null');
    listed = JSON.parse(text('pycno_members') ?? 'null');
    if (!Array.isArray(vary) || !Array.isArray(listed)) throw new Error('pycno_vary or pycno_members is not a list');
  } catch (e) {
    throw new SummaryFileError(`${label}: damaged sweep summary: ${(e as Error).message}`);
  }
  const ids = nums('member');
  if (listed.length !== ids.length)
    throw new SummaryFileError(
      `${label}: damaged sweep summary: pycno_members lists ${listed.length} members, the file has ${ids.length}`,
    );
  const state = nums('member_state');
  const scalars = Object.fromEntries(
    MEMBER_SCALARS.filter((m) => has(m.name)).map((m) => [m.name, clean(nums(m.name))]),
  );
  const probeNames = has('probe_name') ? (f.variable('probe_name').values as string) : '';
  const np = has('probe_lon') ? nums('probe_lon').length : 0;
  const width = f.dimensions.find((d) => d.name === 'probe_name_length')?.length ?? 1;
  const names = np ? splitNames(probeNames, np, width) : [];
  const probes = Array.from({ length: np }, (_, p) => ({
    name: names[p],
    lon: nums('probe_lon')[p],
    lat: nums('probe_lat')[p],
  }));
  const arrivals = np ? clean(nums('kelvin_arrival_day')) : new Float64Array(0);
  const memberGroup = has('member_ensemble') ? nums('member_ensemble') : null;
  const members: SummaryMemberRead[] = listed.map((m, k) => ({
    id: ids[k],
    values: m.values,
    file: m.file,
    state: MEMBER_STATES[state[k]] ?? 'missing',
    exit: m.exit,
    message: m.message,
    group: memberGroup ? memberGroup[k] - 1 : -1,
    scalars: Object.fromEntries(Object.entries(scalars).map(([n, a]) => [n, a[k]])),
    arrivalDay: Array.from(arrivals.subarray(k * np, (k + 1) * np)),
  }));
  const groups: SummaryGroupRead[] = [];
  let days: Float64Array | null = null;
  let lon: Float64Array | null = null;
  let hovmollerLat: number[] = [];
  if (has('ensemble')) {
    const G = nums('ensemble').length;
    const counts = nums('ensemble_members');
    const others = vary.filter((v) => v.path !== SEED_PATH);
    const groupValues = Array.from({ length: G }, (_, g) => {
      const firstMember = members.find((m) => m.group === g);
      return Object.fromEntries(others.map((v) => [v.path, firstMember?.values[v.path] ?? '']));
    });
    const stats = has('time');
    if (stats) {
      days = nums('time');
      lon = nums('lon');
      hovmollerLat = has('hovmoller_lat') ? Array.from(nums('hovmoller_lat')) : [];
    }
    const nt = days?.length ?? 0;
    const nx = lon?.length ?? 0;
    const nh = hovmollerLat.length;
    const slice3 = (name: string, inner: number, g: number, q: number, width: number) => {
      // (time, ensemble, inner, width) -> the rows of group g, inner index q: nt x width values.
      const v = nums(name);
      const out = new Float64Array(nt * width);
      for (let n = 0; n < nt; n++)
        for (let i = 0; i < width; i++) out[n * width + i] = v[((n * G + g) * inner + q) * width + i];
      return clean(out);
    };
    for (let g = 0; g < G; g++) {
      const probeMean: Float64Array[] = [];
      const probeStd: Float64Array[] = [];
      if (stats && np && has('probe_h_anom_mean')) {
        for (let p = 0; p < np; p++) {
          probeMean.push(slice3('probe_h_anom_mean', np, g, p, 1));
          probeStd.push(slice3('probe_h_anom_std', np, g, p, 1));
        }
      }
      const hovmollerMean: Float64Array[] = [];
      const hovmollerStd: Float64Array[] = [];
      if (stats && nh) {
        for (let q = 0; q < nh; q++) {
          hovmollerMean.push(slice3('hovmoller_h_anom_mean', nh, g, q, nx));
          hovmollerStd.push(slice3('hovmoller_h_anom_std', nh, g, q, nx));
        }
      }
      groups.push({
        values: groupValues[g],
        members: counts[g],
        probeMean,
        probeStd,
        energyMean: stats ? slice3('energy_mean', 1, g, 0, 1) : new Float64Array(0),
        energyStd: stats ? slice3('energy_std', 1, g, 0, 1) : new Float64Array(0),
        hovmollerMean,
        hovmollerStd,
      });
    }
  }
  return {
    title: (text('title') ?? '').replace(/^Sweep summary: /, ''),
    scenarioJson: text('pycno_scenario') ?? '',
    vary,
    members,
    probes,
    days,
    lon,
    hovmollerLat,
    groups,
  };
}

/** The probe names of a char (probe, width) variable, read as one text: re-encoded, cut by bytes. */
function splitNames(text: string, n: number, width: number): string[] {
  const enc = new TextEncoder().encode(text);
  const full = new Uint8Array(n * width);
  full.set(enc.subarray(0, full.length));
  const dec = new TextDecoder('utf-8');
  return Array.from({ length: n }, (_, p) => {
    const b = full.subarray(p * width, (p + 1) * width);
    let end = b.length;
    while (end > 0 && b[end - 1] === 0) end--;
    return dec.decode(b.subarray(0, end));
  });
}
