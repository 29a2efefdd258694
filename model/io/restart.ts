// Restart files: the exact prognostic state on the padded C grid (u, v, h and the multistep
// tendencies, all double), the clock, the grid it belongs to and the scenario that made it. A run
// started from one continues bit for bit. A run's output file can also serve as a start, less
// exactly: its last record, single precision, face velocities averaged from the cell centres.

import { formatLat, formatLon, InputError } from '../errors.ts';
import type { Grid } from '../grid.ts';
import { placeOfIndex, staggeringOf } from '../grid-place.ts';
import { MAX_LAYER_THICKNESS, RUNAWAY_SPEED } from '../health-limits.ts';
import type { Model } from '../model.ts';
import { Clock, type ClockSpec } from '../clock.ts';
import { State } from '../state.ts';
import { NC_BYTE, NC_DOUBLE, type NcFileInput } from './netcdf-format.ts';
import { readNetcdf, NetcdfReadError, type NcFile } from './netcdf-read.ts';
import type { NcTypeName } from './netcdf-format.ts';
import { writeNetcdfToMemory } from './netcdf-writer.ts';
import { OUTPUT_FILL, PYCNO_VERSION } from './run-output.ts';

export const RESTART_FORMAT = 'pycno-restart/1';

/** Grid numbers stored in a restart and compared when one is read. */
const GRID_KEYS = ['lonWest', 'lonEast', 'latSouth', 'latNorth', 'dLon', 'dLat'] as const;

export interface RestartInfo {
  scenarioJson?: string;
  dt?: number;
  command?: string;
  createdAt?: Date;
}

function restartLayout(
  grid: Grid,
  info: RestartInfo,
  dt: number,
  clock: ClockSpec | null,
  coupled: boolean,
): NcFileInput {
  const atts: Record<string, string | number> = {
    title: 'Pycno restart',
    comment: 'the complete model state on the padded C grid; see docs/output.md',
    pycno_file: 'restart',
    pycno_restart_format: RESTART_FORMAT,
    pycno_version: PYCNO_VERSION,
    pycno_nx: grid.nx,
    pycno_ny: grid.ny,
    pycno_time_step_seconds: dt,
    // The clock that read `time` (model/clock.ts): 0 for a clock without an output interval.
    pycno_output_interval_seconds: clock?.intervalSeconds ?? 0,
    pycno_steps_per_output_interval: clock?.stepsPerInterval ?? 0,
    pycno_scenario: info.scenarioJson ?? '',
    history: `${(info.createdAt ?? new Date()).toISOString()}: ${info.command ?? 'restart written'} (Pycno ${PYCNO_VERSION})`,
  };
  for (const k of GRID_KEYS) atts[`pycno_${k}`] = grid.basin[k];
  const padded = ['y_padded', 'x_padded'];
  const field = (name: string, longName: string, units: string) => ({
    name,
    type: NC_DOUBLE as typeof NC_DOUBLE,
    dimensions: padded,
    attributes: { long_name: longName, units },
  });
  const tendency = (name: string, longName: string, units: string) => ({
    name,
    type: NC_DOUBLE as typeof NC_DOUBLE,
    dimensions: ['history', ...padded],
    attributes: {
      long_name: longName,
      units,
      comment: 'index 0 = one step back; only the first history_count entries are valid',
    },
  });
  return {
    version: 'auto',
    dimensions: [
      { name: 'y_padded', length: grid.ny + 3 },
      { name: 'x_padded', length: grid.nx + 3 },
      { name: 'history', length: 2 },
    ],
    attributes: atts,
    variables: [
      {
        name: 'time',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: { long_name: 'model time since the start of the experiment', units: 's' },
      },
      { name: 'steps', type: NC_DOUBLE, dimensions: [], attributes: { long_name: 'time steps taken', units: '1' } },
      {
        name: 'clock_origin_time',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: {
          long_name: 'model time the clock counts from',
          units: 's',
          comment: 'time = clock_origin_time + ((steps - clock_origin_steps) * interval) / steps per interval',
        },
      },
      {
        name: 'clock_origin_steps',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: { long_name: 'step count the clock counts from', units: '1' },
      },
      {
        name: 'history_count',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: { long_name: 'valid multistep tendencies', units: '1' },
      },
      {
        name: 'budget_anomaly_at_start',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: {
          long_name: "sum of h' over the ocean cells at the start of the experiment, for the volume budget",
          units: 'm',
        },
      },
      {
        name: 'budget_sponge_measured',
        type: NC_DOUBLE,
        dimensions: [],
        attributes: {
          long_name:
            "sum of h' the sponges added (negative: took out) since the start, as the nonlinear step measures it",
          units: 'm',
        },
      },
      {
        name: 'ocean',
        type: NC_BYTE,
        dimensions: padded,
        attributes: { long_name: 'ocean (1) or land (0), padded layout' },
      },
      field('u', 'layer-mean eastward velocity on west faces (padded C grid)', 'm s-1'),
      field('v', 'layer-mean northward velocity on south faces (padded C grid)', 'm s-1'),
      field('h', 'thickness anomaly at cell centres (padded C grid), positive down', 'm'),
      tendency('du', 'tendency of u', 'm s-2'),
      tendency('dv', 'tendency of v', 'm s-2'),
      tendency('dh', 'tendency of h', 'm s-1'),
      // The coupled state of an answering wind: the wind it answers with follows from it alone.
      ...(coupled
        ? [
            field(
              'sst_anom',
              'sea surface temperature anomaly of the answering wind at cell centres (padded C grid)',
              'K',
            ),
          ]
        : []),
    ],
  };
}

