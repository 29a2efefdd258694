// The physics of a run as one typed record: the numbers that set its scales and that every reader
// of the run needs (the page's displays, the run library, wave measurement, the report, the run
// file). Built once from the resolved scenario; the loaded scenario, the run description, the run
// file (model/io/run-physics-file.ts) and saved runs carry it, so no one reads a number of it back
// out of the scenario text.

import type { CoriolisKind, DynamicsMode } from './config.ts';
import type { ResolvedScenario } from './scenario/resolve.ts';
import { equatorialBeta, equatorialRadius, waveSpeed } from './theory.ts';

export interface RunPhysics {
  /** g' = g (rho2 - rho1) / rho2, m s-2. */
  reducedGravity: number;
  /** H, the resting upper-layer thickness, m. */
  layerThickness: number;
  /** rho0, reference density, kg m-3. */
  density: number;
  /** 'beta-plane': f = beta y; 'spherical': f = 2 Omega sin(lat). */
  coriolis: CoriolisKind;
  /** beta at the equator, m-1 s-1 (for the spherical option 2 Omega / R): it sets L and the Rossby windows. */
  beta: number;
  /** Earth radius R, m: maps degrees to metres. */
  earthRadius: number;
  dynamics: DynamicsMode;
  /** Rayleigh friction time 1/r as the scenario gives it, days; null for none. */
  frictionDays: number | null;
  /** Laplacian viscosity A, m2 s-1. */
  viscosity: number;
  /** c = sqrt(g' H), m s-1. */
  waveSpeed: number;
  /** L = sqrt(c / beta), m. */
  equatorialRadius: number;
}

/** What the record is made of; its wave speed and equatorial radius follow from these. */
export type RunPhysicsBase = Omit<RunPhysics, 'waveSpeed' | 'equatorialRadius'>;

/** The record with c and L worked out by the theory module. */
export function completeRunPhysics(b: RunPhysicsBase): RunPhysics {
  const c = waveSpeed(b.reducedGravity, b.layerThickness);
  return { ...b, waveSpeed: c, equatorialRadius: equatorialRadius(c, b.beta) };
}

/** The run physics of a resolved scenario: the one place it is made. */
export function runPhysics(r: ResolvedScenario): RunPhysics {
  const p = r.model.physics;
  return completeRunPhysics({
    reducedGravity: p.reducedGravity,
    layerThickness: p.layerThickness,
    density: p.density,
    coriolis: p.coriolis,
    beta: equatorialBeta(p),
    earthRadius: p.earthRadius,
    dynamics: p.mode,
    frictionDays: r.scenario.physics.frictionDays,
    viscosity: p.viscosity,
  });
}
