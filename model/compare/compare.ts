// Comparing two runs, B minus A: matching model times, a common grid, difference fields, the
// Hovmoller difference, probe series side by side, and the table of scenario differences.
//
// Times match when they are within half an output interval (the smaller interval of the two
// runs). Runs on one grid are compared cell by cell; runs on different grids are both put on the
// coarser grid (larger cells), cut to the area both cover: the coarser run's values are taken as
// they are, the finer run's interpolated bilinearly with ocean-only weights
// (model/compare/interpolate.ts). The result says which, so the page can show it.

import type { FieldName } from '../diagnostics/fields.ts';
import { INTEGRAL_VARIABLES } from '../io/run-output.ts';
import type { IntegralKey, RunData, RunSnapshot } from '../io/run-data.ts';
import { Interpolator, spacing, type LonLatGrid } from './interpolate.ts';
import { diffScenarios, type ScenarioDifference } from './scenario-diff.ts';

export interface CommonTime {
  /** A's day (the two differ by at most half an output interval). */
  day: number;
  dayA: number;
  dayB: number;
  /** Record indices in A and B. */
  indexA: number;
  indexB: number;
  /** Whether both runs kept the fields of these records. */
  hasFields: boolean;
}

export interface CommonGrid {
  nx: number;
  ny: number;
  lon: Float64Array;
  lat: Float64Array;
  /** 1 where both runs have ocean (after interpolation), nx * ny. */
  ocean: Uint8Array;
  /** Whose cells these are: 'same' when both runs share one grid. */
  from: 'same' | 'A' | 'B';
  /** Which run was interpolated onto it (none on a shared grid). */
  interpolated: 'none' | 'A' | 'B';
  /** One line for the user, e.g. "B (0.25°) interpolated bilinearly onto A's 0.5° grid". */
  note: string;
}

export interface HovmollerDifference {
  requestedLat: number;
  rowLatA: number;
  rowLatB: number;
  /** Common longitudes (those of the common grid) and the common times' days. */
  lon: Float64Array;
  days: Float64Array;
  /** days.length * lon.length each, time after time; NaN where either has land. */
  a: Float32Array;
  b: Float32Array;
  diff: Float32Array;
}

export interface SeriesTriple<T extends Float32Array | Float64Array = Float32Array> {
  a: T;
  b: T;
  diff: T;
}

export interface ProbeDifference {
  name: string;
  lonA: number;
  latA: number;
  lonB: number;
  latB: number;
  /** On the common times. */
  days: Float64Array;
  series: Partial<Record<FieldName, SeriesTriple>>;
}

export type CompareStatus = 'ok' | 'no-common-times' | 'no-common-area';

export interface CompareSummary {
  status: CompareStatus;
  /** Why the comparison is empty, for the user; '' when ok. */
  message: string;
  commonTimes: CommonTime[];
  /** Half the output interval used to match times, days. */
  toleranceDays: number;
  grid: CommonGrid | null;
  /** Fields both runs have. */
  fields: FieldName[];
  /** Largest |B - A| over common ocean cells and times with fields, per field (NaN if none). */
  maxAbsDifference: Partial<Record<FieldName, number>>;
  hovmoller: HovmollerDifference[];
  probes: ProbeDifference[];
  integrals: Partial<Record<IntegralKey, SeriesTriple<Float64Array>>>;
  scenario: ScenarioDifference[];
}

export class CompareError extends Error {
  override name = 'CompareError';
}

