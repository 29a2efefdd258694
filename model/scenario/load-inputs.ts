// Everything a scenario needs besides its own text: gridded wind files, a restart or run-output
// file to start from, or another scenario to spin up first. Paths are relative to the scenario
// file; the host (Node's file system, or files the page was given) reads the bytes, so this stays
// free of any host API.

import { DAY } from '../config.ts';
import { InputError } from '../errors.ts';
import { ForcingError } from '../forcing/errors.ts';
import { Grid } from '../grid.ts';
import { READ_LIMITS, tooLarge, type ReadLimit } from '../io/read-limits.ts';
import { readStartFile, type StartFile } from '../io/restart.ts';
import { decodeUtf8Text, TextEncodingError } from '../io/text-decode.ts';
import type { State } from '../state.ts';
import { buildModel, type BuiltRun } from './build.ts';
import { issueListLines, ScenarioError, type ScenarioIssue } from './errors.ts';
export { MAX_ISSUE_LINES } from './errors.ts';
import { applyOverrides } from './overrides.ts';
import { parseScenarioText, type TextPosition } from './parse.ts';
import { resolveScenario, type ResolvedScenario } from './resolve.ts';
import { scenarioRunRefusal, spinupSizeRefusal, type RunAllowance } from './run-size.ts';
import type { Scenario } from './types.ts';
import { validateScenario } from './validate.ts';

/**
 * Reads a file by its resolved path, at most limit.maxBytes of it (a larger file is refused before
 * it is read); rejects with a message if it cannot.
 */
export type InputReader = (path: string, limit: ReadLimit) => Promise<Uint8Array>;

/** Spin-ups may nest (a relaxation from a spun-up state that itself started from a restart). */
export const MAX_SPINUP_DEPTH = 8;

export interface ParsedScenario {
  fileName: string;
  scenario: Scenario;
  resolved: ResolvedScenario;
  /** The scenario as run, defaults and --set values in, as pretty JSON. */
  scenarioJson: string;
}

/** A scenario error's lines: the first problems, one per line (the first says what and where), and a count. */
export function issueLines(issues: readonly ScenarioIssue[]): string[] {
  return issueListLines(issues);
}

/**
 * Parse, apply --set overrides and validate a scenario text. Throws a ScenarioError whose message
 * has one line per problem, each with the file, the line (when known) and the JSON path.
 */
export interface ParseOptions {
  /** Runs above the caps on steps and output size that the user asked for (run-size.ts). */
  allow?: RunAllowance;
}