/** The bytes of a restart file of the model's current state. */
export async function writeRestart(model: Model, info: RestartInfo = {}): Promise<Uint8Array> {
  return writeRestartState(model.state, { ...info, dt: model.dt });
}

export async function writeRestartState(state: State, info: RestartInfo = {}): Promise<Uint8Array> {
  const grid = state.grid;
  const both = (a: ArrayLike<number>, b: ArrayLike<number>) => {
    const out = new Float64Array(a.length * 2);
    out.set(a);
    out.set(b, a.length);
    return out;
  };
  const h = state.history;
  const clock = state.clock;
  return writeNetcdfToMemory(restartLayout(grid, info, info.dt ?? clock?.dt ?? NaN, clock, state.sst !== null), {
    time: state.time,
    steps: state.steps,
    clock_origin_time: clock ? clock.originTime : state.time,
    clock_origin_steps: clock ? clock.originSteps : state.steps,
    history_count: state.historyCount,
    budget_anomaly_at_start: state.volumeBudget?.anomalyAtStart ?? NaN,
    budget_sponge_measured: state.volumeBudget?.spongeMeasured ?? NaN,
    ocean: grid.ocean,
    u: state.u,
    v: state.v,
    h: state.h,
    du: both(h.du[0], h.du[1]),
    dv: both(h.dv[0], h.dv[1]),
    dh: both(h.dh[0], h.dh[1]),
    ...(state.sst ? { sst_anom: state.sst } : {}),
  });
}

export interface StartFile {
  state: State;
  /** True for a restart file (bit-for-bit continuation), false for a run output's last record. */
  exact: boolean;
  /** Time step of the run that wrote it, s (NaN if unknown). */
  dt: number;
  /** A line for the user about what was read. */
  note: string;
  /** The scenario JSON of the run that wrote the file, when it recorded one. */
  scenarioJson?: string;
}

function fail(source: string, message: string): never {
  throw new InputError(`${source}: ${message}`);
}

function numberAttribute(f: NcFile, name: string): number {
  const a = f.attributes[name];
  return a && typeof a.value !== 'string' && a.value.length > 0 ? a.value[0] : NaN;
}

function textAttribute(f: NcFile, name: string): string | undefined {
  const a = f.attributes[name];
  return a && typeof a.value === 'string' ? a.value : undefined;
}

