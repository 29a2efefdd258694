// Initial states: rest, a Gaussian thickness bump, and the analytical shapes of a free equatorial
// Kelvin wave and a long first-meridional-mode Rossby wave (Matsuno 1966; Gill 1982, ch. 11).

import type { PhysicsConfig } from './config.ts';
import { InputError } from './errors.ts';
import type { Grid } from './grid.ts';
import { placeOfIndex, staggeringOf } from './grid-place.ts';
import { MAX_LAYER_THICKNESS, RUNAWAY_SPEED } from './health-limits.ts';
import { State, type FieldArray } from './state.ts';
import * as pm from './portable-math.ts';
import { equatorialBeta, equatorialRadius, waveSpeed } from './theory.ts';

export type InitialSpec =
  | { kind: 'rest' }
  /** h' = amplitude exp(-r^2 / radius^2), r the distance in degrees from (lon, lat). */
  | { kind: 'bump'; lon: number; lat: number; radiusDeg: number; amplitude: number }
  /** Kelvin wave: h' = a exp(-y^2/(2L^2)) exp(-((lon-lon0)/w)^2), u = (g'/c) h', v = 0. */
  | { kind: 'kelvin'; lon: number; amplitude: number; zonalWidthDeg: number }
  /** Long n = 1 Rossby wave centred at lon, with a Gaussian zonal envelope of e-folding width w. */
  | { kind: 'rossby'; lon: number; amplitude: number; zonalWidthDeg: number };

/** x * x: the ** operator would call the host's pow. */
const square = (x: number) => x * x;

/** Equatorial scales: c = sqrt(g' H), L = sqrt(c / beta). */
export function equatorialScales(physics: PhysicsConfig): { c: number; L: number } {
  const c = waveSpeed(physics.reducedGravity, physics.layerThickness);
  return { c, L: equatorialRadius(c, equatorialBeta(physics)) };
}

export function initialState(grid: Grid, physics: PhysicsConfig, spec: InitialSpec): State {
  const s = new State(grid);
  const { c, L } = equatorialScales(physics);
  const H = physics.layerThickness;
  const mPerDeg = grid.dx / grid.dLon;
  switch (spec.kind) {
    case 'rest':
      break;
    case 'bump': {
      if (!(spec.radiusDeg > 0))
        throw new InputError(`bump radius must be > 0 degrees (got ${spec.radiusDeg})`, 'initial.radiusDeg');
      fillCentres(grid, s.h, (lon, lat) => {
        const dLon = lon - spec.lon;
        const dLat = lat - spec.lat;
        return spec.amplitude * pm.exp(-(dLon * dLon + dLat * dLat) / (spec.radiusDeg * spec.radiusDeg));
      });
      break;
    }
    case 'kelvin': {
      if (!(spec.zonalWidthDeg > 0))
        throw new InputError(`zonal width must be > 0 degrees (got ${spec.zonalWidthDeg})`, 'initial.zonalWidthDeg');
      const shape = (lon: number, y: number) =>
        spec.amplitude * pm.exp(-(y * y) / (2 * L * L)) * pm.exp(-square((lon - spec.lon) / spec.zonalWidthDeg));
      fillCentres(grid, s.h, (lon, _lat, y) => shape(lon, y));
      // Kelvin wave: u = (g'/c) h' = (c/H) h', in geostrophic balance with dh'/dy.
      fillU(grid, s.u, (lon, y) => (c / H) * shape(lon, y));
      break;
    }
    case 'rossby': {
      if (!(spec.zonalWidthDeg > 0))
        throw new InputError(`zonal width must be > 0 degrees (got ${spec.zonalWidthDeg})`, 'initial.zonalWidthDeg');
      // Long-wave limit (v_t neglected) of the n = 1 mode, in units of L and c:
      //   h'/H = F (2 y^2 + 1) e^{-y^2/2},  u/c = F (2 y^2 - 3) e^{-y^2/2},
      //   v/c = (4/3) dF/dx 2 y e^{-y^2/2};  F moves west at c/3.
      // (Derived from the equations in Gill 1982, §11.6, with Hermite functions.)
      const a = spec.amplitude;
      const w = spec.zonalWidthDeg * mPerDeg;
      const x0 = spec.lon * mPerDeg;
      const F = (lon: number) => pm.exp(-square((lon * mPerDeg - x0) / w));
      const dFdx = (lon: number) => ((-2 * (lon * mPerDeg - x0)) / (w * w)) * F(lon);
      fillCentres(grid, s.h, (lon, _lat, y) => {
        const Y = y / L;
        return a * F(lon) * (2 * Y * Y + 1) * pm.exp(-0.5 * Y * Y);
      });
      fillU(grid, s.u, (lon, y) => {
        const Y = y / L;
        return (c / H) * a * F(lon) * (2 * Y * Y - 3) * pm.exp(-0.5 * Y * Y);
      });
      fillV(grid, s.v, (lon, y) => {
        const Y = y / L;
        return (c / H) * a * (4 / 3) * L * dFdx(lon) * 2 * Y * pm.exp(-0.5 * Y * Y);
      });
      break;
    }
  }
  checkInitial(grid, physics, s);
  return s;
}