function median(xs: number[]): number {
  const s = [...xs].sort((p, q) => p - q);
  return s.length % 2 ? s[(s.length - 1) / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
}

function outputInterval(days: Float64Array): number | null {
  if (days.length < 2) return null;
  const gaps: number[] = [];
  for (let n = 1; n < days.length; n++) gaps.push(days[n] - days[n - 1]);
  return median(gaps);
}

/** Pairs of records within half an output interval, in time order, each record used once. */
export function matchTimes(a: RunData, b: RunData): { times: CommonTime[]; tolerance: number } {
  const ia = outputInterval(a.days);
  const ib = outputInterval(b.days);
  const interval = ia === null ? (ib ?? 1) : ib === null ? ia : Math.min(ia, ib);
  const tolerance = 0.5 * interval;
  const snapsA = new Set(a.snapshots.map((s) => s.index));
  const snapsB = new Set(b.snapshots.map((s) => s.index));
  const times: CommonTime[] = [];
  let m = 0;
  for (let n = 0; n < a.days.length; n++) {
    const d = a.days[n];
    while (m + 1 < b.days.length && Math.abs(b.days[m + 1] - d) <= Math.abs(b.days[m] - d)) m++;
    if (m >= b.days.length) break;
    // Strictly less than half an interval plus round-off, so one record never matches two.
    if (
      Math.abs(b.days[m] - d) <= tolerance * (1 + 1e-9) &&
      (times.length === 0 || times[times.length - 1].indexB < m)
    ) {
      times.push({ day: d, dayA: d, dayB: b.days[m], indexA: n, indexB: m, hasFields: snapsA.has(n) && snapsB.has(m) });
    }
  }
  return { times, tolerance };
}

function resolutionText(g: LonLatGrid): string {
  const dx = Math.abs(spacing(g.lon));
  const dy = Math.abs(spacing(g.lat));
  const f = (x: number) => `${Number(x.toPrecision(4))}°`;
  return Math.abs(dx - dy) < 1e-9 ? f(dx) : `${f(dx)} x ${f(dy)}`;
}

function sameAxis(p: ArrayLike<number>, q: ArrayLike<number>): boolean {
  if (p.length !== q.length) return false;
  for (let k = 0; k < p.length; k++) if (Math.abs(p[k] - q[k]) > 1e-9) return false;
  return true;
}

/** Indices of axis values inside [lo, hi] (with round-off). */
function inside(axis: ArrayLike<number>, lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let k = 0; k < axis.length; k++) if (axis[k] >= lo - 1e-9 && axis[k] <= hi + 1e-9) out.push(k);
  return out;
}

interface GridPlan {
  grid: CommonGrid;
  toCommonA: Interpolator;
  toCommonB: Interpolator;
  /** 1-D interpolators for Hovmoller rows: from a row of A / B onto grid.lon. */
  rowA: Interpolator;
  rowB: Interpolator;
}

function planGrid(a: RunData, b: RunData): GridPlan | null {
  const ga = a.grid;
  const gb = b.grid;
  const row = (g: LonLatGrid): LonLatGrid => ({
    nx: g.nx,
    ny: 1,
    lon: g.lon,
    lat: [0],
    ocean: new Uint8Array(g.nx).fill(1),
  });
  if (sameAxis(ga.lon, gb.lon) && sameAxis(ga.lat, gb.lat)) {
    const ocean = new Uint8Array(ga.nx * ga.ny);
    for (let k = 0; k < ocean.length; k++) ocean[k] = ga.ocean[k] && gb.ocean[k] ? 1 : 0;
    const grid: CommonGrid = {
      nx: ga.nx,
      ny: ga.ny,
      lon: Float64Array.from(ga.lon),
      lat: Float64Array.from(ga.lat),
      ocean,
      from: 'same',
      interpolated: 'none',
      note: `both runs on one ${resolutionText(ga)} grid (${ga.nx} x ${ga.ny}): compared cell by cell`,
    };
    if (!ocean.includes(1)) return null;
    return {
      grid,
      toCommonA: Interpolator.crop(ga, 0, 0, ga.nx, ga.ny),
      toCommonB: Interpolator.crop(gb, 0, 0, gb.nx, gb.ny),
      rowA: Interpolator.crop(row(ga), 0, 0, ga.nx, 1),
      rowB: Interpolator.crop(row(gb), 0, 0, gb.nx, 1),
    };
  }
  // The coarser grid has the larger cells; on a tie, the wider cells in longitude, then A's.
  const area = (g: LonLatGrid) => Math.abs(spacing(g.lon) * spacing(g.lat));
  const aCoarse =
    area(ga) > area(gb) * (1 + 1e-9) ||
    (Math.abs(area(ga) - area(gb)) <= area(gb) * 1e-9 && Math.abs(spacing(ga.lon)) >= Math.abs(spacing(gb.lon)));
  const coarse = aCoarse ? ga : gb;
  const fine = aCoarse ? gb : ga;
  // The area both cover: the coarse centres inside the span of the fine centres.
  const lonLo = Math.max(fine.lon[0], coarse.lon[0]);
  const lonHi = Math.min(fine.lon[fine.nx - 1], coarse.lon[coarse.nx - 1]);
  const latLo = Math.max(fine.lat[0], coarse.lat[0]);
  const latHi = Math.min(fine.lat[fine.ny - 1], coarse.lat[coarse.ny - 1]);
  const is = inside(coarse.lon, lonLo, lonHi);
  const js = inside(coarse.lat, latLo, latHi);
  if (is.length === 0 || js.length === 0) return null;
  const i0 = is[0];
  const j0 = js[0];
  const nx = is.length;
  const ny = js.length;
  const lon = Float64Array.from(is, (i) => coarse.lon[i]);
  const lat = Float64Array.from(js, (j) => coarse.lat[j]);
  const fromCoarse = Interpolator.crop(coarse, i0, j0, nx, ny);
  const fromFine = Interpolator.bilinear(fine, lon, lat);
  const covered = fromFine.covered();
  const ocean = new Uint8Array(nx * ny);
  for (let j = 0; j < ny; j++)
    for (let i = 0; i < nx; i++)
      ocean[j * nx + i] = coarse.ocean[(j0 + j) * coarse.nx + i0 + i] && covered[j * nx + i] ? 1 : 0;
  if (!ocean.includes(1)) return null;
  const whose = aCoarse ? 'A' : 'B';
  const other = aCoarse ? 'B' : 'A';
  const grid: CommonGrid = {
    nx,
    ny,
    lon,
    lat,
    ocean,
    from: whose,
    interpolated: other,
    note: `${other} (${resolutionText(fine)}) interpolated bilinearly onto ${whose}'s coarser ${resolutionText(coarse)} grid, ${nx} x ${ny} cells where both have ocean`,
  };
  const rowCoarse = Interpolator.crop(row(coarse), i0, 0, nx, 1);
  const rowFine = Interpolator.bilinear(row(fine), lon, [0]);
  return aCoarse
    ? { grid, toCommonA: fromCoarse, toCommonB: fromFine, rowA: rowCoarse, rowB: rowFine }
    : { grid, toCommonA: fromFine, toCommonB: fromCoarse, rowA: rowFine, rowB: rowCoarse };
}

