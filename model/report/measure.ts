// Wave speeds and arrival times measured from a run, set beside theory: the Kelvin wave on the
// equatorial Hovmoller (front method) against c = sqrt(g' H), the long Rossby wave on the
// off-equatorial section where it shows against c/3, and the arrival day at each probe.
// Used by the run report and by `pycno compare`. docs/library.md says how the ranges are chosen.

import { latLabel } from '../display/coordinates.ts';
import { EARTH } from '../config.ts';
import {
  fitSpeed,
  regress,
  arrivalDay,
  WaveFitError,
  type FrontOptions,
  type SpeedFit,
} from '../diagnostics/wave-fit.ts';
import { hovmollerData, type RunData } from '../io/run-data.ts';
import { longRossbySpeed } from '../theory.ts';

export const METRES_PER_DEGREE = (EARTH.radius * Math.PI) / 180;

export interface SpeedMeasure {
  /** Latitude of the model row measured. */
  lat: number;
  direction: 'east' | 'west';
  /** +1 downwelling (h' > 0) signal followed, -1 upwelling. */
  sign: 1 | -1;
  speed: number;
  standardError: number;
  theory: number;
  /** Front positions used, [day, lon], after dropping outliers. */
  points: Array<[number, number]>;
  dayRange: [number, number];
  lonRange: [number, number];
}

export interface NotMeasured {
  reason: string;
}

export interface WaveMeasures {
  c: number;
  rossbyTheory: number;
  kelvin: SpeedMeasure | NotMeasured;
  /** null when the run has no off-equatorial Hovmoller section to look at. */
  rossby: SpeedMeasure | NotMeasured | null;
  arrivals: Array<{ probe: string; lon: number; lat: number; sign: 1 | -1; day: number | null }>;
}

export function isMeasured(m: SpeedMeasure | NotMeasured | null): m is SpeedMeasure {
  return m !== null && 'speed' in m;
}

/** Ocean longitudes of a section (columns with a value at some time). */
function oceanSpan(rows: Float32Array[], lon: Float64Array): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < lon.length; i++)
    if (rows.some((r) => Number.isFinite(r[i]))) {
      lo = Math.min(lo, lon[i]);
      hi = Math.max(hi, lon[i]);
    }
  return lo <= hi ? [lo, hi] : null;
}

/** Sign of the largest |value| inside the ranges. */
function dominantSign(
  rows: Float32Array[],
  lon: Float64Array,
  days: Float64Array,
  lr: [number, number],
  dr: [number, number],
): 1 | -1 {
  let best = 0;
  for (let n = 0; n < rows.length; n++) {
    if (days[n] < dr[0] || days[n] > dr[1]) continue;
    for (let i = 0; i < lon.length; i++)
      if (lon[i] >= lr[0] && lon[i] <= lr[1] && Math.abs(rows[n][i]) > Math.abs(best)) best = rows[n][i];
  }
  return best < 0 ? -1 : 1;
}

/**
 * Refit without the outliers: positions further than 3 robust deviations (1.4826 MAD, at least
 * one grid cell) from the line are dropped, twice at most. A stray patch of another signal that
 * crosses the threshold then does not pull the line.
 */
function robust(
  fit: SpeedFit,
  cell: number,
  direction: 'east' | 'west',
): { speed: number; standardError: number; points: Array<[number, number]> } {
  let points = fit.points;
  for (let pass = 0; pass < 2 && points.length >= 4; pass++) {
    const { slope, intercept } = regress(points);
    const res = points.map(([t, x]) => x - intercept - slope * t);
    const abs = res.map(Math.abs).sort((p, q) => p - q);
    const mad = abs[Math.floor(abs.length / 2)];
    const limit = Math.max(3 * 1.4826 * mad, cell);
    const kept = points.filter((_, k) => Math.abs(res[k]) <= limit);
    if (kept.length === points.length || kept.length < 3) break;
    points = kept;
  }
  const { slope, slopeError } = regress(points);
  const toMs = METRES_PER_DEGREE / 86400;
  return { speed: (direction === 'east' ? 1 : -1) * slope * toMs, standardError: slopeError * toMs, points };
}

/**
 * The second pass for a wave that keeps its shape: over its crossing only (from when it is free of
 * the wind that makes it, to when the first line leaves the range), the level follows each time's
 * own amplitude. Friction shrinks the wave as
 * it goes, and a fixed level slides back along its flank and reads the speed low; past the
 * crossing a per-time level would follow the weaker reflected and forced signals instead.
 */
function refitCrossing(
  h: ReturnType<typeof hovmollerData>,
  base: Omit<FrontOptions, 'dayRange'>,
  first: ReturnType<typeof robust>,
  dayRange: [number, number],
  cell: number,
): ReturnType<typeof robust> | null {
  const { slope, intercept } = regress(first.points);
  const exit = ((base.direction === 'east' ? base.lonRange![1] : base.lonRange![0]) - intercept) / slope;
  // The wave is free once its amplitude is near its largest (while the wind still forces it, it
  // grows and its front is still forming): the first time the row's peak reaches 90 % of the
  // largest peak within the crossing.
  const end = Number.isFinite(exit) ? exit : dayRange[1];
  const peaks: Array<[number, number]> = [];
  for (let n = 0; n < h.days.length; n++) {
    const d = h.days[n];
    if (d < first.points[0][0] || d > end) continue;
    let p = 0;
    for (let i = 0; i < h.lon.length; i++)
      if (h.lon[i] >= base.lonRange![0] && h.lon[i] <= base.lonRange![1])
        p = Math.max(p, (base.sign ?? 1) * h.rows[n][i] || 0);
    peaks.push([d, p]);
  }
  const largest = Math.max(0, ...peaks.map((q) => q[1]));
  const start = peaks.find((q) => q[1] >= 0.9 * largest)?.[0] ?? first.points[0][0];
  const crossing: [number, number] = [
    start,
    Number.isFinite(exit) && exit > start ? Math.min(dayRange[1], exit) : dayRange[1],
  ];
  try {
    const second = robust(fitSpeed(h, { ...base, dayRange: crossing, levelFrom: 'each-time' }), cell, base.direction);
    return second.points.length >= 4 ? second : null;
  } catch (e) {
    if (e instanceof WaveFitError) return null;
    throw e;
  }
}