export function parseScenario(
  text: string,
  fileName: string,
  sets: readonly string[] = [],
  options: ParseOptions = {},
): ParsedScenario {
  const parsed = parseScenarioText(text, fileName);
  if (!parsed.ok) throw lineError(parsed.errors);
  let scenario: Scenario;
  if (sets.length === 0) {
    const r = validateScenario(parsed.json, { file: fileName, locations: parsed.locations });
    if (!r.ok) throw lineError(r.errors);
    scenario = r.scenario;
  } else {
    const r = applyOverrides(parsed.json, sets);
    if (!r.ok) throw lineError(r.errors.map((i) => locate(i, fileName, parsed.locations)));
    scenario = r.scenario;
  }
  let resolved: ResolvedScenario;
  try {
    resolved = resolveScenario(scenario);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${fileName}: ${e.message}`);
    throw e;
  }
  // A run that cannot run, or one above the caps that was not asked for, stops here, before
  // anything is read or built.
  const refusal = scenarioRunRefusal(resolved, options.allow);
  if (refusal) throw new InputError(refusal, `${fileName}: time`);
  return { fileName, scenario, resolved, scenarioJson: JSON.stringify(scenario, null, 2) };
}

class ScenarioLinesError extends ScenarioError {
  constructor(issues: ScenarioIssue[]) {
    super(issues);
    // One line per issue, no summary line in front: the first line alone says what is wrong.
    this.message = issueListLines(issues).join('\n');
  }
}

function lineError(issues: ScenarioIssue[]): ScenarioError {
  return new ScenarioLinesError(issues);
}

function locate(i: ScenarioIssue, file: string, locations: Map<string, TextPosition>): ScenarioIssue {
  const out: ScenarioIssue = { ...i, file };
  let p = i.path;
  // The value set may not be in the text; its nearest ancestor that is gives the line.
  for (;;) {
    const hit = locations.get(p);
    if (hit) {
      out.line = hit.line;
      break;
    }
    if (p === '') break;
    const cut = Math.max(p.lastIndexOf('.'), p.lastIndexOf('['));
    p = cut > 0 ? p.slice(0, cut) : '';
  }
  return out;
}

/** A path relative to the directory of `fromFile` ('/'-separated; absolute paths are kept). */
export function resolveRelative(fromFile: string, path: string): string {
  if (path.startsWith('/') || /^[A-Za-z]:[\\/]/.test(path)) return normalise(path);
  const slash = Math.max(fromFile.lastIndexOf('/'), fromFile.lastIndexOf('\\'));
  const dir = slash >= 0 ? fromFile.slice(0, slash + 1) : '';
  return normalise(dir + path);
}

function normalise(p: string): string {
  const abs = p.startsWith('/');
  const out: string[] = [];
  for (const seg of p.replace(/\\/g, '/').split('/')) {
    if (seg === '' || seg === '.') continue;
    if (seg === '..' && out.length > 0 && out[out.length - 1] !== '..') out.pop();
    else out.push(seg);
  }
  return (abs ? '/' : '') + out.join('/');
}

export interface PreparedInputs {
  /** Wind file contents keyed by the path as written in the scenario. */
  files: Map<string, string | Uint8Array>;
  startState?: State;
  /** Time step of the run that produced startState, s (history is dropped if it differs). */
  startDt?: number;
  /** What was read or run, for the user. */
  notes: string[];
}

export interface LoadInputsOptions {
  /** Called while a spin-up runs: scenario file, model day, end day. */
  onSpinup?: (file: string, day: number, endDay: number) => void;
  /** Files of the spin-up chain so far (cycle detection). */
  chain?: readonly string[];
  /** Spin-ups above the cap on steps that the user asked for. */
  allow?: RunAllowance;
}

async function readInput(
  reader: InputReader,
  path: string,
  what: string,
  where: string,
  limit: ReadLimit,
): Promise<Uint8Array> {
  try {
    return await reader(path, limit);
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    throw new InputError(`cannot read ${what} ${path}: ${why}`, where);
  }
}

/** Read the wind files and the starting state the scenario asks for. */
export async function loadInputs(
  p: ParsedScenario,
  reader: InputReader,
  options: LoadInputsOptions = {},
): Promise<PreparedInputs> {
  const chain = [...(options.chain ?? []), p.fileName];
  const notes: string[] = [];
  const files = new Map<string, string | Uint8Array>();
  const parts = p.resolved.wind.parts;
  for (let k = 0; k < parts.length; k++) {
    const part = parts[k];
    if (part.kind !== 'fixed' || part.enabled === false || part.source.kind !== 'file' || files.has(part.source.path))
      continue;
    const src = part.source;
    const path = resolveRelative(p.fileName, src.path);
    const where = `${p.fileName}: wind.parts[${k}].source.path`;
    const bytes = await readInput(
      reader,
      path,
      'the wind file',
      where,
      src.format === 'csv' ? READ_LIMITS.csvWind : READ_LIMITS.netcdfInput,
    );
    files.set(src.path, src.format === 'csv' ? textOf(bytes, `the wind file ${path}`, where) : bytes);
    notes.push(`wind file ${src.path} (${bytes.length} bytes)`);
  }
  const init = p.resolved.initial;
  const grid = () => new Grid(p.resolved.model.basin, p.resolved.model.physics.earthRadius);
  if (init.kind === 'restart') {
    const path = resolveRelative(p.fileName, init.path);
    const bytes = await readInput(
      reader,
      path,
      'the restart file',
      `${p.fileName}: initial.path`,
      READ_LIMITS.netcdfInput,
    );
    let start: StartFile;
    try {
      start = readStartFile(bytes, grid(), path);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(e.message, `${p.fileName}: initial.path`);
      throw e;
    }
    notes.push(start.note);
    const differs = start.exact ? forcingDifference(start.scenarioJson, p.scenario) : null;
    if (differs)
      notes.push(
        `${path} was written by a run with other wind or seed (${differs}): the random bursts and the forcing are this scenario's, so the continuation is not the same run`,
      );
    return { files, startState: start.state, startDt: start.dt, notes };
  }
  if (init.kind === 'spinup') {
    const path = resolveRelative(p.fileName, init.scenario);
    if (chain.includes(path)) {
      throw new InputError(`spin-up cycle: ${[...chain, path].join(' -> ')}`, `${p.fileName}: initial.scenario`);
    }
    if (chain.length > MAX_SPINUP_DEPTH) {
      throw new InputError(
        `spin-ups nest more than ${MAX_SPINUP_DEPTH} deep: ${chain.join(' -> ')}`,
        `${p.fileName}: initial.scenario`,
      );
    }
    const where = `${p.fileName}: initial.scenario`;
    const bytes = await readInput(reader, path, 'the spin-up scenario', where, READ_LIMITS.scenario);
    const spin = parseScenario(textOf(bytes, `the spin-up scenario ${path}`, where), path, [], {
      allow: options.allow,
    });
    sameBasin(p, spin);
    const inner = await loadInputs(spin, reader, { ...options, chain });
    const days = init.days ?? spin.resolved.days;
    const built = buildPrepared(spin, inner);
    const model = built.model;
    const end = model.state.time + days * DAY;
    const total = model.stepsUntil(end);
    const refusal = spinupSizeRefusal(total, model.dt, days, options.allow);
    if (refusal) throw new InputError(refusal, `${p.fileName}: initial`);
    // Slices keep the progress callback alive on long spin-ups.
    const slice = Math.max(1, Math.round(total / 100));
    for (let done = 0; done < total; done += slice) {
      model.advance(Math.min(slice, total - done));
      options.onSpinup?.(path, model.day, end / DAY);
    }
    const state = model.state.clone();
    // The new experiment's clock (and its wind envelopes) starts at day 0.
    state.startNewRun();
    notes.push(...inner.notes, `spun up with ${path} for ${days} days (${total} steps)`);
    return { files, startState: state, startDt: model.dt, notes };
  }
  return { files, notes };
}

