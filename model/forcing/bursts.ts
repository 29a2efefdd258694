// Seeded random westerly bursts. A burst is an eastward Gaussian patch switched on by a pulse.
// The same seed gives bit-identical draws: seedrandom's ARC4 generator works in integer arithmetic,
// and besides it we use only + - * / and the portable log (model/portable-math.ts): Math.log itself
// differs between Node and Chromium in the last bit for some arguments (test/browser/reproducible.test.ts).

import seedrandom from 'seedrandom';
import type { BurstsPart } from './spec.ts';
import { ForcingError } from './errors.ts';
import * as pm from '../portable-math.ts';

/** One drawn burst; recorded in output files so a run can be checked and repeated. */
export interface DrawnBurst {
  /** Index of its part in WindSpec.parts, and the part's name if it has one. */
  part: number;
  partName?: string;
  quantity: 'stress' | 'wind';
  /** Start day and duration (days); the pulse ramps up and down inside the duration. */
  start: number;
  duration: number;
  ramp: number;
  /** Eastward amplitude: N m-2 for 'stress', m s-1 for 'wind'. */
  amplitude: number;
  lon: number;
  lat: number;
  lonWidth: number;
  latWidth: number;
}

/** A safety cap: far more bursts than any experiment needs, small enough to keep memory bounded. */
export const MAX_BURSTS = 100_000;

function range(name: string, r: unknown, positive: boolean): [number, number] {
  if (!Array.isArray(r) || r.length !== 2 || !r.every((v) => typeof v === 'number' && Number.isFinite(v))) {
    throw new ForcingError(`bursts ${name} must be a [min, max] pair of numbers (got ${JSON.stringify(r)})`);
  }
  const [a, b] = r as [number, number];
  if (b < a) throw new ForcingError(`bursts ${name}: max (${b}) is below min (${a})`);
  if (positive && !(a > 0)) throw new ForcingError(`bursts ${name} must be positive (got min ${a})`);
  return [a, b];
}

/** The seed string used for part `index`: each part has its own stream, so editing one part leaves the others' bursts unchanged. */
export function burstSeed(seed: string, index: number): string {
  return `${seed}|bursts|${index}`;
}

/**
 * Draw the bursts of one part. Starts come from a Poisson process of the given rate over the
 * window (exponential gaps), which makes the count Poisson with mean rate * window / 365 and the
 * starts uniform in the window. For each burst, in this order: amplitude, lon, lat, lonWidth,
 * latWidth, duration, each uniform in its range.
 */
export function drawBursts(part: BurstsPart, seed: string, index = 0): DrawnBurst[] {
  const rate = part.ratePerYear;
  if (!(typeof rate === 'number' && rate >= 0 && Number.isFinite(rate))) {
    throw new ForcingError(`bursts ratePerYear must be a number >= 0 (got ${String(rate)})`);
  }
  const [w0, w1] = range('window', part.window, false);
  const amplitude = range('amplitude', part.amplitude, false);
  const lon = range('lon', part.lon, false);
  const lat = range('lat', part.lat, false);
  const lonWidth = range('lonWidth', part.lonWidth, true);
  const latWidth = range('latWidth', part.latWidth, true);
  const duration = range('duration', part.duration, true);
  const ramp = part.ramp;
  if (!(typeof ramp === 'number' && ramp >= 0 && Number.isFinite(ramp)))
    throw new ForcingError(`bursts ramp must be a number >= 0 (got ${String(ramp)})`);
  const expected = (rate * (w1 - w0)) / 365;
  if (expected > MAX_BURSTS / 2) {
    throw new ForcingError(
      `bursts: ${expected.toFixed(0)} bursts expected in the window; at most ${MAX_BURSTS / 2} are supported`,
    );
  }
  const out: DrawnBurst[] = [];
  if (rate === 0) return out;
  const rng = seedrandom(burstSeed(seed, index));
  const uniform = ([a, b]: [number, number]) => a + (b - a) * rng();
  const meanGap = 365 / rate;
  let t = w0;
  for (;;) {
    // 1 - u lies in (0, 1], so the log is finite.
    t += -meanGap * pm.log(1 - rng());
    if (t > w1 || out.length >= MAX_BURSTS) break;
    const b: DrawnBurst = {
      part: index,
      quantity: part.quantity,
      start: t,
      amplitude: uniform(amplitude),
      lon: uniform(lon),
      lat: uniform(lat),
      lonWidth: uniform(lonWidth),
      latWidth: uniform(latWidth),
      duration: uniform(duration),
      // Both ramps lie inside the burst; a burst shorter than two ramps becomes a triangle.
      ramp: 0,
    };
    b.ramp = Math.min(ramp, b.duration / 2);
    if (part.name !== undefined) b.partName = part.name;
    out.push(b);
  }
  return out;
}
