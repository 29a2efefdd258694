// Measuring wave speeds from a Hovmoller diagram (longitude against time), and arrival times at a
// point, so a run can be set beside theory (Kelvin east at c, long Rossby west at c/3).
//
// Two ways to find the signal at each time, both documented in docs/waves.md:
//  - 'front': the leading edge, where the signal first reaches a threshold (a fraction of its
//    largest amplitude, over the whole diagram or at each time), searched from the side the wave
//    travels towards and refined by linear interpolation between cells;
//  - 'peak': the position of the largest value (of the chosen sign), refined by a parabola.
// The positions are then fitted with a straight line x = x0 + s t by least squares; the speed's
// standard error comes from the scatter of the residuals (ordinary regression, common practice).

export interface HovmollerData {
  /** Cell-centre longitudes, degrees east (increasing). */
  lon: ArrayLike<number>;
  /** Model days of the rows. */
  days: ArrayLike<number>;
  /** One row of values per day (NaN on land). */
  rows: ArrayLike<ArrayLike<number>>;
}

export interface FrontOptions {
  /** Direction of travel. */
  direction: 'east' | 'west';
  method: 'front' | 'peak';
  /** Sign of the signal: +1 downwelling (h' > 0), -1 upwelling. Default +1. */
  sign?: 1 | -1;
  /** Front method: fraction of the largest amplitude that defines the front (default 0.5). */
  threshold?: number;
  /**
   * Front method: whose largest amplitude the threshold is a fraction of. 'diagram' (default):
   * one level for all times, right for a wave that keeps its amplitude. 'each-time': the level
   * follows the row's own largest value, so the front of a wave that decays as it goes (friction)
   * keeps its place on the pulse instead of falling behind it; rows whose largest value is below
   * `floor` of the diagram's are skipped (there the level would follow noise).
   */
  levelFrom?: 'diagram' | 'each-time';
  /** With levelFrom 'each-time': the smallest row amplitude used, as a fraction of the diagram's (default 0.1). */
  floor?: number;
  /** Only these days and longitudes take part (e.g. before the wave reaches a coast). */
  dayRange?: [number, number];
  lonRange?: [number, number];
  /** Metres per degree of longitude (R pi / 180 on the beta plane). */
  metresPerDegree: number;
}

export interface SpeedFit {
  /** Speed in m s-1, positive in the direction of travel asked for. */
  speed: number;
  /** Standard error of the speed, m s-1 (NaN with fewer than 3 points). */
  standardError: number;
  /** Positions used: [day, lon]. */
  points: Array<[number, number]>;
  method: 'front' | 'peak';
  /** The amplitude the threshold was taken from (front method). */
  amplitude: number;
}

export class WaveFitError extends Error {
  override name = 'WaveFitError';
}

