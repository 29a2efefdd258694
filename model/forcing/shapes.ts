// Scalar spatial shapes: a wind part's pattern as a function of (lon, lat) and, for formulas, t.

import type { BandProfile, ShapeSpec } from './spec.ts';
import { ForcingError } from './errors.ts';
import { compileFormula } from './formula.ts';
import * as pm from '../portable-math.ts';

export interface Shape {
  /** The shape at lon (degrees east), lat (degrees north), t (days). */
  at(lon: number, lat: number, t: number): number;
  /** True when at() depends on t (only formulas that read t). */
  readonly timeDependent: boolean;
  /** Short description for error messages. */
  readonly label: string;
}

function num(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v))
    throw new ForcingError(`${name} must be a finite number (got ${String(v)})`);
  return v;
}
function positive(name: string, v: unknown): number {
  const x = num(name, v);
  if (!(x > 0)) throw new ForcingError(`${name} must be positive (got ${x})`);
  return x;
}

export function compileBand(p: BandProfile): (lat: number) => number {
  switch (p.kind) {
    case 'cosine': {
      const c = num('band centre', p.centre);
      const hw = positive('band halfWidth', p.halfWidth);
      return (lat) => (Math.abs(lat - c) < hw ? pm.cos(((Math.PI / 2) * (lat - c)) / hw) : 0);
    }
    case 'tanh': {
      const s = num('band south', p.south);
      const n = num('band north', p.north);
      const w = num('band edge', p.edge);
      if (!(n > s)) throw new ForcingError(`band north (${n}) must lie north of band south (${s})`);
      if (w < 0) throw new ForcingError(`band edge must not be negative (got ${w})`);
      // Half the difference of two tanh steps: 1 well inside, 1/2 on each edge latitude, 0 far out.
      if (w === 0) return (lat) => (lat > s && lat < n ? 1 : lat === s || lat === n ? 0.5 : 0);
      return (lat) => 0.5 * (pm.tanh((lat - s) / w) - pm.tanh((lat - n) / w));
    }
    case 'gap': {
      const c = num('gap centre', p.centre);
      const w = positive('gap width', p.width);
      const d = num('gap depth', p.depth);
      return (lat) => 1 - d * pm.exp(-((lat - c) * (lat - c)) / (2 * w * w));
    }
    case 'trades': {
      const e = positive('trades edgeLat', p.edgeLat);
      // Zero beyond +-edgeLat, where the cosine would turn negative (and positive again further out).
      return (lat) => (Math.abs(lat) < e ? pm.cos((Math.PI * lat) / (2 * e)) : 0);
    }
    default:
      throw new ForcingError(`unknown band profile '${String((p as { kind: unknown }).kind)}'`);
  }
}

export function compileShape(spec: ShapeSpec): Shape {
  switch (spec.kind) {
    case 'uniform':
      return { timeDependent: false, label: 'uniform', at: () => 1 };
    case 'patch': {
      const lon0 = num('patch lon', spec.lon);
      const lat0 = num('patch lat', spec.lat);
      const sx = positive('patch lonWidth', spec.lonWidth);
      const sy = positive('patch latWidth', spec.latWidth);
      const tilt = ((spec.tiltDeg === undefined ? 0 : num('patch tiltDeg', spec.tiltDeg)) * Math.PI) / 180;
      const c = pm.cos(tilt);
      const s = pm.sin(tilt);
      const ax = 1 / (2 * sx * sx);
      const ay = 1 / (2 * sy * sy);
      return {
        timeDependent: false,
        label: 'patch',
        at(lon, lat) {
          const dx = lon - lon0;
          const dy = lat - lat0;
          // Coordinates along the patch's own axes, which are turned anticlockwise by tilt.
          const xr = dx * c + dy * s;
          const yr = -dx * s + dy * c;
          return pm.exp(-(xr * xr * ax + yr * yr * ay));
        },
      };
    }
    case 'band': {
      const f = compileBand(spec.profile);
      return { timeDependent: false, label: `band (${spec.profile.kind})`, at: (_lon, lat) => f(lat) };
    }
    case 'formula': {
      const compiled = compileFormula(spec.expression);
      return { timeDependent: compiled.usesTime, label: `formula '${spec.expression}'`, at: compiled.evaluate };
    }
    default:
      throw new ForcingError(`unknown shape kind '${String((spec as { kind: unknown }).kind)}'`);
  }
}