/**
 * levelFrom 'each-time' refits the crossing with the level following each time's amplitude: right
 * for the Kelvin wave, which keeps its shape while friction shrinks it. A Rossby packet disperses
 * (its long waves run ahead), so there one level for the diagram is kept.
 */
function measure(
  run: RunData,
  section: number,
  direction: 'east' | 'west',
  theory: number,
  dayFrom: number,
  levelFrom: 'diagram' | 'each-time',
  forceSign?: 1 | -1,
): SpeedMeasure | NotMeasured {
  const h = hovmollerData(run, section);
  const span = oceanSpan(h.rows, h.lon);
  const lat = run.hovmoller[section].rowLat;
  if (!span) return { reason: `the section at ${latLabel(lat)} has no ocean` };
  const cell = Math.abs(h.lon[1] - h.lon[0]) || 1;
  // Keep clear of the coasts, where waves pile up and reflect: 5 % of the width, 3 cells at least.
  const margin = Math.max(3 * cell, 0.05 * (span[1] - span[0]));
  const lonRange: [number, number] = [span[0] + margin, span[1] - margin];
  const dayRange: [number, number] = [dayFrom, run.days[run.days.length - 1]];
  const sign = forceSign ?? dominantSign(h.rows, h.lon, h.days, lonRange, dayRange);
  try {
    // First one level for the whole diagram: it sees only the strong leading wave.
    const base = { direction, method: 'front', sign, lonRange, metresPerDegree: METRES_PER_DEGREE } as const;
    const first = robust(fitSpeed(h, { ...base, dayRange }), cell, direction);
    if (first.points.length < 4)
      return { reason: `the front was found at only ${first.points.length} times at ${latLabel(lat)}` };
    const r = levelFrom === 'each-time' ? (refitCrossing(h, base, first, dayRange, cell) ?? first) : first;
    return {
      lat,
      direction,
      sign,
      speed: r.speed,
      standardError: r.standardError,
      theory,
      points: r.points,
      dayRange,
      lonRange,
    };
  } catch (e) {
    if (e instanceof WaveFitError) return { reason: `${e.message} (section at ${latLabel(lat)})` };
    throw e;
  }
}

export function measureWaves(run: RunData): WaveMeasures {
  const c = run.physics.waveSpeed;
  const rossbyTheory = longRossbySpeed(c);
  const byLat = run.hovmoller.map((s, k) => ({ k, lat: Math.abs(s.rowLat) }));
  const eq = byLat.filter((s) => s.lat <= 1).sort((p, q) => p.lat - q.lat)[0];
  const kelvin: SpeedMeasure | NotMeasured = eq
    ? measure(run, eq.k, 'east', c, run.days[0], 'each-time')
    : { reason: 'the run has no Hovmoller section within 1° of the equator' };

  // Long Rossby: off-equatorial sections (1° to 3 L from the equator), after the Kelvin wave has
  // crossed the measured range (before that, its own off-equatorial flank moves east there).
  // The run's own beta: a scenario may set physics.coriolis.beta, and L follows it.
  const L = run.physics.equatorialRadius / METRES_PER_DEGREE;
  let from = run.days[0];
  if (isMeasured(kelvin)) {
    const { slope, intercept } = regress(kelvin.points.map(([t, x]) => [t, x]));
    if (slope > 0) from = Math.max(from, (kelvin.lonRange[1] - intercept) / slope);
  }
  const off = byLat.filter((s) => s.lat > 1 && s.lat <= 3 * L);
  let rossby: SpeedMeasure | NotMeasured | null = null;
  if (off.length > 0) {
    // Both signs on every such section; the longest westward track wins (then the tighter fit).
    const tries = off.flatMap((s) => [
      measure(run, s.k, 'west', rossbyTheory, from, 'diagram', 1),
      measure(run, s.k, 'west', rossbyTheory, from, 'diagram', -1),
    ]);
    const good = tries.filter(isMeasured).filter((m) => m.speed > 0);
    good.sort((p, q) => q.points.length - p.points.length || p.standardError / p.speed - q.standardError / q.speed);
    rossby = good[0] ?? {
      reason: `no westward front on the section${off.length > 1 ? 's' : ''} at ${off.map((s) => latLabel(run.hovmoller[s.k].rowLat)).join(', ')} after day ${Number(from.toPrecision(3))}`,
    };
  }

  const arrivals = run.probes.map((p) => {
    const s = p.series.h_anom;
    if (!s) return { probe: p.name, lon: p.lon, lat: p.lat, sign: 1 as const, day: null };
    let best = 0;
    for (const x of s) if (Math.abs(x) > Math.abs(best)) best = x;
    const sign: 1 | -1 = best < 0 ? -1 : 1;
    return { probe: p.name, lon: p.lon, lat: p.lat, sign, day: arrivalDay(run.days, s, 0.5, sign) };
  });
  return { c, rossbyTheory, kelvin, rossby, arrivals };
}