/**
 * A variable's numbers, refused by name unless it is there with the type and dimensions Pycno
 * writes (and, with `finite`, every value finite): a retyped, reshaped or damaged variable must
 * never reach the model as a start.
 */
function numeric(
  f: NcFile,
  source: string,
  name: string,
  type: NcTypeName,
  dims: readonly string[],
  kind: string,
  finite = true,
  where?: (k: number) => string,
): Float64Array {
  const v = f.variables.find((x) => x.name === name);
  if (!v) fail(source, `has no variable '${name}'; ${kind} holds it`);
  if (v.type !== type) fail(source, `variable '${name}' is ${v.type}; ${kind} has it as ${type}`);
  if (v.dimensions.join(',') !== dims.join(','))
    fail(
      source,
      `variable '${name}' has dimensions (${v.dimensions.join(', ')}); ${kind} has it on (${dims.join(', ')})`,
    );
  const values = v.values as Float64Array;
  if (finite) {
    for (let k = 0; k < values.length; k++) {
      if (!Number.isFinite(values[k]))
        fail(
          source,
          `variable '${name}' has ${values[k]} at index ${k}${where ? ` (${where(k)})` : ''}; a start must be finite`,
        );
    }
  }
  return values;
}

/**
 * Refuse a prognostic field with a value beyond the bounds of a sane state (health-limits.ts),
 * as a NaN is refused: 1e300 is as much a damaged file as NaN, and would make one at once.
 */
function withinBounds(
  source: string,
  name: string,
  values: ArrayLike<number>,
  bound: number,
  what: string,
  where: (k: number) => string,
): void {
  for (let k = 0; k < values.length; k++) {
    if (Math.abs(values[k]) > bound)
      fail(source, `variable '${name}' has ${values[k]} at index ${k} (${where(k)}); ${what}`);
  }
}

const SPEED_BOUND = `a start must be slower than ${RUNAWAY_SPEED} m/s, the speed at which a run is stopped as blown up`;
const DEPTH_BOUND = `a thermocline displaced by more than ${MAX_LAYER_THICKNESS} m is deeper than any ocean`;

/** One number of a scalar variable (see numeric). */
function scalarOf(f: NcFile, source: string, name: string, kind: string): number {
  return numeric(f, source, name, 'double', [], kind)[0];
}

const RESTART = 'a Pycno restart file';

function open(bytes: Uint8Array, source: string): NcFile {
  try {
    return readNetcdf(bytes);
  } catch (e) {
    if (e instanceof NetcdfReadError) fail(source, `cannot be read as NetCDF: ${e.message}`);
    throw e;
  }
}

