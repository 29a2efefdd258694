// Initial states: rest, a Gaussian thickness bump, and the analytical shapes of a free equatorial
// Kelvin wave and a long first-meridional-mode Rossby wave (Matsuno 1966; Gill 1982, ch. 11).

import type { PhysicsConfig } from './config.ts';
import { InputError } from './errors.ts';
import type { Grid } from './grid.ts';
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
      if (!(spec.radiusDeg > 0)) throw new InputError(`bump radius must be > 0 degrees (got ${spec.radiusDeg})`, 'initial.radiusDeg');
      fillCentres(grid, s.h, (lon, lat) => {
        const dLon = lon - spec.lon;
        const dLat = lat - spec.lat;
        return spec.amplitude * pm.exp(-(dLon * dLon + dLat * dLat) / (spec.radiusDeg * spec.radiusDeg));
      });
      break;
    }
    case 'kelvin': {
      if (!(spec.zonalWidthDeg > 0)) throw new InputError(`zonal width must be > 0 degrees (got ${spec.zonalWidthDeg})`, 'initial.zonalWidthDeg');
      const shape = (lon: number, y: number) =>
        spec.amplitude * pm.exp(-(y * y) / (2 * L * L)) * pm.exp(-square((lon - spec.lon) / spec.zonalWidthDeg));
      fillCentres(grid, s.h, (lon, _lat, y) => shape(lon, y));
      // Kelvin wave: u = (g'/c) h' = (c/H) h', in geostrophic balance with dh'/dy.
      fillU(grid, s.u, (lon, y) => (c / H) * shape(lon, y));
      break;
    }
    case 'rossby': {
      if (!(spec.zonalWidthDeg > 0)) throw new InputError(`zonal width must be > 0 degrees (got ${spec.zonalWidthDeg})`, 'initial.zonalWidthDeg');
      // Long-wave limit (v_t neglected) of the n = 1 mode, in units of L and c:
      //   h'/H = F (2 y^2 + 1) e^{-y^2/2},  u/c = F (2 y^2 - 3) e^{-y^2/2},
      //   v/c = (4/3) dF/dx 2 y e^{-y^2/2};  F moves west at c/3.
      // (Derived from the equations in Gill 1982, §11.6, with Hermite functions.)
      const a = spec.amplitude;
      const w = spec.zonalWidthDeg * mPerDeg;
      const x0 = spec.lon * mPerDeg;
      const F = (lon: number) => pm.exp(-square((lon * mPerDeg - x0) / w));
      const dFdx = (lon: number) => (-2 * (lon * mPerDeg - x0)) / (w * w) * F(lon);
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

/** A state with a NaN or infinity in it, or with no layer left somewhere, is refused before the first step. */
export function checkInitial(grid: Grid, physics: PhysicsConfig, s: State): void {
  const at = (k: number) => {
    const j = Math.floor(k / grid.W) - 1;
    const i = (k % grid.W) - 1;
    return `grid point i=${i}, j=${j}`;
  };
  for (const [name, a] of [['h', s.h], ['u', s.u], ['v', s.v]] as const) {
    for (let k = 0; k < a.length; k++) {
      if (!Number.isFinite(a[k])) throw new InputError(`the initial state has a non-finite ${name} (${a[k]}) at ${at(k)}`, 'initial');
    }
  }
  for (let k = 0; k < s.h.length; k++) {
    const thick = physics.layerThickness + s.h[k];
    if (grid.ocean[k] && thick <= 0) {
      const j = Math.floor(k / grid.W) - 1;
      const i = (k % grid.W) - 1;
      throw new InputError(
        `the initial state leaves no upper layer (thickness ${thick.toFixed(1)} m) at ${grid.lonCentre[i]}°E, ${grid.latCentre[j]}°N; h' must stay above -H = -${physics.layerThickness} m`,
        'initial',
      );
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
