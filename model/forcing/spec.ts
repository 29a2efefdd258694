// The data model of a wind design: what a scenario file's "wind" section holds after validation.
// Units as users think of them: degrees, days, N m-2 or m s-1. model/forcing turns a WindSpec into a
// WindStress (stress.ts) on a grid. The JSON Schema in configs/ describes exactly these shapes.

/** A scalar spatial shape, typically 0..1, that scales a part's amplitude. */
export type ShapeSpec =
  /** 1 everywhere. */
  | { kind: 'uniform' }
  /** Gaussian patch: exp(-(x'^2/(2 sx^2) + y'^2/(2 sy^2))) in degrees, rotated by tiltDeg (anticlockwise). */
  | { kind: 'patch'; lon: number; lat: number; lonWidth: number; latWidth: number; tiltDeg?: number }
  /** A function of latitude only. */
  | { kind: 'band'; profile: BandProfile }
  /** A formula in lon (deg E), lat (deg N) and t (days); see docs/wind.md for the language. */
  | { kind: 'formula'; expression: string };

export type BandProfile =
  /** cos(pi/2 * (lat - centre)/halfWidth) inside |lat - centre| < halfWidth, 0 outside. */
  | { kind: 'cosine'; centre: number; halfWidth: number }
  /** 1 between south and north, with tanh edges of the given width (degrees). */
  | { kind: 'tanh'; south: number; north: number; edge: number }
  /** 1 - depth * exp(-(lat - centre)^2 / (2 width^2)): a weak-wind gap. */
  | { kind: 'gap'; centre: number; width: number; depth: number }
  /** cos(pi * lat / (2 * edgeLat)) clipped at 0: broad trades falling to zero at +-edgeLat. */
  | { kind: 'trades'; edgeLat: number };

/** A regular lon/lat grid of its own: first point, spacing and counts (degrees). */
export interface LonLatGrid {
  lon0: number;
  lat0: number;
  dLon: number;
  dLat: number;
  nLon: number;
  nLat: number;
}

/** A gridded vector field on its own regular lon/lat grid (row-major, south to north, west to east). */
export interface GriddedVectors extends LonLatGrid {
  /** nLat * nLon values each; x = eastward, y = northward component. */
  x: number[];
  y: number[];
}

/** Where a part's vectors come from. */
export type VectorSource =
  /** A fixed direction and magnitude, times a scalar shape. */
  | { kind: 'shaped'; shape: ShapeSpec; x: number; y: number }
  /** Vectors painted in the page, stored in the scenario. */
  | { kind: 'painted'; grid: GriddedVectors }
  /** Gridded data from a CSV or NetCDF file (lon/lat(/time)); path relative to the scenario file. */
  | { kind: 'file'; path: string; format: 'csv' | 'netcdf'; xVariable?: string; yVariable?: string };

export type EnvelopeSpec =
  | { kind: 'constant' }
  /** Linear rise from 0 at `start` to 1 at start + duration (days); down: 1 falling to 0. */
  | { kind: 'ramp'; start: number; duration: number; direction: 'up' | 'down' }
  /** On at `start` for `duration` days, with linear ramps of `ramp` days inside the duration. */
  | { kind: 'pulse'; start: number; duration: number; ramp: number }
  /** mean + sum of cos(2 pi t / period - phase) terms; period in days, phase in days of the peak. */
  | { kind: 'harmonics'; mean: number; terms: Array<{ period: number; amplitude: number; peakDay: number }> }
  /** Piecewise-linear table of [day, factor] pairs; held constant beyond the ends. */
  | { kind: 'table'; points: Array<[number, number]> }
  /** 1 until `day`, then 0 (with an optional linear ramp of `ramp` days). */
  | { kind: 'switch-off'; day: number; ramp: number };

/** A deterministic part: source x envelope. */
export interface FixedPart {
  kind: 'fixed';
  name?: string;
  enabled?: boolean;
  /** 'stress': the vectors are N m-2. 'wind': m s-1 at 10 m, turned into stress by the bulk formula. */
  quantity: 'stress' | 'wind';
  source: VectorSource;
  envelope: EnvelopeSpec;
}

/** Seeded random westerly bursts: Gaussian patches with random times, places, sizes and strengths. */
export interface BurstsPart {
  kind: 'bursts';
  name?: string;
  enabled?: boolean;
  quantity: 'stress' | 'wind';
  /** Mean number of bursts per 365 days (Poisson). */
  ratePerYear: number;
  /** First and last day a burst may start. */
  window: [number, number];
  /** Ranges [min, max] of each burst's properties, drawn uniformly. */
  amplitude: [number, number];
  lon: [number, number];
  lat: [number, number];
  lonWidth: [number, number];
  latWidth: [number, number];
  duration: [number, number];
  /** Ramp time at either end of a burst, days. */
  ramp: number;
}

export type WindPart = FixedPart | BurstsPart;

export interface BulkSpec {
  /** Air density, kg m-3 (1.2: McPhaden & Taft 1988). */
  airDensity: number;
  /** 'large-pond': Large & Pond (1981) neutral C_D; 'constant': dragCoefficient. */
  drag: 'large-pond' | 'constant';
  dragCoefficient: number;
}

export interface WindSpec {
  parts: WindPart[];
  bulk: BulkSpec;
  /** Time-varying parts are re-evaluated every this many hours of model time (see docs/wind.md). */
  updateHours: number;
}