export function fitSpeed(h: HovmollerData, o: FrontOptions): SpeedFit {
  const sign = o.sign ?? 1;
  const nx = h.lon.length;
  const [d0, d1] = o.dayRange ?? [-Infinity, Infinity];
  const [l0, l1] = o.lonRange ?? [-Infinity, Infinity];
  const cols: number[] = [];
  for (let i = 0; i < nx; i++) if (h.lon[i] >= l0 && h.lon[i] <= l1) cols.push(i);
  if (cols.length < 3) throw new WaveFitError('fewer than 3 longitudes in the range asked for');
  const times: number[] = [];
  for (let n = 0; n < h.days.length; n++) if (h.days[n] >= d0 && h.days[n] <= d1) times.push(n);

  let amplitude = 0;
  for (const n of times)
    for (const i of cols) {
      const x = sign * h.rows[n][i];
      if (x > amplitude) amplitude = x;
    }
  if (!(amplitude > 0)) throw new WaveFitError(`no ${sign > 0 ? 'positive' : 'negative'} signal in the diagram`);
  const fraction = o.threshold ?? 0.5;
  const floor = (o.floor ?? 0.1) * amplitude;

  const points: Array<[number, number]> = [];
  for (const n of times) {
    const row = h.rows[n];
    const value = (i: number) => {
      const x = sign * row[i];
      return Number.isNaN(x) ? -Infinity : x;
    };
    let level = fraction * amplitude;
    if (o.levelFrom === 'each-time') {
      let rowMax = -Infinity;
      for (const i of cols) rowMax = Math.max(rowMax, value(i));
      if (!(rowMax >= floor)) continue;
      level = fraction * rowMax;
    }
    let at: number | null = null;
    if (o.method === 'front') {
      // Search from the side the wave is heading to: the first column at or above the level.
      const order = o.direction === 'east' ? [...cols].reverse() : cols;
      for (let q = 0; q < order.length; q++) {
        const i = order[q];
        if (value(i) >= level) {
          if (q === 0) break; // the signal already fills the range: no front to see
          const prev = order[q - 1];
          const a = value(prev);
          const b = value(i);
          const frac = b === a ? 0 : (level - a) / (b - a);
          at = h.lon[prev] + frac * (h.lon[i] - h.lon[prev]);
          break;
        }
      }
    } else {
      let m = -1;
      for (const i of cols) if (m < 0 || value(i) > value(m)) m = i;
      if (m >= 0 && value(m) >= level) {
        const q = cols.indexOf(m);
        at = h.lon[m];
        if (q > 0 && q < cols.length - 1) {
          const a = value(cols[q - 1]);
          const b = value(m);
          const c = value(cols[q + 1]);
          const den = a - 2 * b + c;
          if (Number.isFinite(den) && den < 0)
            at = h.lon[m] + ((0.5 * (a - c)) / den) * (h.lon[cols[q + 1]] - h.lon[m]);
        }
      }
    }
    if (at !== null) points.push([h.days[n], at]);
  }
  if (points.length < 2)
    throw new WaveFitError(`the signal was found at ${points.length} time(s); at least 2 are needed`);
  const { slope, slopeError } = regress(points);
  const toMs = o.metresPerDegree / 86400;
  const dir = o.direction === 'east' ? 1 : -1;
  return { speed: dir * slope * toMs, standardError: slopeError * toMs, points, method: o.method, amplitude };
}

/** Least-squares line through (t, x); slope and its standard error. */
export function regress(points: Array<[number, number]>): { slope: number; intercept: number; slopeError: number } {
  const n = points.length;
  const mt = points.reduce((s, p) => s + p[0], 0) / n;
  const mx = points.reduce((s, p) => s + p[1], 0) / n;
  let stt = 0;
  let stx = 0;
  for (const [t, x] of points) {
    stt += (t - mt) * (t - mt);
    stx += (t - mt) * (x - mx);
  }
  if (stt === 0) throw new WaveFitError('all positions are at one time: no speed can be fitted');
  const slope = stx / stt;
  const intercept = mx - slope * mt;
  let rss = 0;
  for (const [t, x] of points) {
    const r = x - intercept - slope * t;
    rss += r * r;
  }
  const slopeError = n > 2 ? Math.sqrt(rss / (n - 2) / stt) : NaN;
  return { slope, intercept, slopeError };
}

/**
 * The first day a time series reaches `fraction` of its largest value of the given sign,
 * interpolated linearly between samples; null if it never does.
 */
export function arrivalDay(
  days: ArrayLike<number>,
  values: ArrayLike<number>,
  fraction = 0.5,
  sign: 1 | -1 = 1,
): number | null {
  let peak = 0;
  for (let n = 0; n < values.length; n++) if (sign * values[n] > peak) peak = sign * values[n];
  if (!(peak > 0)) return null;
  const level = fraction * peak;
  for (let n = 0; n < values.length; n++) {
    const x = sign * values[n];
    if (x >= level) {
      if (n === 0) return days[0];
      const a = sign * values[n - 1];
      return days[n - 1] + ((level - a) / (x - a)) * (days[n] - days[n - 1]);
    }
  }
  return null;
}
