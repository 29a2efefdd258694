// The sweep summary (`pycno sweep --gather`): one CF-NetCDF file for a whole ensemble. Per member
// (dimension `member`) the varied values, its state (complete, failed, missing) and its scalar
// results (member-results.ts); when the seed is varied, per seed ensemble (the members that share every
// varied value but the seed; dimension `ensemble`), the ensemble mean and standard deviation of each
// recorded field, of the Hovmoller rows, of the probe series and of the energy, record by record
// (statistics.ts); the dimension is `ensemble`, not "group", which is a keyword of CDL (ncdump's
// text). docs/ensembles.md shows the layout as ncdump prints it.

import { FIELD_INFO, type FieldName } from '../diagnostics/fields.ts';
import {
  NC_BYTE,
  NC_CHAR,
  NC_DOUBLE,
  NC_FILL_DOUBLE,
  NC_FLOAT,
  NC_INT,
  utf8Bytes,
  type NcAttributesInput,
  type NcFileInput,
  type NcVariableInput,
} from '../io/netcdf-format.ts';
import { NetcdfWriter, type ByteSink } from '../io/netcdf-writer.ts';
import {
  cellAreaSquareMetres,
  gridVariables,
  IDEALISED_NOTE,
  OUTPUT_FILL,
  PYCNO_VERSION,
  timeVariable,
} from '../io/run-output.ts';
import type { MemberResults } from './member-results.ts';
import type { EnsembleStatistics } from './statistics.ts';

export const SUMMARY_FILE_KIND = 'sweep-summary';
/** The varied path that makes a sweep a seed ensemble. */
export const SEED_PATH = 'seed';

export type MemberState = 'complete' | 'failed' | 'missing';
export const MEMBER_STATES: readonly MemberState[] = ['complete', 'failed', 'missing'];

export interface SummaryMember {
  id: number;
  values: Record<string, string>;
  /** The run file, relative to the batch folder. */
  file: string;
  state: MemberState;
  /** The exit code of its last run, when one ran; null when unknown. */
  exit: number | null;
  /** What went wrong, or null. */
  message: string | null;
  /** Its statistics group (0-based), or -1 in a sweep without seeds. */
  group: number;
  results: MemberResults | null;
}

export interface SummaryInput {
  title: string;
  /** The batch's scenario (common --set values in), and its canonical hash. */
  scenarioJson: string;
  scenarioHash: string;
  vary: ReadonlyArray<{ path: string; values: readonly string[] }>;
  members: readonly SummaryMember[];
  probes: ReadonlyArray<{ name: string; lon: number; lat: number }>;
  /** Per group, the varied values but the seed. Empty without seeds. */
  groups: ReadonlyArray<Record<string, string>>;
  statistics: EnsembleStatistics | null;
  command: string;
  createdAt?: Date;
}

/** A NetCDF variable name for a varied path: "physics.reducedGravity" -> "vary_physics_reducedGravity". */
export function variedName(path: string, taken: ReadonlySet<string> = new Set()): string {
  const base = `vary_${path.replace(/[^A-Za-z0-9]+/g, '_').replace(/^_+|_+$/g, '') || 'value'}`;
  let name = base;
  for (let k = 2; taken.has(name); k++) name = `${base}_${k}`;
  return name;
}

/** The values of a varied path are all numbers: stored as double, else as text. */
export function numericValues(values: readonly string[]): boolean {
  return values.every((v) => v.trim() !== '' && Number.isFinite(Number(v)));
}

const fillDouble = (x: number) => (Number.isFinite(x) ? x : NC_FILL_DOUBLE);

function textColumn(values: readonly string[]): { width: number; bytes: Uint8Array } {
  const enc = values.map(utf8Bytes);
  const width = Math.max(1, ...enc.map((b) => b.length));
  const bytes = new Uint8Array(values.length * width);
  enc.forEach((b, k) => bytes.set(b, k * width));
  return { width, bytes };
}

/** A varied path: numbers are stored as double, text (a JSON value, a word) as its index in the --vary list. */
interface Column {
  name: string;
  path: string;
  numeric: boolean;
  values: readonly string[];
}

/** The numbers a varied path is stored as, for these members' (or groups') values. */
function columnValues(c: Pick<Column, 'numeric' | 'values'>, values: readonly string[]): number[] {
  return values.map((v) => (c.numeric ? Number(v) : c.values.indexOf(v)));
}

