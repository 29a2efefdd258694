// What the engine sends to whoever listens (the page, the command line, the run store), and the
// controls it takes. Frames carry typed arrays whose buffers are transferred, not copied.

import type { FieldName } from '../model/diagnostics/fields.ts';
import type { Integrals } from '../model/diagnostics/integrals.ts';
import type { CoupledIndices } from '../model/forcing/stress.ts';
import type { DrawnBurst } from '../model/forcing/bursts.ts';
import type { RunPhysics } from '../model/run-physics.ts';
import type { DerivedNumbers } from '../model/scenario/derived.ts';

/** Grid geometry a listener needs to draw and label fields (sent once per loaded scenario). */
export interface GridInfo {
  nx: number;
  ny: number;
  lonWest: number;
  lonEast: number;
  latSouth: number;
  latNorth: number;
  dLon: number;
  dLat: number;
  /** Cell-centre coordinates, degrees. */
  lon: Float64Array;
  lat: Float64Array;
  /** 1 ocean, 0 land, nx * ny from the south-west corner. */
  ocean: Uint8Array;
}

export interface LoadedScenario {
  name: string;
  description: string;
  /** The scenario JSON exactly as run (defaults filled in), for saving and reproducing. */
  scenarioJson: string;
  /** The scenario's seed (random bursts draw from it). */
  seed: string | number;
  grid: GridInfo;
  /** g', H, beta, rho0, dynamics ('linear' or 'nonlinear'), c, L, ... of the run. */
  physics: RunPhysics;
  derived: DerivedNumbers;
  dt: number;
  days: number;
  outputEveryDays: number;
  fields: FieldName[];
  hovmollerLats: number[];
  probes: Array<{ name: string; lon: number; lat: number }>;
  bursts: DrawnBurst[];
  /** Centre latitudes of the model rows the Hovmoller sections use, in hovmollerLats order. */
  hovmollerRowLats?: number[];
  /** Model day the run starts at (0, or the clock of a restart file). */
  startDay?: number;
  /** What was read or run to prepare the start (restart file, spin-up, wind files), for the user. */
  notes?: string[];
}

/** One output interval's samples: the time series parts of a frame, never dropped. */
export interface OutputSample {
  day: number;
  integrals: Integrals;
  /** h' along each Hovmoller latitude (nx values each, NaN on land), in hovmollerLats order. */
  hovmoller: Float32Array[];
  /** Every field at every probe: probeValues[p][field index in LoadedScenario.fields]. */
  probeValues: Float32Array[];
  /** Steps taken when the sample was taken (the model's step counter). */
  step?: number;
  /** Every output field in full (nx * ny, NaN on land); only on the samples asked for with setSampleFields. */
  fields?: Partial<Record<FieldName, Float32Array>>;
  /** A run with an answering wind: its eastern SST index and warm-water volume (model/coupling/indices.ts). */
  coupled?: CoupledIndices;
}

/**
 * A frame: the latest full fields plus every output sample since the previous frame. The
 * engine publishes at most about 30 per second; when the model outruns that, full fields are
 * dropped in between but no sample is.
 */
export interface Frame {
  /** Model day and step of the fields. */
  day: number;
  step: number;
  /** Centred fields, nx * ny Float32 from the south-west corner, NaN on land; only the run's fields. */
  fields: Partial<Record<FieldName, Float32Array>>;
  integrals: Integrals;
  samples: OutputSample[];
  /** True on the frame that ends the run (length reached). */
  finished: boolean;
}

export type EngineStatus = 'empty' | 'ready' | 'running' | 'paused' | 'finished' | 'failed';

/** A failure as the page and the command line show it: the same text for both. */
export interface EngineError {
  kind: 'input' | 'blow-up' | 'internal';
  message: string;
}

/** Result of Engine.load: a plain object, so it crosses comlink with its kind intact. */
export type LoadResult = { ok: true; scenario: LoadedScenario } | { ok: false; error: EngineError };

/** Where the engine is: sent to status listeners on every change and on request. */
export interface EngineReport {
  status: EngineStatus;
  /** Model day and steps taken by the loaded run (0 when empty). */
  day: number;
  step: number;
  /** Day the run ends. */
  endDay: number;
  /** Speed cap, model days per wall-clock second, or 'max'. */
  speed: number | 'max';
  /** The failure that stopped the run or the last load, else null. */
  error: EngineError | null;
  /** Output samples taken since the run started (the initial one included). */
  samples: number;
}
