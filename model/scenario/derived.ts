// Numbers that follow from a scenario: wave speeds and scales, crossing times, grid size, the
// time-step limit and the size of the output. Shown by `pycno check` and the page before a run.

import { DAY, type DynamicsMode } from '../config.ts';
import { bytesOf, type Precision } from '../precision.ts';
import type { Grid } from '../grid.ts';
import { Clock } from '../clock.ts';
import { chooseTimeStep, stabilityLimit, stepsInInterval, type StabilityLimit } from '../dynamics/stability.ts';
import { coriolisParameter, equatorialBeta, equatorialRadius, longRossbySpeed, waveSpeed } from '../theory.ts';
import type { ResolvedScenario } from './resolve.ts';
import { westernBoundaryLayer, type BoundaryLayer } from './boundary-layer.ts';
import { answeringNumbers, answeringPartOf, type AnsweringNumbers } from '../coupling/derived.ts';

export { stabilityLimit, type LimitingTerm, type StabilityInput, type StabilityLimit } from '../dynamics/stability.ts';

/** Largest |f| over the basin, s-1: beta |y| at the farthest wall, or 2 Omega sin|lat|. */
export function maxCoriolis(r: ResolvedScenario): number {
  const { basin, physics } = r.model;
  const maxLat = Math.max(Math.abs(basin.latSouth), Math.abs(basin.latNorth));
  return Math.abs(coriolisParameter(physics, maxLat, ((maxLat * Math.PI) / 180) * physics.earthRadius));
}

/** The stability limit of a resolved scenario (grid spacing from its basin). */
export function scenarioStability(r: ResolvedScenario): StabilityLimit {
  const { basin, physics } = r.model;
  const mPerDeg = (physics.earthRadius * Math.PI) / 180;
  return stabilityLimit({
    c: waveSpeed(physics.reducedGravity, physics.layerThickness),
    dx: basin.dLon * mPerDeg,
    dy: basin.dLat * mPerDeg,
    fMax: maxCoriolis(r),
    viscosity: physics.viscosity,
    friction: physics.friction,
    spongeRate: physics.sponge.widthDeg > 0 ? physics.sponge.rateAtWall : 0,
    mode: physics.mode,
  });
}

/** Solver arrays of the padded grid size, 8 bytes each (a rough count of state, forcing, masks and work). */
const SOLVER_ARRAYS: Record<DynamicsMode, number> = { linear: 12, nonlinear: 25 };
/** Of those, the step's own fields, which a float32 run holds in 4 bytes (model/precision.ts). */
const STEP_ARRAYS: Record<DynamicsMode, number> = { linear: 7, nonlinear: 14 };

/** Bytes a run of nx x ny cells holds while it runs: the solver's arrays and one output frame. */
export function memoryEstimate(
  nx: number,
  ny: number,
  mode: DynamicsMode,
  fields: number,
  precision: Precision = 'float64',
): number {
  const padded = (nx + 3) * (ny + 3);
  const stepBytes = bytesOf(precision) * STEP_ARRAYS[mode] + 8 * (SOLVER_ARRAYS[mode] - STEP_ARRAYS[mode]);
  return padded * stepBytes + padded + nx * ny * 4 * fields;
}

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
  /** Saved frames: the initial one, one per whole output interval, and the end when it falls between. */
  outputs: number;
  /** Size of the NetCDF output: nx ny 4 bytes x fields x frames, plus coordinates. */
  outputBytes: number;
  /** Memory of the solver arrays plus one output frame. */
  memoryBytes: number;
  /** The working precision of the state and the step. */
  precision: Precision;
  /** The western boundary layer's width against the zonal grid interval, with advice when unresolved. */
  boundaryLayer: BoundaryLayer;
  /** The answering wind's scales and coupling interval (model/coupling/derived.ts); null without one. */
  answering: AnsweringNumbers | null;
}

export function derivedNumbers(r: ResolvedScenario, grid?: Grid): DerivedNumbers {
  const { basin, physics, time } = r.model;
  const c = waveSpeed(physics.reducedGravity, physics.layerThickness);
  // The spherical option still has beta = 2 Omega / R at the equator, which sets the scale L.
  const beta = equatorialBeta(physics);
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
  const dt = time.dt ?? chooseTimeStep(stability, null, time.safety, time.alignTo);
  const interval = r.outputEverySeconds;
  const perInterval = stepsInInterval(dt, interval);
  const clock = new Clock({
    dt,
    intervalSeconds: perInterval > 0 ? interval : 0,
    stepsPerInterval: perInterval,
    originSteps: 0,
    originTime: 0,
  });
  const steps = clock.stepsFor(r.runSeconds);
  // One record at the start, one per whole interval, and one at the end when the run is not a
  // whole number of intervals (the last interval is then shorter).
  const wholeIntervals = perInterval > 0 ? Math.floor(steps / perInterval) : Math.floor(r.runSeconds / interval + 1e-9);
  const outputs = 1 + wholeIntervals + (perInterval > 0 && steps % perInterval !== 0 ? 1 : 0);
  const fields = r.outputFields.length;
  const outputBytes = nx * ny * 4 * fields * outputs + (nx + ny) * 8 + outputs * 8;
  const memoryBytes = memoryEstimate(nx, ny, physics.mode, fields, r.model.precision);
  return {
    c,
    beta,
    equatorialRadiusKm: equatorialRadius(c, beta) / 1000,
    crossingWidthKm: crossing / 1000,
    kelvinCrossingDays: crossing / c / DAY,
    rossbySpeed: longRossbySpeed(c),
    rossbyCrossingDays: crossing / longRossbySpeed(c) / DAY,
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
    steps,
    outputs,
    outputBytes,
    memoryBytes,
    precision: r.model.precision ?? 'float64',
    boundaryLayer: westernBoundaryLayer(beta, physics.viscosity, physics.friction, dx),
    answering: answeringFor(r, dt, beta),
  };
}

function answeringFor(r: ResolvedScenario, dt: number, beta: number): AnsweringNumbers | null {
  const found = answeringPartOf(r.wind.parts);
  return found ? answeringNumbers(found.part, found.index, dt, beta, r.wind.bulk) : null;
}
