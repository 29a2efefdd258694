// Numbers that follow from a scenario: wave speeds and scales, crossing times, grid size, the
// time-step limit and the size of the output. Shown by `pycno check` and the page before a run.

import { DAY, type DynamicsMode } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { ResolvedScenario } from './resolve.ts';

export type LimitingTerm = 'gravity-wave' | 'coriolis' | 'viscosity';

export interface StabilityInput {
  /** Linear gravity-wave speed sqrt(g' H), m s-1. */
  c: number;
  /** Cell sizes, m. */
  dx: number;
  dy: number;
  /** Largest |f| in the basin, s-1. */
  fMax: number;
  /** Laplacian viscosity A, m2 s-1. */
  viscosity: number;
  mode: DynamicsMode;
  /** Nonlinear mode: allowance for advection added to the wave speed, m s-1 (default 2). */
  advection?: number;
  /** Nonlinear mode: the layer may thicken to this multiple of H (default 1.5). */
  thicknessFactor?: number;
}

export interface StabilityLimit {
  /** Largest stable time step, s. */
  dtMax: number;
  limitingTerm: LimitingTerm;
  /** One line: which term limits dt, by which criterion, with the numbers. */
  explanation: string;
  /** The limit of each term alone, s (Infinity when the term is absent). */
  terms: Record<LimitingTerm, number>;
}

/** Third-order Adams-Bashforth: stability interval on the imaginary axis, |omega dt| <= 0.72 (Durran 2010, from memory: 0.724). */
export const AB3_IMAGINARY_LIMIT = 0.72;
/** Third-order Adams-Bashforth on the negative real axis: |lambda dt| <= 6/11 (Durran 2010, from memory). */
export const AB3_REAL_LIMIT = 6 / 11;

/**
 * Time-step limit of the solver's schemes, as a pure function of the numbers.
 *
 * Linear (forward-backward on the C grid):
 *   gravity waves  c dt sqrt(1/dx^2 + 1/dy^2) <= 1   (Mesinger & Arakawa 1976)
 *   Coriolis       f_max dt <= 1                      (conservative; the neutral ordering allows more)
 *   viscosity      A dt (4/dx^2 + 4/dy^2) <= 1        (forward Euler allows 2: a factor 2 of margin)
 * Nonlinear (third-order Adams-Bashforth):
 *   gravity waves and advection  omega_max dt <= 0.72, omega_max = 2 c' sqrt(1/dx^2 + 1/dy^2),
 *                                c' = sqrt(g' 1.5 H) + 2 m/s = c sqrt(1.5) + 2 m/s
 *   Coriolis       f_max dt <= 0.72                   (same imaginary-axis interval)
 *   viscosity      A dt (4/dx^2 + 4/dy^2) <= 6/11     (real-axis interval)
 */
export function stabilityLimit(p: StabilityInput): StabilityLimit {
  const k = Math.sqrt(1 / (p.dx * p.dx) + 1 / (p.dy * p.dy));
  const lap = 4 / (p.dx * p.dx) + 4 / (p.dy * p.dy);
  const km = (m: number) => `${(m / 1000).toPrecision(3)} km`;
  const grid = `dx = ${km(p.dx)}, dy = ${km(p.dy)}`;
  let terms: Record<LimitingTerm, number>;
  let why: Record<LimitingTerm, string>;
  if (p.mode === 'linear') {
    terms = {
      'gravity-wave': p.c > 0 ? 1 / (p.c * k) : Infinity,
      coriolis: p.fMax > 0 ? 1 / p.fMax : Infinity,
      viscosity: p.viscosity > 0 ? 1 / (p.viscosity * lap) : Infinity,
    };
    why = {
      'gravity-wave': `gravity waves: c dt sqrt(1/dx^2 + 1/dy^2) <= 1 (forward-backward, C grid) with c = ${p.c.toPrecision(3)} m/s, ${grid}`,
      coriolis: `Coriolis: f_max dt <= 1 with f_max = ${p.fMax.toPrecision(3)} s-1`,
      viscosity: `viscosity: A dt (4/dx^2 + 4/dy^2) <= 1 with A = ${p.viscosity} m2/s, ${grid}`,
    };
  } else {
    const advection = p.advection ?? 2;
    const factor = p.thicknessFactor ?? 1.5;
    const cEff = p.c * Math.sqrt(factor) + advection;
    terms = {
      'gravity-wave': cEff > 0 ? AB3_IMAGINARY_LIMIT / (2 * cEff * k) : Infinity,
      coriolis: p.fMax > 0 ? AB3_IMAGINARY_LIMIT / p.fMax : Infinity,
      viscosity: p.viscosity > 0 ? AB3_REAL_LIMIT / (p.viscosity * lap) : Infinity,
    };
    why = {
      'gravity-wave': `gravity waves and advection: 2 c' sqrt(1/dx^2 + 1/dy^2) dt <= 0.72 (Adams-Bashforth 3) with c' = c sqrt(${factor}) + ${advection} m/s = ${cEff.toPrecision(3)} m/s, ${grid}`,
      coriolis: `Coriolis: f_max dt <= 0.72 (Adams-Bashforth 3) with f_max = ${p.fMax.toPrecision(3)} s-1`,
      viscosity: `viscosity: A dt (4/dx^2 + 4/dy^2) <= 6/11 (Adams-Bashforth 3) with A = ${p.viscosity} m2/s, ${grid}`,
    };
  }
  let limitingTerm: LimitingTerm = 'gravity-wave';
  for (const t of ['coriolis', 'viscosity'] as const) if (terms[t] < terms[limitingTerm]) limitingTerm = t;
  const dtMax = terms[limitingTerm];
  return { dtMax, limitingTerm, explanation: `dt <= ${dtMax.toFixed(0)} s, set by ${why[limitingTerm]}`, terms };
}

