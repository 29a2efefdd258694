// The formulas of equatorial ocean theory that the model, its diagnostics, the command line and
// the page all use: one home for each, so that a number shown in one place is the number computed
// in another. Pure functions of SI numbers; every caller goes through these.

import * as pm from './portable-math.ts';

/** The gravity (first-baroclinic Kelvin) wave speed of the layer, c = sqrt(g' H), m s-1 (Matsuno 1966; Gill 1982 ch. 11). */
export function waveSpeed(reducedGravity: number, layerThickness: number): number {
  return Math.sqrt(reducedGravity * layerThickness);
}

/** beta of the Earth, 2 Omega / R, m-1 s-1. */
export function earthBeta(omega: number, radius: number): number {
  return (2 * omega) / radius;
}

/** The physics fields the Coriolis formulas read (as PhysicsConfig has them). */
export interface CoriolisPhysics {
  coriolis: 'beta-plane' | 'spherical';
  beta: number;
  earthRotation: number;
  earthRadius: number;
}

/** f at a latitude (deg) and beta-plane distance y (m) from the equator: beta y, or 2 Omega sin(lat). */
export function coriolisParameter(physics: CoriolisPhysics, latDeg: number, yMetres: number): number {
  return physics.coriolis === 'spherical'
    ? 2 * physics.earthRotation * pm.sin((latDeg * Math.PI) / 180)
    : physics.beta * yMetres;
}

/** df/dy at a latitude: beta on the beta plane, 2 Omega cos(lat) / R on the sphere, m-1 s-1. */
export function betaAt(physics: CoriolisPhysics, latDeg: number): number {
  return physics.coriolis === 'spherical'
    ? (2 * physics.earthRotation * pm.cos((latDeg * Math.PI) / 180)) / physics.earthRadius
    : physics.beta;
}

/** beta at the equator, which sets the equatorial scales (for the spherical option 2 Omega / R). */
export function equatorialBeta(physics: CoriolisPhysics): number {
  return betaAt(physics, 0);
}

/** The equatorial radius of deformation L = sqrt(c / beta), m (Matsuno 1966; AMS Glossary); Infinity without beta. */
export function equatorialRadius(c: number, beta: number): number {
  return beta > 0 ? Math.sqrt(c / beta) : Infinity;
}

/** Westward speed of the long equatorial Rossby wave of meridional mode n, c / (2n + 1), m s-1 (Matsuno 1966; Gill 1982). */
export function longRossbySpeed(c: number, n = 1): number {
  return c / (2 * n + 1);
}

/** Sverdrup's interior balance beta V = curl(tau) / rho0: V, the meridional transport per unit width, m2 s-1 (Sverdrup 1947). */
export function sverdrupTransport(curl: number, density: number, beta: number): number {
  return curl / (density * beta);
}

/** Width of a western boundary layer held by lateral viscosity A, (A / beta)^(1/3), m (Munk 1950); 0 without. */
export function munkWidth(viscosity: number, beta: number): number {
  return beta > 0 && viscosity > 0 ? pm.pow(viscosity / beta, 1 / 3) : 0;
}

/** Width of a western boundary layer held by Rayleigh friction r, r / beta, m (Stommel 1948); 0 without beta. */
export function stommelWidth(friction: number, beta: number): number {
  return beta > 0 ? friction / beta : 0;
}
