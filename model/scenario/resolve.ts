// From a validated scenario (file units: degrees, days) to what the model runs with (SI units).

import { earthBeta } from '../theory.ts';
import { secondsOfDays } from '../clock.ts';
import { DAY, EARTH, type ModelConfig } from '../config.ts';
import type { WindSpec } from '../forcing/spec.ts';
import type { InitialSpec, OutputField, Probe, Scenario } from './types.ts';

export interface ResolvedScenario {
  name: string;
  description: string;
  /** Basin, physics and time step for the solver, SI units. */
  model: ModelConfig;
  wind: WindSpec;
  /** Initial state; restart and spin-up paths are as written (relative to the scenario file). */
  initial: InitialSpec;
  probes: Probe[];
  /** Latitudes of the Hovmoller sections, degrees north. */
  hovmollerLats: number[];
  seed: string | number;
  /** Run length and output interval in days and in seconds (whole seconds where they are within a microsecond: model/clock.ts). */
  days: number;
  runSeconds: number;
  outputEveryDays: number;
  outputEverySeconds: number;
  outputFields: OutputField[];
  /** The scenario this came from (with defaults), for the output file's metadata. */
  scenario: Scenario;
}

/** beta = 2 Omega / R at the equator, m-1 s-1. */
export const EQUATORIAL_BETA = earthBeta(EARTH.omega, EARTH.radius);

export function cellSize(resolution: Scenario['basin']['resolution']): { dLon: number; dLat: number } {
  return typeof resolution === 'number'
    ? { dLon: resolution, dLat: resolution }
    : { dLon: resolution.lon, dLat: resolution.lat };
}

/** A time in days as a rate in s-1 (1 / time). */
function rate(days: number): number {
  return 1 / (days * DAY);
}

export function resolveScenario(scenario: Scenario): ResolvedScenario {
  const { basin, physics, time } = scenario;
  const { dLon, dLat } = cellSize(basin.resolution);
  const model: ModelConfig = {
    basin: {
      lonWest: basin.lonWest,
      lonEast: basin.lonEast,
      latSouth: basin.latSouth,
      latNorth: basin.latNorth,
      dLon,
      dLat,
      land: structuredClone(basin.land),
    },
    physics: {
      reducedGravity: physics.reducedGravity,
      layerThickness: physics.layerThickness,
      density: physics.density,
      coriolis: physics.coriolis.kind,
      beta:
        physics.coriolis.kind === 'beta-plane' && physics.coriolis.beta !== undefined
          ? physics.coriolis.beta
          : EQUATORIAL_BETA,
      earthRotation: EARTH.omega,
      earthRadius: EARTH.radius,
      mode: physics.dynamics,
      friction: physics.frictionDays === null ? 0 : rate(physics.frictionDays),
      viscosity: physics.viscosity,
      slip: physics.slip,
      gravity: EARTH.gravity,
      surfaceLayer: { depth: physics.surfaceLayer.depth, damping: rate(physics.surfaceLayer.dampingDays) },
      entrainment: { minThickness: physics.entrainment.minThickness, time: physics.entrainment.timeDays * DAY },
      sponge: {
        widthDeg: basin.sponge.widthDeg,
        rateAtWall: rate(basin.sponge.dampingDays),
        conserveVolume: basin.sponge.conserveVolume,
      },
    },
    time: {
      dt: time.dtSeconds === 'auto' ? null : time.dtSeconds,
      safety: time.safety,
      alignTo: secondsOfDays(time.outputEveryDays),
    },
    precision: scenario.numerics.precision,
  };
  return {
    name: scenario.name,
    description: scenario.description,
    model,
    wind: structuredClone(scenario.wind),
    initial: structuredClone(scenario.initial),
    probes: structuredClone(scenario.probes),
    hovmollerLats: [...scenario.hovmoller.lat],
    seed: scenario.seed,
    days: time.days,
    runSeconds: secondsOfDays(time.days),
    outputEveryDays: time.outputEveryDays,
    outputEverySeconds: secondsOfDays(time.outputEveryDays),
    outputFields: [...scenario.output.fields],
    scenario,
  };
}