/** Read a restart file; refuses other files and other grids with a message that says why. */
export function readRestart(bytes: Uint8Array, grid: Grid, source = 'the restart file'): State {
  const f = open(bytes, source);
  const kind = textAttribute(f, 'pycno_file');
  if (kind !== 'restart') {
    fail(
      source,
      kind === 'run-output'
        ? 'is a Pycno run output, not a restart file (read it with readStartFile for an approximate start)'
        : 'is not a Pycno restart file (no pycno_file = "restart" attribute)',
    );
  }
  const format = textAttribute(f, 'pycno_restart_format');
  if (format !== RESTART_FORMAT)
    fail(source, `has restart format ${JSON.stringify(format)}; this program reads "${RESTART_FORMAT}"`);
  checkGrid(f, grid, source);
  const padded = ['y_padded', 'x_padded'];
  const dims = f.dimensions;
  const lengthOf = (name: string) => dims.find((d) => d.name === name)?.length;
  if (lengthOf('y_padded') !== grid.ny + 3 || lengthOf('x_padded') !== grid.nx + 3 || lengthOf('history') !== 2) {
    fail(
      source,
      `has padded dimensions y_padded = ${lengthOf('y_padded')}, x_padded = ${lengthOf('x_padded')}, history = ${lengthOf('history')}; the scenario's grid needs ${grid.ny + 3}, ${grid.nx + 3} and 2`,
    );
  }
  const state = new State(grid);
  state.time = scalarOf(f, source, 'time', RESTART);
  state.steps = scalarOf(f, source, 'steps', RESTART);
  state.historyCount = scalarOf(f, source, 'history_count', RESTART);
  if (!(Number.isInteger(state.steps) && state.steps >= 0))
    fail(source, `variable 'steps' is ${state.steps}; a step count is a whole number >= 0`);
  if (!(Number.isInteger(state.historyCount) && state.historyCount >= 0 && state.historyCount <= 2))
    fail(source, `variable 'history_count' is ${state.historyCount}; it must be 0, 1 or 2`);
  state.clock = clockOf(f, state, source);
  state.volumeBudget = budgetOf(f, source);
  const ocean = numeric(f, source, 'ocean', 'byte', padded, RESTART);
  let differ = 0;
  for (let k = 0; k < grid.size; k++) if ((ocean[k] > 0 ? 1 : 0) !== grid.ocean[k]) differ++;
  if (differ > 0)
    fail(source, `was written with different land: ${differ} cells are land in one and ocean in the other`);
  const at = (name: string) => (k: number) =>
    placeOfIndex(grid, k % grid.size, staggeringOf(name)) +
    (k >= grid.size ? `, history ${Math.floor(k / grid.size)}` : '');
  const u = numeric(f, source, 'u', 'double', padded, RESTART, true, at('u'));
  const v = numeric(f, source, 'v', 'double', padded, RESTART, true, at('v'));
  const h = numeric(f, source, 'h', 'double', padded, RESTART, true, at('h'));
  withinBounds(source, 'u', u, RUNAWAY_SPEED, SPEED_BOUND, at('u'));
  withinBounds(source, 'v', v, RUNAWAY_SPEED, SPEED_BOUND, at('v'));
  withinBounds(source, 'h', h, MAX_LAYER_THICKNESS, DEPTH_BOUND, at('h'));
  state.u.set(u);
  state.v.set(v);
  state.h.set(h);
  for (const key of ['du', 'dv', 'dh'] as const) {
    const both = numeric(f, source, key, 'double', ['history', ...padded], RESTART, true, at(key));
    state.history[key][0].set(both.subarray(0, grid.size));
    state.history[key][1].set(both.subarray(grid.size));
  }
  // Only a coupled run writes its SST anomaly; a file without one leaves the state uncoupled.
  if (f.variables.some((v) => v.name === 'sst_anom')) {
    state.sst = grid.field();
    state.sst.set(numeric(f, source, 'sst_anom', 'double', padded, RESTART));
  }
  return state;
}

/** The volume budget a restart carries; null for a file from before budgets were kept, or with none (the run then starts one). */
function budgetOf(f: NcFile, source: string): State['volumeBudget'] {
  if (!f.variables.some((v) => v.name === 'budget_anomaly_at_start')) return null;
  // NaN is how a restart says it has no budget; other values must be numbers.
  const scalar = (name: string) => numeric(f, source, name, 'double', [], RESTART, false)[0];
  const budget = {
    anomalyAtStart: scalar('budget_anomaly_at_start'),
    spongeMeasured: scalar('budget_sponge_measured'),
  };
  return Number.isFinite(budget.anomalyAtStart) && Number.isFinite(budget.spongeMeasured) ? budget : null;
}