/** B - A where both are finite and the common grid has ocean, else NaN. */
function subtract(a: Float32Array, b: Float32Array, ocean?: Uint8Array): Float32Array {
  const out = new Float32Array(a.length);
  for (let k = 0; k < a.length; k++) out[k] = ocean && !ocean[k] ? NaN : b[k] - a[k];
  return out;
}

/** The comparison of two runs, B minus A; fields at matching times are computed on demand. */
export class RunComparison implements CompareSummary {
  status: CompareStatus = 'ok';
  message = '';
  commonTimes: CommonTime[];
  toleranceDays: number;
  grid: CommonGrid | null = null;
  fields: FieldName[];
  maxAbsDifference: Partial<Record<FieldName, number>> = {};
  hovmoller: HovmollerDifference[] = [];
  probes: ProbeDifference[] = [];
  integrals: Partial<Record<IntegralKey, SeriesTriple<Float64Array>>> = {};
  scenario: ScenarioDifference[];
  private plan: GridPlan | null = null;
  private readonly snapA: Map<number, RunSnapshot>;
  private readonly snapB: Map<number, RunSnapshot>;

  constructor(
    readonly a: RunData,
    readonly b: RunData,
  ) {
    this.scenario = diffScenarios(JSON.parse(a.scenarioJson), JSON.parse(b.scenarioJson));
    this.fields = a.fields.filter((f) => b.fields.includes(f));
    this.snapA = new Map(a.snapshots.map((s) => [s.index, s]));
    this.snapB = new Map(b.snapshots.map((s) => [s.index, s]));
    const { times, tolerance } = matchTimes(a, b);
    this.commonTimes = times;
    this.toleranceDays = tolerance;
    if (times.length === 0) {
      this.status = 'no-common-times';
      const span = (r: RunData) => `days ${r.days[0]}..${r.days[r.days.length - 1]}`;
      this.message = `no common times: A has ${span(a)}, B has ${span(b)} (times match within ${tolerance} days)`;
    }
    this.plan = planGrid(a, b);
    if (!this.plan) {
      this.status = 'no-common-area';
      const box = (r: RunData) =>
        `${r.grid.lon[0]}..${r.grid.lon[r.grid.nx - 1]}°E, ${r.grid.lat[0]}..${r.grid.lat[r.grid.ny - 1]}°N`;
      this.message = `no common area: A covers ${box(a)}, B covers ${box(b)} (cell centres), with no ocean cell in both`;
      return;
    }
    this.grid = this.plan.grid;
    if (this.status !== 'ok') return;
    this.computeSeries();
    for (const f of this.fields) {
      let m = NaN;
      for (let k = 0; k < times.length; k++) {
        if (!times[k].hasFields) continue;
        const d = this.difference(k, f)!;
        for (let c = 0; c < d.length; c++) {
          const x = Math.abs(d[c]);
          if (x > m || (Number.isNaN(m) && !Number.isNaN(x))) m = x;
        }
      }
      this.maxAbsDifference[f] = m;
    }
  }

