// The shapes of a scenario file (format pycno-scenario/1), before and after defaults are filled.
// configs/scenario.schema.json describes ScenarioFile; Scenario is the same with every default in.
// Units are those a user writes: degrees, days, metres, m s-2, N m-2 or m s-1.

import { FIELD_NAMES } from '../diagnostics/fields.ts';
import type { Precision } from '../precision.ts';
import type { LandShape } from '../land.ts';
import type { BulkSpec, WindPart, WindSpec } from '../forcing/spec.ts';
import type { DynamicsMode, SlipKind } from '../config.ts';

export const SCENARIO_FORMAT = 'pycno-scenario/1';

/** The fields a run can write: the model's centred output fields (model/diagnostics/fields.ts). */
export const OUTPUT_FIELDS = FIELD_NAMES;
export type OutputField = (typeof OUTPUT_FIELDS)[number];

export type Resolution = number | { lon: number; lat: number };

export type CoriolisSpec = { kind: 'beta-plane'; beta?: number } | { kind: 'spherical' };

/** Initial state; amplitudes are thermocline displacements in m, positive down. */
export type InitialSpec =
  | { kind: 'rest' }
  | { kind: 'bump'; lon: number; lat: number; radiusDeg: number; amplitude: number }
  | { kind: 'kelvin'; lon: number; amplitude: number; zonalWidthDeg: number }
  | { kind: 'rossby'; lon: number; amplitude: number; zonalWidthDeg: number }
  /** The last frame of a restart/output NetCDF file; path relative to the scenario file. */
  | { kind: 'restart'; path: string }
  /** The end state of another scenario's run; days defaults to that scenario's time.days. */
  | { kind: 'spinup'; scenario: string; days?: number };

export interface Probe {
  name: string;
  lon: number;
  lat: number;
}

/** A scenario file as written: optional sections may be missing. */
export interface ScenarioFile {
  $schema?: string;
  format: typeof SCENARIO_FORMAT;
  name: string;
  description?: string;
  basin: {
    lonWest: number;
    lonEast: number;
    latSouth: number;
    latNorth: number;
    resolution: Resolution;
    land?: LandShape[];
    sponge?: { widthDeg?: number; dampingDays?: number; conserveVolume?: boolean };
  };
  physics?: {
    reducedGravity?: number;
    layerThickness?: number;
    density?: number;
    coriolis?: CoriolisSpec;
    dynamics?: DynamicsMode;
    frictionDays?: number | null;
    viscosity?: number;
    slip?: SlipKind;
    surfaceLayer?: { depth?: number; dampingDays?: number };
    entrainment?: { minThickness?: number; timeDays?: number };
  };
  time: {
    days: number;
    dtSeconds?: number | 'auto';
    outputEveryDays?: number;
    safety?: number;
  };
  initial?: InitialSpec;
  wind?: { parts?: WindPart[]; bulk?: Partial<BulkSpec>; updateHours?: number };
  probes?: Probe[];
  hovmoller?: { lat?: number[] };
  seed?: string | number;
  output?: { fields?: OutputField[] };
}

/** A validated scenario with every default filled in (still in file units). */
export interface Scenario {
  $schema?: string;
  format: typeof SCENARIO_FORMAT;
  name: string;
  description: string;
  basin: {
    lonWest: number;
    lonEast: number;
    latSouth: number;
    latNorth: number;
    resolution: Resolution;
    land: LandShape[];
    sponge: { widthDeg: number; dampingDays: number; conserveVolume: boolean };
  };
  physics: {
    reducedGravity: number;
    layerThickness: number;
    density: number;
    coriolis: CoriolisSpec;
    dynamics: DynamicsMode;
    frictionDays: number | null;
    viscosity: number;
    slip: SlipKind;
    surfaceLayer: { depth: number; dampingDays: number };
    entrainment: { minThickness: number; timeDays: number };
  };
  time: {
    days: number;
    dtSeconds: number | 'auto';
    outputEveryDays: number;
    safety: number;
  };
  initial: InitialSpec;
  wind: WindSpec;
  probes: Probe[];
  hovmoller: { lat: number[] };
  seed: string | number;
  numerics: { precision: Precision };
  output: { fields: OutputField[] };
}