/**
 * A start state is refused before the first step when a value is not finite, lies outside the
 * bounds of a sane state (health-limits.ts: a current faster than a run may have, a layer thicker
 * than the ocean is deep, or none at all), or when its multistep tendencies would carry a value
 * past those bounds in one step of dt seconds. The message names the variable and the place.
 */
export function checkInitial(grid: Grid, physics: PhysicsConfig, s: State, dt?: number): void {
  const H = physics.layerThickness;
  const refuse = (name: "h'" | 'u' | 'v', a: ArrayLike<number>, k: number, what: string): never => {
    throw new InputError(
      `the initial state has ${name} = ${a[k]} at ${placeOfIndex(grid, k, name === "h'" ? 'centre' : staggeringOf(name))}: ${what}`,
      'initial',
    );
  };
  for (const [name, a] of [
    ["h'", s.h],
    ['u', s.u],
    ['v', s.v],
  ] as const) {
    for (let k = 0; k < a.length; k++) if (!Number.isFinite(a[k])) refuse(name, a, k, 'a start must be finite');
  }
  for (const [name, a] of [
    ['u', s.u],
    ['v', s.v],
  ] as const) {
    for (let k = 0; k < a.length; k++) {
      if (Math.abs(a[k]) > RUNAWAY_SPEED)
        refuse(
          name,
          a,
          k,
          `a start must be slower than ${RUNAWAY_SPEED} m/s, the speed at which a run is stopped as blown up`,
        );
    }
  }
  for (let k = 0; k < s.h.length; k++) {
    if (H + s.h[k] > MAX_LAYER_THICKNESS)
      refuse(
        "h'",
        s.h,
        k,
        `a layer of ${H} m plus this anomaly is thicker than any ocean is deep (at most ${MAX_LAYER_THICKNESS} m)`,
      );
    const thick = H + s.h[k];
    if (grid.ocean[k] && thick <= 0) {
      throw new InputError(
        `the initial state leaves no upper layer (thickness ${thick.toFixed(1)} m) at ${placeOfIndex(grid, k, 'centre')}; h' must stay above -H = -${H} m`,
        'initial',
      );
    }
  }
  if (dt === undefined || !(dt > 0)) return;
  for (let n = 0; n < s.historyCount; n++) {
    for (const [key, name, bound, unit] of [
      ['du', 'du', RUNAWAY_SPEED, 'm/s'],
      ['dv', 'dv', RUNAWAY_SPEED, 'm/s'],
      ['dh', 'dh', MAX_LAYER_THICKNESS, 'm'],
    ] as const) {
      const a = s.history[key][n];
      for (let k = 0; k < a.length; k++) {
        if (!(Math.abs(a[k]) * dt <= bound)) {
          throw new InputError(
            `the initial state's tendency ${name} (${n === 0 ? 'one step' : 'two steps'} back) is ${a[k]} at ${placeOfIndex(grid, k, staggeringOf(name))}: one step of ${dt} s would change it by more than ${bound} ${unit}`,
            'initial',
          );
        }
      }
    }
  }
}

function fillCentres(grid: Grid, a: FieldArray, fn: (lon: number, lat: number, y: number) => number): void {
  for (let j = 0; j < grid.ny; j++) {
    for (let i = 0; i < grid.nx; i++) {
      const k = grid.idx(i, j);
      a[k] = grid.ocean[k] ? fn(grid.lonCentre[i], grid.latCentre[j], grid.yCentre[j]) : 0;
    }
  }
}

function fillU(grid: Grid, a: FieldArray, fn: (lon: number, y: number) => number): void {
  for (let j = 0; j < grid.ny; j++) {
    for (let i = 0; i <= grid.nx; i++) {
      const k = grid.idx(i, j);
      a[k] = grid.maskU[k] * fn(grid.lonFace[i], grid.yCentre[j]);
    }
  }
}

function fillV(grid: Grid, a: FieldArray, fn: (lon: number, y: number) => number): void {
  for (let j = 0; j <= grid.ny; j++) {
    for (let i = 0; i < grid.nx; i++) {
      const k = grid.idx(i, j);
      a[k] = grid.maskV[k] * fn(grid.lonCentre[i], grid.yFace[j]);
    }
  }
}
