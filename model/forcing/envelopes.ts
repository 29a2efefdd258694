// Time envelopes: a wind part's amplitude factor as a function of model time in days.

import type { EnvelopeSpec } from './spec.ts';
import { ForcingError } from './errors.ts';
import * as pm from '../portable-math.ts';

export interface Envelope {
  /** The factor at time `days`. */
  at(days: number): number;
  /** True when at() is the same for every time. */
  readonly constant: boolean;
}

function finite(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v))
    throw new ForcingError(`envelope ${name} must be a finite number (got ${String(v)})`);
  return v;
}

/** 0 before a, rising linearly to 1 at b; a sharp step when b <= a. */
function rise(t: number, a: number, b: number): number {
  if (t <= a) return t < a || b > a ? 0 : 1;
  if (t >= b) return 1;
  return (t - a) / (b - a);
}

export function compileEnvelope(spec: EnvelopeSpec): Envelope {
  switch (spec.kind) {
    case 'constant':
      return { constant: true, at: () => 1 };
    case 'ramp': {
      const start = finite('ramp start', spec.start);
      const duration = finite('ramp duration', spec.duration);
      if (duration < 0) throw new ForcingError(`ramp duration must not be negative (got ${duration})`);
      const end = start + duration;
      if (spec.direction === 'down') return { constant: false, at: (t) => 1 - rise(t, start, end) };
      if (spec.direction !== 'up')
        throw new ForcingError(`ramp direction must be 'up' or 'down' (got ${String(spec.direction)})`);
      return { constant: false, at: (t) => rise(t, start, end) };
    }
    case 'pulse': {
      const start = finite('pulse start', spec.start);
      const duration = finite('pulse duration', spec.duration);
      const ramp = finite('pulse ramp', spec.ramp);
      if (duration < 0 || ramp < 0)
        throw new ForcingError(`pulse duration and ramp must not be negative (got ${duration}, ${ramp})`);
      if (ramp > duration / 2) {
        throw new ForcingError(
          `pulse ramp (${ramp} days) must be at most half the duration (${duration} days): both ramps lie inside it`,
        );
      }
      return { constant: false, at: (t) => pulseFactor(t, start, duration, ramp) };
    }
    case 'harmonics': {
      const mean = finite('harmonics mean', spec.mean);
      const terms = spec.terms.map((term, k) => {
        const period = finite(`harmonics term ${k} period`, term.period);
        if (!(period > 0)) throw new ForcingError(`harmonics term ${k}: the period must be positive (got ${period})`);
        return {
          omega: (2 * Math.PI) / period,
          amplitude: finite(`harmonics term ${k} amplitude`, term.amplitude),
          peak: finite(`harmonics term ${k} peakDay`, term.peakDay),
        };
      });
      if (terms.every((term) => term.amplitude === 0)) return { constant: true, at: () => mean };
      return {
        constant: false,
        at(t) {
          let s = mean;
          for (const term of terms) s += term.amplitude * pm.cos(term.omega * (t - term.peak));
          return s;
        },
      };
    }
    case 'table': {
      const pts = spec.points;
      if (!Array.isArray(pts) || pts.length === 0)
        throw new ForcingError('an envelope table needs at least one [day, factor] point');
      const days = new Float64Array(pts.length);
      const vals = new Float64Array(pts.length);
      pts.forEach(([d, v], k) => {
        days[k] = finite(`table point ${k} day`, d);
        vals[k] = finite(`table point ${k} factor`, v);
        // Equal days are allowed: they make a jump (the later point wins from that day on).
        if (k > 0 && days[k] < days[k - 1]) {
          throw new ForcingError(
            `envelope table days must not decrease (point ${k}: day ${days[k]} after day ${days[k - 1]})`,
          );
        }
      });
      if (vals.every((v) => v === vals[0])) {
        const v0 = vals[0];
        return { constant: true, at: () => v0 };
      }
      const n = pts.length;
      return {
        constant: false,
        at(t) {
          if (t < days[0]) return vals[0];
          if (t >= days[n - 1]) return vals[n - 1];
          // Binary search for the segment days[lo] <= t < days[lo + 1].
          let lo = 0;
          let hi = n - 1;
          while (hi - lo > 1) {
            const mid = (lo + hi) >> 1;
            if (days[mid] <= t) lo = mid;
            else hi = mid;
          }
          const f = (t - days[lo]) / (days[hi] - days[lo]);
          return vals[lo] + f * (vals[hi] - vals[lo]);
        },
      };
    }
    case 'switch-off': {
      const day = finite('switch-off day', spec.day);
      const ramp = finite('switch-off ramp', spec.ramp);
      if (ramp < 0) throw new ForcingError(`switch-off ramp must not be negative (got ${ramp})`);
      // Full strength up to `day`, then linearly down to 0 at day + ramp (a sharp step when ramp = 0).
      return { constant: false, at: (t) => (t <= day ? 1 : ramp > 0 && t < day + ramp ? 1 - (t - day) / ramp : 0) };
    }
    default:
      throw new ForcingError(`unknown envelope kind '${String((spec as { kind: unknown }).kind)}'`);
  }
}

/**
 * 0 before start and after start + duration; linear ramps of `ramp` days inside the duration.
 * Shared with the random bursts.
 */
export function pulseFactor(t: number, start: number, duration: number, ramp: number): number {
  const end = start + duration;
  if (t < start || t >= end) return 0;
  if (ramp <= 0) return 1;
  if (t < start + ramp) return (t - start) / ramp;
  if (t > end - ramp) return (end - t) / ramp;
  return 1;
}