/** The scalar results per member: name, units, long name, and how to read it from the results. */
export const MEMBER_SCALARS: ReadonlyArray<{
  name: string;
  units: string;
  longName: string;
  key: keyof MemberResults;
  standardName?: string;
}> = [
  {
    name: 'kelvin_speed',
    units: 'm s-1',
    longName: 'Kelvin wave speed measured on the equatorial Hovmoller row (front of the leading wave, robust line fit)',
    key: 'kelvinSpeed',
  },
  {
    name: 'kelvin_speed_error',
    units: 'm s-1',
    longName: 'standard error of the measured Kelvin wave speed',
    key: 'kelvinSpeedError',
  },
  {
    name: 'kelvin_speed_theory',
    units: 'm s-1',
    longName: "Kelvin wave speed in theory, c = sqrt(g' H)",
    key: 'kelvinSpeedTheory',
  },
  {
    name: 'ssh_peak',
    units: 'm',
    longName: 'peak sea-level anomaly: the largest |ssh| over the ocean and every record, with its sign',
    key: 'sshPeak',
  },
  { name: 'ssh_peak_day', units: 'day', longName: 'model day of the peak sea-level anomaly', key: 'sshPeakDay' },
  {
    name: 'ssh_peak_lon',
    units: 'degrees_east',
    longName: 'longitude of the peak sea-level anomaly',
    key: 'sshPeakLon',
  },
  {
    name: 'ssh_peak_lat',
    units: 'degrees_north',
    longName: 'latitude of the peak sea-level anomaly',
    key: 'sshPeakLat',
  },
  {
    name: 'energy_end',
    units: 'J',
    longName: 'total energy (kinetic + available potential) at the last record',
    key: 'energyEnd',
  },
  { name: 'energy_peak', units: 'J', longName: 'largest total energy of the records', key: 'energyPeak' },
  {
    name: 'volume_change',
    units: '1',
    longName: 'relative change of the upper-layer volume from the first record to the last',
    key: 'volumeChange',
  },
  { name: 'final_day', units: 'day', longName: 'model day of the last record', key: 'finalDay' },
];