  /** Indices into commonTimes where both runs have fields. */
  get fieldTimes(): number[] {
    return this.commonTimes.flatMap((t, k) => (t.hasFields ? [k] : []));
  }

  private field(run: 'A' | 'B', k: number, f: FieldName): Float32Array | null {
    const t = this.commonTimes[k];
    if (!this.plan || !t?.hasFields || !this.fields.includes(f)) return null;
    const snap = run === 'A' ? this.snapA.get(t.indexA)! : this.snapB.get(t.indexB)!;
    const out = (run === 'A' ? this.plan.toCommonA : this.plan.toCommonB).apply(snap.fields[f]!);
    const ocean = this.plan.grid.ocean;
    for (let c = 0; c < out.length; c++) if (!ocean[c]) out[c] = NaN;
    return out;
  }

  /** Field f of A at common time k on the common grid (NaN off the common ocean); null without fields. */
  fieldA(k: number, f: FieldName): Float32Array | null {
    return this.field('A', k, f);
  }

  fieldB(k: number, f: FieldName): Float32Array | null {
    return this.field('B', k, f);
  }

  /** B - A of field f at common time k on the common grid; null where either has no fields. */
  difference(k: number, f: FieldName): Float32Array | null {
    const a = this.fieldA(k, f);
    const b = this.fieldB(k, f);
    return a && b ? subtract(a, b, this.plan!.grid.ocean) : null;
  }

  private computeSeries(): void {
    const { a, b, commonTimes: times } = this;
    const plan = this.plan!;
    const nt = times.length;
    const days = Float64Array.from(times, (t) => t.day);
    for (const iv of INTEGRAL_VARIABLES) {
      const key = iv.key as IntegralKey;
      const va = Float64Array.from(times, (t) => a.integrals[key][t.indexA]);
      const vb = Float64Array.from(times, (t) => b.integrals[key][t.indexB]);
      this.integrals[key] = { a: va, b: vb, diff: vb.map((x, n) => x - va[n]) };
    }
    const nx = plan.grid.nx;
    for (const ha of a.hovmoller) {
      const hb = b.hovmoller.find((h) => Math.abs(h.requestedLat - ha.requestedLat) < 1e-9);
      if (!hb) continue;
      const ra = new Float32Array(nt * nx);
      const rb = new Float32Array(nt * nx);
      const ta = new Float32Array(nx);
      const tb = new Float32Array(nx);
      times.forEach((t, n) => {
        plan.rowA.apply(ha.values.subarray(t.indexA * a.grid.nx, (t.indexA + 1) * a.grid.nx), ta);
        plan.rowB.apply(hb.values.subarray(t.indexB * b.grid.nx, (t.indexB + 1) * b.grid.nx), tb);
        ra.set(ta, n * nx);
        rb.set(tb, n * nx);
      });
      this.hovmoller.push({
        requestedLat: ha.requestedLat,
        rowLatA: ha.rowLat,
        rowLatB: hb.rowLat,
        lon: plan.grid.lon,
        days,
        a: ra,
        b: rb,
        diff: subtract(ra, rb),
      });
    }
    for (const pa of a.probes) {
      const pb = b.probes.find((p) => p.name === pa.name);
      if (!pb) continue;
      const series: ProbeDifference['series'] = {};
      for (const f of this.fields) {
        const sa = Float32Array.from(times, (t) => pa.series[f]![t.indexA]);
        const sb = Float32Array.from(times, (t) => pb.series[f]![t.indexB]);
        series[f] = { a: sa, b: sb, diff: subtract(sa, sb) };
      }
      this.probes.push({ name: pa.name, lonA: pa.lon, latA: pa.lat, lonB: pb.lon, latB: pb.lat, days, series });
    }
  }
}

/** Compare two runs, B minus A. Never throws for runs that merely do not overlap: see status. */
export function compareRuns(a: RunData, b: RunData): RunComparison {
  return new RunComparison(a, b);
}