/** The clock a restart was written with; null for a file from before clocks were kept (the run then counts from its time). */
function clockOf(f: NcFile, state: State, source: string): ClockSpec | null {
  if (!f.variables.some((v) => v.name === 'clock_origin_time')) return null;
  const clock: ClockSpec = {
    dt: numberAttribute(f, 'pycno_time_step_seconds'),
    intervalSeconds: numberAttribute(f, 'pycno_output_interval_seconds'),
    stepsPerInterval: numberAttribute(f, 'pycno_steps_per_output_interval'),
    originTime: scalarOf(f, source, 'clock_origin_time', RESTART),
    originSteps: scalarOf(f, source, 'clock_origin_steps', RESTART),
  };
  const sound =
    Object.values(clock).every(Number.isFinite) &&
    clock.dt > 0 &&
    clock.intervalSeconds >= 0 &&
    Number.isInteger(clock.stepsPerInterval) &&
    clock.stepsPerInterval >= 0 &&
    clock.stepsPerInterval > 0 === clock.intervalSeconds > 0 &&
    Number.isInteger(clock.originSteps) &&
    clock.originSteps <= state.steps &&
    Math.abs(new Clock(clock).timeAt(state.steps) - state.time) <= 1e-6 * clock.dt;
  if (!sound)
    fail(
      source,
      'has a corrupt clock (clock_origin_time, clock_origin_steps and the output interval attributes do not fit together)',
    );
  return clock;
}

function checkGrid(f: NcFile, grid: Grid, source: string): void {
  const nx = numberAttribute(f, 'pycno_nx');
  const ny = numberAttribute(f, 'pycno_ny');
  // A size that is no size at all is named as the attribute it is, not as a grid.
  for (const [name, n] of [
    ['pycno_nx', nx],
    ['pycno_ny', ny],
  ] as const) {
    if (!(Number.isInteger(n) && n >= 1)) {
      const a = f.attributes[name];
      const got =
        a === undefined
          ? 'missing'
          : typeof a.value === 'string'
            ? `the text ${JSON.stringify(a.value.slice(0, 40))}`
            : `${n}`;
      fail(
        source,
        `global attribute '${name}' is ${got}; a Pycno restart file has the grid's number of cells there (a whole number >= 1)`,
      );
    }
  }
  if (nx !== grid.nx || ny !== grid.ny) {
    fail(
      source,
      `is on a ${nx} x ${ny} grid, the scenario on ${grid.nx} x ${grid.ny} (lon x lat cells); a restart must come from the same basin and resolution`,
    );
  }
  for (const k of GRID_KEYS) {
    const there = numberAttribute(f, `pycno_${k}`);
    if (Math.abs(there - grid.basin[k]) > 1e-9 * Math.max(1, Math.abs(grid.basin[k]))) {
      fail(source, `has basin.${k} = ${there}, the scenario ${grid.basin[k]}; a restart must come from the same basin`);
    }
  }
}

/**
 * A starting state from a restart file (exact) or from the last record of a Pycno run output
 * (h_anom, u and v must be among its fields; velocities averaged to the faces, no multistep
 * history). Both must be on the scenario's grid.
 */