export function summaryFile(s: SummaryInput): NcFileInput {
  const created = s.createdAt ?? new Date();
  const st = s.statistics?.shape ? s.statistics : null;
  const shape = st?.shape ?? null;
  const dims: Array<NcFileInput['dimensions'][number]> = [];
  if (shape) dims.push({ name: 'time', length: 'unlimited' });
  dims.push({ name: 'member', length: s.members.length });
  const vars: NcVariableInput[] = [];
  if (shape) vars.push(timeVariable());
  vars.push({
    name: 'member',
    type: NC_INT,
    dimensions: ['member'],
    attributes: { long_name: 'member number (the row of members.tsv in the batch folder)' },
  });
  const taken = new Set<string>();
  const columns: Column[] = s.vary.map((v) => {
    const name = variedName(v.path, taken);
    taken.add(name);
    return { name, path: v.path, numeric: numericValues(v.values), values: v.values };
  });
  for (const c of columns) {
    const atts: Record<string, string> = {
      long_name: `${c.path} of the member (--vary ${c.path})`,
      pycno_path: c.path,
    };
    if (!c.numeric) {
      atts.long_name = `${c.path} of the member (--vary ${c.path}), as its index (from 0) in the list pycno_values`;
      atts.pycno_values = JSON.stringify(c.values);
    }
    vars.push({ name: c.name, type: c.numeric ? NC_DOUBLE : NC_INT, dimensions: ['member'], attributes: atts });
  }
  // The varied values are not named in `coordinates`: CDO cannot assign a coordinate of a
  // member axis and warns on every command; xarray users take them with ds.set_coords().
  const coords = '';
  const withCoords = (a: Record<string, unknown>, more = '') => {
    const all = [coords, more].filter(Boolean).join(' ');
    return (all ? { ...a, coordinates: all } : a) as NcAttributesInput;
  };
  vars.push({
    name: 'member_state',
    type: NC_BYTE,
    dimensions: ['member'],
    attributes: withCoords({
      long_name: 'state of the member run',
      flag_values: { type: NC_BYTE, values: [0, 1, 2] },
      flag_meanings: MEMBER_STATES.join(' '),
    }),
  });
  vars.push({
    name: 'member_exit_code',
    type: NC_INT,
    dimensions: ['member'],
    attributes: withCoords({
      long_name:
        'exit code of the last pycno run of the member (0 done, 1 blow-up or failure, 2 bad input; missing: never ran)',
      _FillValue: { type: NC_INT, values: -2147483647 },
    }),
  });
  for (const m of MEMBER_SCALARS) {
    const a: Record<string, unknown> = { long_name: m.longName, units: m.units, _FillValue: NC_FILL_DOUBLE };
    vars.push({ name: m.name, type: NC_DOUBLE, dimensions: ['member'], attributes: withCoords(a) });
  }
  const probeCoords = 'probe_lat probe_lon probe_name';
  // CDO takes the first dimension of a file without time as its time axis: then (member, probe)
  // reads as probe series and takes all the probe coordinates; in a file with time (seed
  // statistics) it cannot place probe_lat and probe_lon on it and warns, so only the name.
  const arrivalCoords = st ? 'probe_name' : probeCoords;
  if (s.probes.length > 0) {
    const strlen = Math.max(1, ...s.probes.map((p) => utf8Bytes(p.name).length));
    dims.push({ name: 'probe', length: s.probes.length }, { name: 'probe_name_length', length: strlen });
    vars.push(
      {
        name: 'probe_name',
        type: NC_CHAR,
        dimensions: ['probe', 'probe_name_length'],
        attributes: { long_name: 'probe name', _Encoding: 'utf-8' },
      },
      {
        name: 'probe_lon',
        type: NC_DOUBLE,
        dimensions: ['probe'],
        attributes: { standard_name: 'longitude', long_name: 'probe longitude as given', units: 'degrees_east' },
      },
      {
        name: 'probe_lat',
        type: NC_DOUBLE,
        dimensions: ['probe'],
        attributes: { standard_name: 'latitude', long_name: 'probe latitude as given', units: 'degrees_north' },
      },
      {
        name: 'kelvin_arrival_day',
        type: NC_DOUBLE,
        dimensions: ['member', 'probe'],
        attributes: withCoords(
          {
            long_name: "model day the signal arrives at the probe: h' first reaches half its largest value there",
            units: 'day',
            _FillValue: NC_FILL_DOUBLE,
          },
          arrivalCoords,
        ),
      },
      {
        name: 'kelvin_arrival_speed',
        type: NC_DOUBLE,
        dimensions: ['member', 'probe'],
        attributes: withCoords(
          {
            long_name:
              'mean speed of the signal from the probe it reached first to this probe (beta-plane distance over the time between the arrivals)',
            units: 'm s-1',
            _FillValue: NC_FILL_DOUBLE,
          },
          arrivalCoords,
        ),
      },
    );
  }
  if (s.groups.length > 0) {
    dims.push({ name: 'ensemble', length: s.groups.length });
    vars.push({
      name: 'ensemble',
      type: NC_INT,
      dimensions: ['ensemble'],
      attributes: { long_name: 'seed ensemble: the members that share every varied value but the seed', units: '1' },
    });
    vars.push({
      name: 'member_ensemble',
      type: NC_INT,
      dimensions: ['member'],
      attributes: withCoords({ long_name: 'the seed ensemble of the member', units: '1' }),
    });
    vars.push({
      name: 'ensemble_members',
      type: NC_INT,
      dimensions: ['ensemble'],
      attributes: {
        long_name: 'complete members of the seed ensemble: the sample size of its mean and standard deviation',
        units: '1',
      },
    });
    for (const c of columns) {
      if (c.path === SEED_PATH) continue;
      const atts: Record<string, string> = { long_name: `${c.path} of the seed ensemble`, pycno_path: c.path };
      if (!c.numeric) {
        atts.long_name = `${c.path} of the seed ensemble, as its index (from 0) in the list pycno_values`;
        atts.pycno_values = JSON.stringify(c.values);
      }
      vars.push({
        name: `ensemble_${c.name}`,
        type: c.numeric ? NC_DOUBLE : NC_INT,
        dimensions: ['ensemble'],
        attributes: atts,
      });
    }
  }
  if (shape) {
    dims.push({ name: 'lat', length: shape.ny }, { name: 'lon', length: shape.nx });
    vars.push(...gridVariables());
    const stat = (
      name: string,
      dimsOf: string[],
      units: string,
      longName: string,
      which: 'mean' | 'std',
      extra: Record<string, string> = {},
      standardName?: string,
    ) => {
      const a: Record<string, unknown> = {
        long_name: `${which === 'mean' ? 'ensemble mean' : 'ensemble standard deviation (n - 1 in the denominator)'} of the ${longName}`,
        units,
        _FillValue: { type: NC_FLOAT, values: OUTPUT_FILL },
        ...extra,
      };
      if (standardName && which === 'mean') a.standard_name = standardName;
      vars.push({ name: `${name}_${which}`, type: NC_FLOAT, dimensions: dimsOf, attributes: a as NcAttributesInput });
    };
    for (const f of shape.fields) {
      const info = FIELD_INFO[f];
      for (const w of ['mean', 'std'] as const)
        stat(
          f,
          ['time', 'ensemble', 'lat', 'lon'],
          info.units,
          info.longName,
          w,
          { cell_measures: 'area: cell_area' },
          info.standardName,
        );
    }
    if (shape.hovmollerRowLats.length > 0) {
      dims.push({ name: 'hovmoller', length: shape.hovmollerRowLats.length });
      vars.push({
        name: 'hovmoller_lat',
        type: NC_DOUBLE,
        dimensions: ['hovmoller'],
        attributes: {
          standard_name: 'latitude',
          long_name: 'centre latitude of the model row of each Hovmoller section',
          units: 'degrees_north',
        },
      });
      for (const w of ['mean', 'std'] as const)
        stat(
          'hovmoller_h_anom',
          ['time', 'ensemble', 'hovmoller', 'lon'],
          'm',
          `${FIELD_INFO.h_anom.longName} along the Hovmoller rows`,
          w,
          { coordinates: 'hovmoller_lat' },
        );
    }
    if (s.probes.length > 0) {
      for (const f of shape.fields) {
        const info = FIELD_INFO[f];
        // Not probe_name: CDO cannot give a text label to a (time, ensemble, probe) variable and warns.
        for (const w of ['mean', 'std'] as const)
          stat(
            `probe_${f}`,
            ['time', 'ensemble', 'probe'],
            info.units,
            `${info.longName} in the model cell holding the probe`,
            w,
            { coordinates: 'probe_lat probe_lon' },
          );
      }
    }
    for (const w of ['mean', 'std'] as const) {
      vars.push({
        name: `energy_${w}`,
        type: NC_DOUBLE,
        dimensions: ['time', 'ensemble'],
        attributes: {
          long_name: `${w === 'mean' ? 'ensemble mean' : 'ensemble standard deviation (n - 1 in the denominator)'} of the total energy (kinetic + available potential)`,
          units: 'J',
          _FillValue: NC_FILL_DOUBLE,
        },
      });
    }
  }
  const states = MEMBER_STATES.map((k) => `${s.members.filter((m) => m.state === k).length} ${k}`).join(', ');
  return {
    version: 'auto',
    dimensions: dims,
    variables: vars,
    attributes: {
      Conventions: 'CF-1.10',
      title: `Sweep summary: ${s.title}`,
      summary: `${s.members.length} members (${states}) of a Pycno sweep over ${s.vary.map((v) => v.path).join(', ')}${shape ? '; ensemble mean and standard deviation over the seeds, one pass (Welford 1962)' : ''}`,
      source: `Pycno ${PYCNO_VERSION}, reduced-gravity equatorial ocean model`,
      history: `${created.toISOString()}: ${s.command} (Pycno ${PYCNO_VERSION})`,
      comment: IDEALISED_NOTE,
      pycno_file: SUMMARY_FILE_KIND,
      pycno_version: PYCNO_VERSION,
      pycno_scenario: s.scenarioJson,
      pycno_scenario_canonical_sha256: s.scenarioHash,
      pycno_vary: JSON.stringify(s.vary),
      pycno_members: JSON.stringify(
        s.members.map((m) => ({
          member: m.id,
          values: m.values,
          file: m.file,
          state: m.state,
          exit: m.exit,
          message: m.message,
          kelvin_note: m.results?.kelvinNote ?? null,
        })),
      ),
      pycno_statistics: shape
        ? `mean and standard deviation over the seeds of each seed ensemble, fields ${shape.fields.join(', ')}`
        : 'none (no seed among the varied values)',
    },
  };
}

