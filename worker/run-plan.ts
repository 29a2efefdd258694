// Planning a run: from a parsed scenario and its inputs, the model, the grid as listeners see it,
// the rows and cells sampled for the Hovmoller diagrams and the probes, the steps the run starts
// and ends at, and what the listeners are told about it (LoadedScenario). Also where the files a
// scenario names come from, and which step the next output record falls on.

import type { FieldName } from '../model/diagnostics/fields.ts';
import { InputError } from '../model/errors.ts';
import type { DrawnBurst } from '../model/forcing/bursts.ts';
import type { Model } from '../model/model.ts';
import type { ThreadsOption } from '../model/parallel/threads.ts';
import { runPhysics } from '../model/run-physics.ts';
import type { RunAllowance } from '../model/scenario/run-size.ts';
import { derivedNumbers } from '../model/scenario/derived.ts';
import {
  buildPrepared,
  loadInputs,
  mapReader,
  type InputReader,
  type ParsedScenario,
  type PreparedInputs,
} from '../model/scenario/load-inputs.ts';
import type { State } from '../model/state.ts';
import type { GridInfo, LoadedScenario } from './protocol.ts';

export interface LoadOptions {
  /** --set style overrides, "path=value". */
  sets?: readonly string[];
  /** Files the host already holds, keyed by path resolved against the scenario file name. */
  files?: ReadonlyMap<string, Uint8Array | string>;
  /** A ready starting state (skips reading the restart or running the spin-up). */
  startState?: State;
  /** Reads files by resolved path (Node: the file system); used when `files` lacks one. */
  reader?: InputReader;
  onSpinup?: (file: string, day: number, endDay: number) => void;
  /** Threads for the linear step of this run (overrides the engine's default). */
  threads?: ThreadsOption;
  /** Runs beyond the caps on steps and output size that the user asked for (the page asks for none). */
  allow?: RunAllowance;
}

/** A run ready to step: its model and everything the sampling and the frames need to know. */
export interface RunPlan {
  parsed: ParsedScenario;
  inputs: PreparedInputs;
  info: LoadedScenario;
  model: Model;
  bursts: DrawnBurst[];
  fields: FieldName[];
  /** model.state.steps when the run started, and when it ends. */
  firstStep: number;
  endStep: number;
  hovRows: number[];
  probeCells: Array<{ i: number; j: number }>;
}

/** Where the files a scenario names come from: the ones given, else the host's reader. */
export function readerFor(options: LoadOptions): InputReader {
  const fromMap = options.files ? mapReader(options.files) : null;
  const reader = options.reader;
  return async (path, limit) => {
    if (fromMap && options.files!.has(path)) return fromMap(path, limit);
    if (reader) return reader(path, limit);
    throw new Error('the file was not provided (give its contents with the scenario)');
  };
}

/** Read (or run) what the scenario's start needs: its wind files, a restart file or a spin-up; or take the state given. */
export async function prepareInputs(parsed: ParsedScenario, options: LoadOptions): Promise<PreparedInputs> {
  if (options.startState) {
    const inputs: PreparedInputs = {
      files: new Map(),
      startState: options.startState,
      notes: ['start from a given state'],
    };
    const files = await loadInputs(
      { ...parsed, resolved: { ...parsed.resolved, initial: { kind: 'rest' } } },
      readerFor(options),
    );
    inputs.files = files.files;
    return inputs;
  }
  return loadInputs(parsed, readerFor(options), { onSpinup: options.onSpinup, allow: options.allow });
}

/** Build the run: the model at its start, and what it samples. `extraLats` are Hovmoller latitudes added since the load. */
export function planRun(parsed: ParsedScenario, inputs: PreparedInputs, extraLats: readonly number[]): RunPlan {
  const built = buildPrepared(parsed, inputs);
  const { model } = built;
  const r = parsed.resolved;
  const grid = model.grid;
  const fields = [...r.outputFields] as FieldName[];
  const firstStep = model.state.steps;
  const endStep = firstStep + model.clock.stepsFor(r.runSeconds);
  const lats = [...r.hovmollerLats, ...extraLats];
  const hovRows = lats.map((lat) => grid.nearestRow(lat));
  const probeCells = r.probes.map((p) => {
    const c = grid.cellAt(p.lon, p.lat);
    if (!c)
      throw new InputError(
        `probe '${p.name}' at ${p.lon}, ${p.lat} lies outside the basin`,
        `${parsed.fileName}: probes`,
      );
    return c;
  });
  const ocean = new Uint8Array(grid.nx * grid.ny);
  for (let j = 0; j < grid.ny; j++)
    for (let i = 0; i < grid.nx; i++) ocean[j * grid.nx + i] = grid.ocean[grid.idx(i, j)];
  const gridInfo: GridInfo = {
    nx: grid.nx,
    ny: grid.ny,
    lonWest: grid.basin.lonWest,
    lonEast: grid.basin.lonEast,
    latSouth: grid.basin.latSouth,
    latNorth: grid.basin.latNorth,
    dLon: grid.dLon,
    dLat: grid.dLat,
    lon: Float64Array.from(grid.lonCentre),
    lat: Float64Array.from(grid.latCentre),
    ocean,
  };
  const info: LoadedScenario = {
    name: r.name,
    description: r.description,
    scenarioJson: parsed.scenarioJson,
    seed: r.seed,
    grid: gridInfo,
    physics: runPhysics(r),
    derived: derivedNumbers(r, grid),
    dt: model.dt,
    days: r.days,
    outputEveryDays: r.outputEveryDays,
    fields,
    hovmollerLats: lats,
    probes: r.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat })),
    bursts: built.bursts,
    hovmollerRowLats: hovRows.map((j) => grid.latCentre[j]),
    startDay: model.day,
    notes: [...inputs.notes],
  };
  return { parsed, inputs, info, model, bursts: built.bursts, fields, firstStep, endStep, hovRows, probeCells };
}

/**
 * The step of the next record after step n: the end of the next whole output interval, counted
 * on the model's clock from day 0 (or from where a restart with another time step began), or the
 * run's end when that comes first, so the last interval may be shorter.
 */
export function nextRecordStep(run: RunPlan, n: number): number {
  return Math.min(run.model.clock.nextWholeInterval(n), run.endStep);
}
