// The run-physics record in a run file: one set of global attributes, pycno_physics_<name>, numbers
// as numbers and the two choices as text (CF tools read them without a word: ncdump, CDO, which
// keeps global attributes through its operators, xarray, netCDF4). The file stores each value once:
// here, and in the scenario it carries. Files written before the record keep some of these numbers
// in older attributes; they are read through legacyRunPhysics, which takes the rest from the
// scenario they carry (with its defaults filled in, as every run file holds it).

import { defaultPhysics, EARTH, type CoriolisKind, type DynamicsMode } from '../config.ts';
import { completeRunPhysics, type RunPhysics } from '../run-physics.ts';
import { earthBeta } from '../theory.ts';
import type { NcReadAttribute } from './netcdf-read.ts';

const PREFIX = 'pycno_physics_';

/** The record's attributes in file order: name in the file, key in the record, units. */
export const RUN_PHYSICS_ATTRIBUTES = [
  { name: `${PREFIX}reduced_gravity`, key: 'reducedGravity', units: 'm s-2' },
  { name: `${PREFIX}layer_thickness`, key: 'layerThickness', units: 'm' },
  { name: `${PREFIX}density`, key: 'density', units: 'kg m-3' },
  { name: `${PREFIX}coriolis`, key: 'coriolis', units: 'text' },
  { name: `${PREFIX}beta`, key: 'beta', units: 'm-1 s-1' },
  { name: `${PREFIX}earth_radius`, key: 'earthRadius', units: 'm' },
  { name: `${PREFIX}dynamics`, key: 'dynamics', units: 'text' },
  // Absent when the run has no Rayleigh friction.
  { name: `${PREFIX}friction_days`, key: 'frictionDays', units: 'days' },
  { name: `${PREFIX}viscosity`, key: 'viscosity', units: 'm2 s-1' },
  { name: `${PREFIX}wave_speed`, key: 'waveSpeed', units: 'm s-1' },
  { name: `${PREFIX}equatorial_radius`, key: 'equatorialRadius', units: 'm' },
] as const satisfies ReadonlyArray<{ name: string; key: keyof RunPhysics; units: string }>;

const CORIOLIS: readonly CoriolisKind[] = ['beta-plane', 'spherical'];
const DYNAMICS: readonly DynamicsMode[] = ['linear', 'nonlinear'];

/** The record as global attributes of a run file. */
export function runPhysicsAttributes(p: RunPhysics): Record<string, number | string> {
  const out: Record<string, number | string> = {};
  for (const a of RUN_PHYSICS_ATTRIBUTES) {
    const v = p[a.key];
    if (v !== null) out[a.name] = v;
  }
  return out;
}

/** Thrown for a record that is there but broken; the reader adds where. */
export class RunPhysicsError extends Error {
  override name = 'RunPhysicsError';
}

/** True when the file has the record (files before it have pycno_reduced_gravity instead). */
export function hasRunPhysics(attributes: Record<string, NcReadAttribute>): boolean {
  return RUN_PHYSICS_ATTRIBUTES.some((a) => attributes[a.name] !== undefined);
}

/**
 * The record from a file's global attributes. Every value must be there with its type and a
 * sensible sign, and c and L must be what g', H and beta give (they were worked out from them).
 */
export function readRunPhysics(attributes: Record<string, NcReadAttribute>): RunPhysics {
  const num = (name: string, positive: boolean): number => {
    const a = attributes[name];
    if (!a || typeof a.value === 'string' || a.value.length !== 1)
      throw new RunPhysicsError(`the global attribute ${name} is missing or not one number`);
    const v = a.value[0];
    if (!Number.isFinite(v) || (positive ? !(v > 0) : v < 0))
      throw new RunPhysicsError(
        `the global attribute ${name} is ${v}; it must be a ${positive ? 'positive' : 'non-negative'} number`,
      );
    return v;
  };
  const text = <T extends string>(name: string, allowed: readonly T[]): T => {
    const a = attributes[name];
    const v = a && typeof a.value === 'string' ? a.value : undefined;
    if (v === undefined || !(allowed as readonly string[]).includes(v))
      throw new RunPhysicsError(
        `the global attribute ${name} is ${v === undefined ? 'missing or not text' : `'${v}'`}; it must be one of ${allowed.join(', ')}`,
      );
    return v as T;
  };
  const friction = `${PREFIX}friction_days`;
  const p = completeRunPhysics({
    reducedGravity: num(`${PREFIX}reduced_gravity`, true),
    layerThickness: num(`${PREFIX}layer_thickness`, true),
    density: num(`${PREFIX}density`, true),
    coriolis: text(`${PREFIX}coriolis`, CORIOLIS),
    beta: num(`${PREFIX}beta`, false),
    earthRadius: num(`${PREFIX}earth_radius`, true),
    dynamics: text(`${PREFIX}dynamics`, DYNAMICS),
    frictionDays: attributes[friction] === undefined ? null : num(friction, true),
    viscosity: num(`${PREFIX}viscosity`, false),
  });
  for (const [name, key] of [
    [`${PREFIX}wave_speed`, 'waveSpeed'],
    [`${PREFIX}equatorial_radius`, 'equatorialRadius'],
  ] as const) {
    const stored = num(name, true);
    if (!Object.is(stored, p[key]))
      throw new RunPhysicsError(
        `the global attribute ${name} is ${stored}, but the record's g', H and beta give ${p[key]}`,
      );
  }
  return p;
}

/** What a run made before the record kept of its physics beside its scenario. */
export interface KeptPhysics {
  reducedGravity: number;
  layerThickness: number;
  beta?: number;
  dynamics?: string;
  earthRadius?: number;
}

/**
 * The record of a run made before it existed (an older run file, or a run saved in the library in
 * format 1): the numbers it kept, the rest from the scenario it carries. Throws RunPhysicsError
 * when the scenario does not parse.
 */
export function legacyRunPhysics(kept: KeptPhysics, scenarioJson: string): RunPhysics {
  let s: {
    physics?: {
      density?: unknown;
      dynamics?: unknown;
      frictionDays?: unknown;
      viscosity?: unknown;
      coriolis?: { kind?: unknown; beta?: unknown };
    };
  };
  try {
    s = JSON.parse(scenarioJson);
  } catch (e) {
    throw new RunPhysicsError(`the scenario JSON does not parse: ${(e as Error).message}`);
  }
  const p = s?.physics ?? {};
  const coriolis: CoriolisKind = p.coriolis?.kind === 'spherical' ? 'spherical' : 'beta-plane';
  const dynamics = kept.dynamics ?? p.dynamics;
  const earthRadius = kept.earthRadius ?? EARTH.radius;
  return completeRunPhysics({
    reducedGravity: kept.reducedGravity,
    layerThickness: kept.layerThickness,
    density: typeof p.density === 'number' ? p.density : defaultPhysics().density,
    coriolis,
    // As the scenario resolver sets it: the beta plane's own beta, else 2 Omega / R.
    beta:
      kept.beta ??
      (coriolis === 'beta-plane' && typeof p.coriolis?.beta === 'number'
        ? p.coriolis.beta
        : earthBeta(EARTH.omega, EARTH.radius)),
    earthRadius,
    dynamics: dynamics === 'nonlinear' ? 'nonlinear' : 'linear',
    frictionDays: typeof p.frictionDays === 'number' && p.frictionDays > 0 ? p.frictionDays : null,
    viscosity: typeof p.viscosity === 'number' ? p.viscosity : 0,
  });
}
