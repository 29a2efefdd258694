// The resolved model configuration, in SI units. The scenario layer (model/scenario/) turns a
// scenario file into one of these; the solver never reads scenario JSON itself.

import type { LandShape } from './land.ts';
import type { Precision } from './precision.ts';
import { earthBeta } from './theory.ts';

export interface BasinConfig {
  /** Western and eastern edges of the basin, degrees east. */
  lonWest: number;
  lonEast: number;
  /** Southern and northern edges, degrees north. */
  latSouth: number;
  latNorth: number;
  /** Cell size in degrees of longitude and latitude. */
  dLon: number;
  dLat: number;
  /** Land cells: a cell is land if its centre lies inside any shape. */
  land: LandShape[];
}

export interface SpongeConfig {
  /** Width of the band next to each of the south and north walls, degrees of latitude (0 = off). */
  widthDeg: number;
  /** Relaxation rate at the wall, s-1; it falls linearly to zero across the band. */
  rateAtWall: number;
  /**
   * false: h' relaxes to 0, and the bands change the layer volume. true: h' relaxes toward its
   * rate-weighted mean over each band, which keeps the volume (model/dynamics/sponge.ts).
   */
  conserveVolume: boolean;
}

export type CoriolisKind = 'beta-plane' | 'spherical';
export type SlipKind = 'free' | 'no';
export type DynamicsMode = 'linear' | 'nonlinear';

export interface PhysicsConfig {
  /** g' = g (rho2 - rho1) / rho2, m s-2. */
  reducedGravity: number;
  /** H, the resting upper-layer thickness, m. */
  layerThickness: number;
  /** rho0, reference density for the stress term, kg m-3. */
  density: number;
  /** 'beta-plane': f = beta y; 'spherical': f = 2 Omega sin(lat). */
  coriolis: CoriolisKind;
  /** beta, m-1 s-1 (used by the beta plane). */
  beta: number;
  /** Omega, s-1 (used by the spherical option). */
  earthRotation: number;
  /** Earth radius, m: maps degrees to metres. */
  earthRadius: number;
  mode: DynamicsMode;
  /** Rayleigh friction rate r, s-1. */
  friction: number;
  /** Laplacian viscosity A, m2 s-1. */
  viscosity: number;
  slip: SlipKind;
  /** Standard gravity, for sea level from the thermocline: ssh = (g'/g) h'. */
  gravity: number;
  /** Embedded surface layer of fixed depth H1 (m) with its own damping r_s (s-1). */
  surfaceLayer: { depth: number; damping: number };
  /** Nonlinear mode only: where h < minThickness, E = (minThickness - h) / time. */
  entrainment: { minThickness: number; time: number };
  sponge: SpongeConfig;
}

export interface TimeConfig {
  /** Requested time step, s; null = automatic from the stability limit. */
  dt: number | null;
  /** Safety factor applied to the stability limit when dt is automatic. */
  safety: number;
  /**
   * Automatic dt only: shorten it so that this interval (s; the output interval) is a whole
   * number of steps, so output times fall exactly on the days asked for.
   */
  alignTo?: number;
}

export interface ModelConfig {
  basin: BasinConfig;
  physics: PhysicsConfig;
  time: TimeConfig;
  /** Working precision of the state and the step (model/precision.ts); default 'float64'. */
  precision?: Precision;
}

/** Earth constants: GRS80 angular velocity (Moritz 2000), IUGG mean radius R1, standard gravity (CGPM 1901). */
export const EARTH = {
  omega: 7.292115e-5,
  radius: 6371008.7714,
  gravity: 9.80665,
} as const;

export const DAY = 86400;

/** Defaults for a typical first-baroclinic-mode experiment; scenarios override them. */
export function defaultPhysics(): PhysicsConfig {
  return {
    reducedGravity: 0.03,
    layerThickness: 150,
    density: 1025,
    coriolis: 'beta-plane',
    beta: earthBeta(EARTH.omega, EARTH.radius),
    earthRotation: EARTH.omega,
    earthRadius: EARTH.radius,
    mode: 'linear',
    friction: 0,
    viscosity: 0,
    slip: 'free',
    gravity: EARTH.gravity,
    surfaceLayer: { depth: 50, damping: 1 / (2 * DAY) },
    entrainment: { minThickness: 40, time: 1 * DAY },
    sponge: { widthDeg: 0, rateAtWall: 1 / (2 * DAY), conserveVolume: false },
  };
}
