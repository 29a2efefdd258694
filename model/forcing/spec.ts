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

/**
 * The answering wind: a wind that answers the ocean. The run's thermocline sets a sea-surface
 * temperature anomaly (thermocline feedback), a damped Gill (1980) atmosphere answers its heating,
 * and the surface wind of that answer becomes stress by a drag law. Its state is the SST anomaly,
 * which the model carries (State.sst) and restart files keep. docs/wind.md and docs/physics.md.
 */
export interface AnsweringPart {
  kind: 'answering';
  name?: string;
  enabled?: boolean;
  /** Coupling strength mu: surface wind per kelvin of the normalised atmospheric answer, m s-1 K-1. */
  strength: number;
  /** The SST and the atmosphere are brought up to date every this many ocean steps. */
  everySteps: number;
  /**
   * From wind to stress. 'linear': tau = rho_air C_D(|U_b|) |U_b| u; 'bulk': tau = B(U_b + u) - B(U_b)
   * with B the run's bulk formula (wind.bulk); U_b the background wind.
   */
  drag: 'linear' | 'bulk';
  /** The background (mean) surface wind the answer blows on, m s-1 (x eastward, y northward). */
  background: { x: number; y: number };
  sst: SstSpec;
  atmosphere: AtmosphereSpec;
}

/** The SST anomaly: dT/dt = w S (T_sub(h') - T) - eps_T T - S G u_surf (docs/physics.md). */
export interface SstSpec {
  /** S(lon, lat), 0..1: where mean upwelling and the mean zonal SST gradient act (a cold tongue); must not depend on t. */
  region: ShapeSpec;
  /** 1/w: the time the mean upwelling takes to renew the surface water where S = 1, days. */
  upwellingDays: number;
  /** 1/eps_T: Newtonian damping of the anomaly (exchange with the air), days. */
  dampingDays: number;
  /** Subsurface temperature anomaly: warm tanh(h'/warmDepth) for h' >= 0, cold tanh(h'/coldDepth) below (K, m). */
  subsurface: { warm: number; warmDepth: number; cold: number; coldDepth: number };
  /** dTbar/dx, the mean zonal SST gradient in the region, K per 1000 km (negative: colder to the east); 0 leaves out zonal advection. */
  meanGradient: number;
  /** T' at the start of a fresh run, K, times S: a kick that needs no wind. */
  initial: number;
}

/** Gill's (1980) damped, steady, long-wave atmosphere on the equatorial beta plane. */
export interface AtmosphereSpec {
  /** c_a, the gravity-wave speed of the atmosphere's mode, m s-1. */
  speed: number;
  /** 1/eps, the damping time of both friction and cooling, days. */
  dampingDays: number;
  /** The projection: how many Hermite functions of the atmosphere's equatorial radius carry the heating (1: Gill's symmetric case). */
  heatingModes: number;
}

export type WindPart = FixedPart | BurstsPart | AnsweringPart;

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