/**
 * How the forcing of the run that wrote a restart differs from this scenario's, or null when it
 * does not (or the restart recorded no readable scenario). The bursts are drawn up front from the
 * seed and the wind parts, so the same seed and wind rebuild exactly the same forcing.
 */
function forcingDifference(restartJson: string | undefined, now: Scenario): string | null {
  if (!restartJson) return null;
  let then: { seed?: unknown; wind?: unknown };
  try {
    then = JSON.parse(restartJson);
  } catch {
    return null;
  }
  if (then === null || typeof then !== 'object') return null;
  const out: string[] = [];
  if (String(then.seed) !== String(now.seed)) out.push(`seed ${String(then.seed)}, now ${String(now.seed)}`);
  if (JSON.stringify(then.wind) !== JSON.stringify(now.wind)) out.push('wind parts differ');
  return out.length ? out.join('; ') : null;
}

function sameBasin(p: ParsedScenario, spin: ParsedScenario): void {
  const a = p.resolved.model.basin;
  const b = spin.resolved.model.basin;
  for (const k of ['lonWest', 'lonEast', 'latSouth', 'latNorth', 'dLon', 'dLat'] as const) {
    if (a[k] !== b[k]) {
      throw new InputError(
        `the spin-up scenario ${spin.fileName} has basin ${k} = ${b[k]}, this scenario ${a[k]}; both must use the same basin and resolution`,
        `${p.fileName}: initial.scenario`,
      );
    }
  }
  if (JSON.stringify(a.land) !== JSON.stringify(b.land)) {
    throw new InputError(
      `the spin-up scenario ${spin.fileName} has different land; both must use the same basin`,
      `${p.fileName}: initial.scenario`,
    );
  }
}

/** buildModel with prepared inputs; multistep history is dropped when the time step changed. */
export function buildPrepared(p: ParsedScenario, inputs: PreparedInputs): BuiltRun {
  let built: BuiltRun;
  // buildModel takes a start state only for the kinds that need one; a given state wins.
  const kind = p.resolved.initial.kind;
  const resolved =
    inputs.startState && kind !== 'restart' && kind !== 'spinup'
      ? { ...p.resolved, initial: { kind: 'restart' as const, path: '(given state)' } }
      : p.resolved;
  try {
    built = buildModel(resolved, { files: inputs.files, startState: inputs.startState });
  } catch (e) {
    if (e instanceof InputError && !e.message.startsWith(p.fileName))
      throw new InputError(`${p.fileName}: ${e.message}`);
    // ForcingError and its kin (FormulaError): all bad input, not a failure of the program.
    if (e instanceof ForcingError) throw new InputError(`${p.fileName}: ${e.message}`);
    throw e;
  }
  if (inputs.startState && inputs.startDt !== built.model.dt) built.model.state.historyCount = 0;
  return built;
}

/** A reader over files the host already holds (the page's dropped files), keyed by resolved path. */
export function mapReader(files: ReadonlyMap<string, Uint8Array | string>): InputReader {
  return async (path, limit) => {
    const f = files.get(path);
    if (f === undefined) throw new Error('the file was not provided');
    const bytes = typeof f === 'string' ? new TextEncoder().encode(f) : f;
    const big = tooLarge(bytes.length, limit);
    if (big) throw new Error(big);
    return bytes;
  };
}

/** A text input's bytes as text by the one UTF-8 rule (model/io/text-decode.ts). */
function textOf(bytes: Uint8Array, what: string, where: string): string {
  try {
    return decodeUtf8Text(bytes);
  } catch (e) {
    if (e instanceof TextEncodingError) throw new InputError(`${what}: ${e.message}`, where);
    throw e;
  }
}