/** Largest |f| over the basin, s-1: beta |y| at the farthest wall, or 2 Omega sin|lat|. */
export function maxCoriolis(r: ResolvedScenario): number {
  const { basin, physics } = r.model;
  const maxLat = Math.max(Math.abs(basin.latSouth), Math.abs(basin.latNorth));
  if (physics.coriolis === 'spherical') return 2 * physics.earthRotation * Math.sin((maxLat * Math.PI) / 180);
  return physics.beta * ((maxLat * Math.PI) / 180) * physics.earthRadius;
}

/** The stability limit of a resolved scenario (grid spacing from its basin). */
export function scenarioStability(r: ResolvedScenario): StabilityLimit {
  const { basin, physics } = r.model;
  const mPerDeg = (physics.earthRadius * Math.PI) / 180;
  return stabilityLimit({
    c: Math.sqrt(physics.reducedGravity * physics.layerThickness),
    dx: basin.dLon * mPerDeg,
    dy: basin.dLat * mPerDeg,
    fMax: maxCoriolis(r),
    viscosity: physics.viscosity,
    mode: physics.mode,
  });
}

/** Solver arrays of the padded grid size, 8 bytes each (a rough count of state, forcing, masks and work). */
const SOLVER_ARRAYS: Record<DynamicsMode, number> = { linear: 12, nonlinear: 25 };

export interface DerivedNumbers {
  /** Kelvin (gravity-wave) speed c = sqrt(g' H), m s-1. */
  c: number;
  /** beta used for the equatorial scale, m-1 s-1. */
  beta: number;
  /** Equatorial radius of deformation L = sqrt(c / beta), km. */
  equatorialRadiusKm: number;
  /** Width crossed by the waves along the equator, km (ocean cells of the equatorial row when a grid is given). */
  crossingWidthKm: number;
  kelvinCrossingDays: number;
  /** Long first-meridional-mode Rossby speed c/3, m s-1 (westward), and its crossing time. */
  rossbySpeed: number;
  rossbyCrossingDays: number;
  nx: number;
  ny: number;
  dxKm: number;
  dyKm: number;
  cells: number;
  /** Ocean cells, when a grid is given. */
  oceanCells: number | null;
  fMax: number;
  stability: StabilityLimit;
  /** The time step the run will use, s ("auto": safety x limit). */
  dt: number;
  dtIsAuto: boolean;
  steps: number;
  /** Saved frames, the initial one included. */
  outputs: number;
  /** Size of the NetCDF output: nx ny 4 bytes x fields x frames, plus coordinates. */
  outputBytes: number;
  /** Memory of the solver arrays plus one output frame. */
  memoryBytes: number;
}

export function derivedNumbers(r: ResolvedScenario, grid?: Grid): DerivedNumbers {
  const { basin, physics, time } = r.model;
  const c = Math.sqrt(physics.reducedGravity * physics.layerThickness);
  // The spherical option still has beta = 2 Omega / R at the equator, which sets the scale L.
  const beta = physics.coriolis === 'spherical' ? (2 * physics.earthRotation) / physics.earthRadius : physics.beta;
  const mPerDeg = (physics.earthRadius * Math.PI) / 180;
  const nx = grid ? grid.nx : Math.round((basin.lonEast - basin.lonWest) / basin.dLon);
  const ny = grid ? grid.ny : Math.round((basin.latNorth - basin.latSouth) / basin.dLat);
  const dx = basin.dLon * mPerDeg;
  const dy = basin.dLat * mPerDeg;
  let crossing = (basin.lonEast - basin.lonWest) * mPerDeg;
  if (grid && basin.latSouth <= 0 && basin.latNorth >= 0) {
    const j = grid.nearestRow(0);
    let wet = 0;
    for (let i = 0; i < grid.nx; i++) wet += grid.ocean[grid.idx(i, j)];
    crossing = wet * dx;
  }
  const stability = scenarioStability(r);
  const dtIsAuto = time.dt === null;
  const dt = time.dt ?? time.safety * stability.dtMax;
  const outputs = Math.floor(r.days / r.outputEveryDays + 1e-9) + 1;
  const fields = r.outputFields.length;
  const outputBytes = nx * ny * 4 * fields * outputs + (nx + ny) * 8 + outputs * 8;
  const padded = (nx + 3) * (ny + 3);
  const memoryBytes = padded * 8 * SOLVER_ARRAYS[physics.mode] + padded + nx * ny * 4 * fields;
  return {
    c,
    beta,
    equatorialRadiusKm: beta > 0 ? Math.sqrt(c / beta) / 1000 : Infinity,
    crossingWidthKm: crossing / 1000,
    kelvinCrossingDays: crossing / c / DAY,
    rossbySpeed: c / 3,
    rossbyCrossingDays: (3 * crossing) / c / DAY,
    nx,
    ny,
    dxKm: dx / 1000,
    dyKm: dy / 1000,
    cells: nx * ny,
    oceanCells: grid ? grid.oceanCells : null,
    fMax: maxCoriolis(r),
    stability,
    dt,
    dtIsAuto,
    steps: Math.ceil(r.runSeconds / dt - 1e-9),
    outputs,
    outputBytes,
    memoryBytes,
  };
}