const toFloat = (values: ArrayLike<number>): Float32Array => {
  const out = Float32Array.from(values);
  for (let k = 0; k < out.length; k++) if (!Number.isFinite(out[k])) out[k] = OUTPUT_FILL;
  return out;
};

/** Write the summary into a sink; returns the bytes of the whole file. */
export async function writeSummary(s: SummaryInput, sink: ByteSink): Promise<number> {
  const file = summaryFile(s);
  const w = new NetcdfWriter(file, sink, { headerLast: true });
  await w.writeHeader();
  const byName = new Set(file.variables.map((v) => v.name));
  await w.writeFixed(
    'member',
    s.members.map((m) => m.id),
  );
  const taken = new Set<string>();
  for (const v of s.vary) {
    const name = variedName(v.path, taken);
    taken.add(name);
    const c = { numeric: numericValues(v.values), values: v.values };
    await w.writeFixed(
      name,
      columnValues(
        c,
        s.members.map((m) => m.values[v.path] ?? ''),
      ),
    );
    if (byName.has(`ensemble_${name}`))
      await w.writeFixed(
        `ensemble_${name}`,
        columnValues(
          c,
          s.groups.map((g) => g[v.path] ?? ''),
        ),
      );
  }
  await w.writeFixed(
    'member_state',
    s.members.map((m) => MEMBER_STATES.indexOf(m.state)),
  );
  await w.writeFixed(
    'member_exit_code',
    s.members.map((m) => (m.exit === null ? -2147483647 : m.exit)),
  );
  for (const m of MEMBER_SCALARS)
    await w.writeFixed(
      m.name,
      s.members.map((x) => fillDouble(x.results ? (x.results[m.key] as number) : NaN)),
    );
  if (s.probes.length > 0) {
    await w.writeFixed('probe_name', textColumn(s.probes.map((p) => p.name)).bytes);
    await w.writeFixed(
      'probe_lon',
      s.probes.map((p) => p.lon),
    );
    await w.writeFixed(
      'probe_lat',
      s.probes.map((p) => p.lat),
    );
    const np = s.probes.length;
    const grid = (key: 'arrivalDay' | 'arrivalSpeed') => {
      const out = new Float64Array(s.members.length * np).fill(NC_FILL_DOUBLE);
      s.members.forEach((m, k) => m.results?.[key].forEach((x, p) => (out[k * np + p] = fillDouble(x))));
      return out;
    };
    await w.writeFixed('kelvin_arrival_day', grid('arrivalDay'));
    await w.writeFixed('kelvin_arrival_speed', grid('arrivalSpeed'));
  }
  if (s.groups.length > 0) {
    await w.writeFixed(
      'ensemble',
      s.groups.map((_, g) => g + 1),
    );
    await w.writeFixed(
      'member_ensemble',
      s.members.map((m) => m.group + 1),
    );
    const stats = s.statistics;
    await w.writeFixed(
      'ensemble_members',
      s.groups.map((_, g) => stats?.groups[g]?.energy.count ?? 0),
    );
  }
  const shape = s.statistics?.shape;
  if (shape && s.statistics) {
    const st = s.statistics;
    await w.writeFixed('lat', shape.lat);
    await w.writeFixed('lon', shape.lon);
    await w.writeFixed('ocean', shape.ocean);
    await w.writeFixed(
      'cell_area',
      new Float64Array(shape.nx * shape.ny).fill(cellAreaSquareMetres({ grid: shape, scenarioJson: s.scenarioJson })),
    );
    const nh = shape.hovmollerRowLats.length;
    if (nh > 0) await w.writeFixed('hovmoller_lat', shape.hovmollerRowLats);
    const G = st.groups.length;
    const cells = shape.nx * shape.ny;
    const nf = shape.fields.length;
    const np = s.probes.length;
    for (let n = 0; n < shape.days.length; n++) {
      const rec: Record<string, ArrayLike<number> | number> = { time: shape.days[n] };
      shape.fields.forEach((f: FieldName, q) => {
        const mean = new Float32Array(G * cells);
        const std = new Float32Array(G * cells);
        st.groups.forEach((g, k) => {
          mean.set(toFloat(g.fields.meanSlice((n * nf + q) * cells, cells)), k * cells);
          std.set(toFloat(g.fields.stdSlice((n * nf + q) * cells, cells)), k * cells);
        });
        rec[`${f}_mean`] = mean;
        rec[`${f}_std`] = std;
        if (np > 0) {
          const pm = new Float32Array(G * np);
          const ps = new Float32Array(G * np);
          st.groups.forEach((g, k) => {
            pm.set(toFloat(g.probes.meanSlice((n * nf + q) * np, np)), k * np);
            ps.set(toFloat(g.probes.stdSlice((n * nf + q) * np, np)), k * np);
          });
          rec[`probe_${f}_mean`] = pm;
          rec[`probe_${f}_std`] = ps;
        }
      });
      if (nh > 0) {
        const len = nh * shape.nx;
        const hm = new Float32Array(G * len);
        const hs = new Float32Array(G * len);
        st.groups.forEach((g, k) => {
          hm.set(toFloat(g.hovmoller.meanSlice(n * len, len)), k * len);
          hs.set(toFloat(g.hovmoller.stdSlice(n * len, len)), k * len);
        });
        rec.hovmoller_h_anom_mean = hm;
        rec.hovmoller_h_anom_std = hs;
      }
      rec.energy_mean = st.groups.map((g) => fillDouble(g.energy.meanSlice(n, 1)[0]));
      rec.energy_std = st.groups.map((g) => fillDouble(g.energy.std(n)));
      await w.appendRecord(rec);
    }
  }
  await w.close();
  return w.byteLength;
}