export function readStartFile(bytes: Uint8Array, grid: Grid, source = 'the restart file'): StartFile {
  const f = open(bytes, source);
  const kind = textAttribute(f, 'pycno_file');
  if (kind === 'restart') {
    const state = readRestart(bytes, grid, source);
    const scenarioJson = textAttribute(f, 'pycno_scenario') || undefined;
    return {
      state,
      exact: true,
      dt: numberAttribute(f, 'pycno_time_step_seconds'),
      note: `restart from ${source} at day ${(state.time / 86400).toFixed(2)}`,
      scenarioJson,
    };
  }
  if (kind !== 'run-output')
    fail(source, 'is neither a Pycno restart file nor a Pycno run output (no pycno_file attribute)');
  const RUN = 'a Pycno run output';
  const lat = numeric(f, source, 'lat', 'double', ['lat'], RUN);
  const lon = numeric(f, source, 'lon', 'double', ['lon'], RUN);
  if (lon.length !== grid.nx || lat.length !== grid.ny) {
    fail(
      source,
      `is on a ${lon.length} x ${lat.length} grid, the scenario on ${grid.nx} x ${grid.ny} (lon x lat cells)`,
    );
  }
  const tol = 1e-6 * Math.max(grid.dLon, grid.dLat);
  for (let i = 0; i < grid.nx; i++)
    if (Math.abs(lon[i] - grid.lonCentre[i]) > tol)
      fail(source, `has longitude ${lon[i]} where the scenario's grid has ${grid.lonCentre[i]}`);
  for (let j = 0; j < grid.ny; j++)
    if (Math.abs(lat[j] - grid.latCentre[j]) > tol)
      fail(source, `has latitude ${lat[j]} where the scenario's grid has ${grid.latCentre[j]}`);
  const n = f.numRecords;
  if (n === 0) fail(source, 'holds no output record yet');
  const names = f.variables.map((v) => v.name);
  for (const need of ['h_anom', 'u', 'v']) {
    if (!names.includes(need))
      fail(source, `has no variable '${need}'; a run output used as a start must hold h_anom, u and v`);
  }
  // The start is the last record: the records must be in time order, so that it is the latest.
  const days = numeric(f, source, 'time', 'double', ['time'], RUN);
  for (let k = 1; k < days.length; k++) {
    if (!(days[k] > days[k - 1]))
      fail(source, `variable 'time' does not increase: record ${k} is day ${days[k]}, after day ${days[k - 1]}`);
  }
  const cells = grid.nx * grid.ny;
  const last = (name: string) =>
    numeric(f, source, name, 'float', ['time', 'lat', 'lon'], RUN, false).subarray((n - 1) * cells, n * cells);
  const hC = last('h_anom');
  const uC = last('u');
  const vC = last('v');
  const wet = (x: number) => Number.isFinite(x) && x !== OUTPUT_FILL && Math.abs(x) < 1e30;
  const centre = (k: number) =>
    `${formatLon(lon[k % grid.nx])}, ${formatLat(lat[Math.floor(k / grid.nx)])}, in the last record`;
  for (const [name, values, bound, what] of [
    ['u', uC, RUNAWAY_SPEED, SPEED_BOUND],
    ['v', vC, RUNAWAY_SPEED, SPEED_BOUND],
    ['h_anom', hC, MAX_LAYER_THICKNESS, DEPTH_BOUND],
  ] as const) {
    for (let k = 0; k < cells; k++) {
      if (wet(values[k]) && Math.abs(values[k]) > bound)
        fail(source, `variable '${name}' has ${values[k]} at ${centre(k)}; ${what}`);
    }
  }
  for (const [name, values] of [
    ['u', uC],
    ['v', vC],
  ] as const) {
    for (let k = 0; k < cells; k++) {
      const j = Math.floor(k / grid.nx);
      if (grid.ocean[grid.idx(k % grid.nx, j)] && !wet(values[k]))
        fail(
          source,
          `variable '${name}' has no value (${values[k]}) at ${lon[k % grid.nx]}°E, ${lat[j]}°N, an ocean cell of the scenario, in the last record`,
        );
    }
  }
  const state = new State(grid);
  const { nx, ny } = grid;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = grid.idx(i, j);
      const c = j * nx + i;
      if (!grid.ocean[k]) continue;
      if (!wet(hC[c])) fail(source, `has land at ${lon[i]}°E, ${lat[j]}°N where the scenario has ocean`);
      state.h[k] = hC[c];
    }
  }
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i <= nx; i++) {
      const k = grid.idx(i, j);
      if (grid.maskU[k]) state.u[k] = 0.5 * (uC[j * nx + i - 1] + uC[j * nx + i]);
    }
  }
  for (let j = 0; j <= ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = grid.idx(i, j);
      if (grid.maskV[k]) state.v[k] = 0.5 * (vC[(j - 1) * nx + i] + vC[j * nx + i]);
    }
  }
  const day = days[n - 1];
  state.time = day * 86400;
  const step = names.includes('step') ? numeric(f, source, 'step', 'double', ['time'], RUN)[n - 1] : 0;
  state.steps = Number.isInteger(step) && step >= 0 ? step : 0;
  return {
    state,
    exact: false,
    dt: numberAttribute(f, 'pycno_time_step_seconds'),
    note: `start from the last record (day ${day.toFixed(2)}) of the run output ${source}: single precision, face velocities averaged from the centres`,
  };
}
