// validateScenario: schema first (every mistake at once, one line each), then the semantic checks.

import { Validator } from '@cfworker/json-schema';
import { formatIssue, jsonType, show, ScenarioError, type ScenarioIssue } from './errors.ts';
import { withDefaults } from './defaults.ts';
import { issuesFromValidator } from './messages.ts';
import { MAX_NESTING, parseScenarioText, type TextPosition } from './parse.ts';
import { pathToString, type PathSegment } from './errors.ts';
import { isPlainObject, scenarioSchema } from './schema.ts';
import { semanticIssues } from './semantic.ts';
import { SCENARIO_FORMAT, type Scenario, type ScenarioFile } from './types.ts';

export type ValidationResult = { ok: true; scenario: Scenario } | { ok: false; errors: ScenarioIssue[] };

export interface ValidateOptions {
  /** File name to put in front of messages. */
  file?: string;
  /** Where each JSON path sits in the text (from parseScenarioText), for line numbers. */
  locations?: Map<string, TextPosition>;
}

let validator: Validator | null = null;

export function validateScenario(json: unknown, options: ValidateOptions = {}): ValidationResult {
  const errors = collectIssues(json);
  if (errors.length) return { ok: false, errors: decorate(errors, options) };
  return { ok: true, scenario: withDefaults(json as ScenarioFile) };
}

/** Parse and validate the text of a scenario file; messages carry the file name and line. */
export function validateScenarioText(text: string, fileName?: string): ValidationResult {
  const parsed = parseScenarioText(text, fileName);
  if (!parsed.ok) return parsed;
  const opts: ValidateOptions = { locations: parsed.locations };
  if (fileName !== undefined) opts.file = fileName;
  return validateScenario(parsed.json, opts);
}

/** The same, throwing a ScenarioError (an InputError) that lists every issue. */
export function loadScenario(text: string, fileName?: string): Scenario {
  const r = validateScenarioText(text, fileName);
  if (!r.ok) throw new ScenarioError(r.errors);
  return r.scenario;
}

/** Issues without file decoration; an empty list means valid. */
export function collectIssues(json: unknown): ScenarioIssue[] {
  if (!isPlainObject(json)) {
    return [{ path: '', message: `a scenario is a JSON object { "format": "${SCENARIO_FORMAT}", ... } (got ${jsonType(json)} ${show(json)})` }];
  }
  const issues: ScenarioIssue[] = [];
  if (!('format' in json)) {
    issues.push({ path: 'format', message: `is required but missing: start the file with "format": "${SCENARIO_FORMAT}"` });
  } else if (json.format !== SCENARIO_FORMAT) {
    // Another version's keys may mean other things: do not guess, stop here.
    const hint = typeof json.format === 'string' && json.format.startsWith('pycno-scenario/') ? 'written for another version of the program' : 'not a scenario format';
    return [{ path: 'format', message: `unknown format ${show(json.format)} (${hint}); this program reads "${SCENARIO_FORMAT}"` }];
  }
  // The schema validator and the walks after it recurse and collect one error per bad item: sizes
  // they cannot take (deep nesting, a hundred thousand wrong items) are refused first.
  const shape = shapeIssues(json);
  if (shape.length) return shape;
  validator ??= new Validator(scenarioSchema as never, '2020-12', false);
  const result = validator.validate(json);
  if (!result.valid) {
    const schemaIssues = issuesFromValidator(result.errors, json).filter((i) => i.path !== 'format');
    issues.push(...schemaIssues);
  }
  // Semantic checks on top, skipping values the schema already found at fault.
  const filled = structuredClone(json);
  const sc = withDefaults(filled as unknown as ScenarioFile);
  const covered = (path: string) => issues.some((i) => i.path !== '' && (path === i.path || path.startsWith(`${i.path}.`) || path.startsWith(`${i.path}[`) || i.path.startsWith(`${path}.`) || i.path.startsWith(`${path}[`)));
  for (const s of semanticIssues(sc)) if (!covered(s.path)) issues.push(s);
  return issues;
}

/** Longest list anywhere but in the data of a painted grid (x and y), which may be long. */
export const MAX_LIST_ITEMS = 10_000;

/** Nesting and list lengths, checked without recursion, so any value at all can be checked. */
function shapeIssues(json: unknown): ScenarioIssue[] {
  const stack: Array<{ v: unknown; path: PathSegment[] }> = [{ v: json, path: [] }];
  while (stack.length) {
    const { v, path } = stack.pop()!;
    if (v === null || typeof v !== 'object') continue;
    if (path.length >= MAX_NESTING) {
      return [{ path: pathToString(path), message: `nested deeper than ${MAX_NESTING} levels; a scenario needs only a few` }];
    }
    if (Array.isArray(v)) {
      const gridData = path.length >= 2 && path[path.length - 2] === 'grid' && (path[path.length - 1] === 'x' || path[path.length - 1] === 'y');
      if (gridData) {
        const bad = v.findIndex((x) => typeof x !== 'number');
        if (bad >= 0) return [{ path: pathToString([...path, bad]), message: `must be a number (got ${jsonType(v[bad])} ${show(v[bad])}); a painted grid holds numbers only` }];
        continue;
      }
      if (v.length > MAX_LIST_ITEMS) {
        return [{ path: pathToString(path), message: `holds ${v.length} items; at most ${MAX_LIST_ITEMS} (only a painted grid's x and y may be longer)` }];
      }
      for (let k = 0; k < v.length; k++) stack.push({ v: v[k], path: [...path, k] });
    } else {
      for (const key of Object.keys(v)) stack.push({ v: (v as Record<string, unknown>)[key], path: [...path, key] });
    }
  }
  return [];
}

function decorate(issues: ScenarioIssue[], options: ValidateOptions): ScenarioIssue[] {
  const out = issues.map((i) => {
    const d: ScenarioIssue = { ...i };
    if (options.file !== undefined) d.file = options.file;
    const where = options.locations ? nearestLocation(options.locations, i.path) : undefined;
    if (where) d.line = where.line;
    return d;
  });
  if (options.locations) out.sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
  return out;
}

/** The text position of a path, or of its nearest ancestor that exists in the text. */
function nearestLocation(locations: Map<string, TextPosition>, path: string): TextPosition | undefined {
  let p = path;
  for (;;) {
    const hit = locations.get(p);
    if (hit) return hit;
    if (p === '') return undefined;
    const cut = Math.max(p.lastIndexOf('.'), p.lastIndexOf('['));
    p = cut > 0 ? p.slice(0, cut) : '';
  }
}

export { formatIssue };
