// validateScenario: schema first (every mistake at once, one line each), then the semantic checks.

import { Validator, type OutputUnit } from '@cfworker/json-schema';
import { formatIssue, jsonType, show, ScenarioError, type ScenarioIssue } from './errors.ts';
import { withDefaults } from './defaults.ts';
import { issuesFromValidator } from './messages.ts';
import { MAX_NESTING, parseScenarioText, type TextPosition } from './parse.ts';
import { pathToString, type PathSegment } from './errors.ts';
import { isPlainObject, scenarioSchema } from './schema.ts';
import { semanticIssues } from './semantic.ts';
import { pruneUnknownKeys } from './unknown-keys.ts';
import { SCENARIO_FORMAT, type Scenario, type ScenarioFile } from './types.ts';

export type ValidationResult = { ok: true; scenario: Scenario } | { ok: false; errors: ScenarioIssue[] };

export interface ValidateOptions {
  /** File name to put in front of messages. */
  file?: string;
  /** Where each JSON path sits in the text (from parseScenarioText), for line numbers. */
  locations?: Map<string, TextPosition>;
}

let validator: Validator | null = null;
let firstOnly: Validator | null = null;

/**
 * The schema validator's errors: every one, or, when there are so many that the validator itself
 * cannot hold them (it spreads each subtree's errors into one call, which a host's stack limits
 * to about a hundred thousand: a few thousand list items each wrong in many ways), the first of
 * each part (its short-circuit mode), marked incomplete.
 */
function schemaErrors(json: unknown): { valid: boolean; errors: OutputUnit[]; complete: boolean } {
  validator ??= new Validator(scenarioSchema as never, '2020-12', false);
  try {
    const r = validator.validate(json);
    return { valid: r.valid, errors: r.errors, complete: true };
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
  }
  firstOnly ??= new Validator(scenarioSchema as never, '2020-12', true);
  const r = firstOnly.validate(json);
  return { valid: r.valid, errors: r.errors, complete: false };
}

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
    return [
      {
        path: '',
        message: `a scenario is a JSON object { "format": "${SCENARIO_FORMAT}", ... } (got ${jsonType(json)} ${show(json)})`,
      },
    ];
  }
  const issues: ScenarioIssue[] = [];
  if (!('format' in json)) {
    issues.push({
      path: 'format',
      message: `is required but missing: start the file with "format": "${SCENARIO_FORMAT}"`,
    });
  } else if (json.format !== SCENARIO_FORMAT) {
    // Another version's keys may mean other things: do not guess, stop here.
    const hint =
      typeof json.format === 'string' && json.format.startsWith('pycno-scenario/')
        ? 'written for another version of the program'
        : 'not a scenario format';
    return [
      {
        path: 'format',
        message: `unknown format ${show(json.format)} (${hint}); this program reads "${SCENARIO_FORMAT}"`,
      },
    ];
  }
  // The schema validator and the walks after it recurse and collect one error per bad item: sizes
  // they cannot take (deep nesting, a hundred thousand wrong items) are refused first.
  const shape = shapeIssues(json);
  if (shape.length) return shape;
  // Unknown keys first, in one walk; the validator checks the rest without them (unknown-keys.ts).
  const { pruned, issues: unknown } = pruneUnknownKeys(json);
  for (const i of unknown) issues.push(i);
  const result = schemaErrors(pruned);
  if (!result.valid) {
    // One by one: a spread of a hundred thousand issues into push() overflows the call stack.
    for (const i of issuesFromValidator(result.errors, pruned)) if (i.path !== 'format') issues.push(i);
  }
  if (!result.complete) {
    issues.push({
      path: '',
      summary: true,
      message:
        '... and more: so many values are wrong that the schema check stopped at the first problem in each part; fix these and check again',
    });
    return issues;
  }
  // Semantic checks on top, skipping values the schema already found at fault: a path is covered
  // when it, one of its ancestors or one of its descendants has an issue (sets, so the check is
  // linear in the number of issues).
  const sc = withDefaults(pruned as ScenarioFile); // a copy, without the unknown keys
  // (A semantic issue covers the ones after it too: one message per value.)
  const atFault = new Set<string>();
  const aboveFault = new Set<string>();
  const mark = (i: ScenarioIssue) => {
    if (i.path === '') return;
    atFault.add(i.path);
    for (const a of ancestors(i.path)) aboveFault.add(a);
  };
  issues.forEach(mark);
  const covered = (path: string) =>
    atFault.has(path) || aboveFault.has(path) || ancestors(path).some((a) => atFault.has(a));
  for (const s of semanticIssues(sc)) {
    if (covered(s.path)) continue;
    issues.push(s);
    mark(s);
  }
  return issues;
}

/** "a.b[2].c" -> ["a.b[2]", "a.b", "a"]. */
function ancestors(path: string): string[] {
  const out: string[] = [];
  for (let p = path; ; ) {
    const cut = Math.max(p.lastIndexOf('.'), p.lastIndexOf('['));
    if (cut <= 0) return out;
    p = p.slice(0, cut);
    out.push(p);
  }
}

/** Longest list anywhere but in the data of a painted grid (x and y), which may be long. */
export const MAX_LIST_ITEMS = 10_000;
/**
 * Longest list of objects (wind parts, land shapes, probes). The schema validator takes about
 * 0.15 ms per wind part, so ten thousand would take over a second to check even when valid;
 * a scenario has a few dozen.
 */
export const MAX_OBJECT_ITEMS = 1000;
/** Most keys in one object. A scenario's objects have at most a few dozen. */
export const MAX_KEYS = 10_000;

/** Nesting and list lengths, checked without recursion, so any value at all can be checked. */
function shapeIssues(json: unknown): ScenarioIssue[] {
  const stack: Array<{ v: unknown; path: PathSegment[] }> = [{ v: json, path: [] }];
  while (stack.length) {
    const { v, path } = stack.pop()!;
    if (v === null || typeof v !== 'object') continue;
    if (path.length >= MAX_NESTING) {
      return [
        { path: pathToString(path), message: `nested deeper than ${MAX_NESTING} levels; a scenario needs only a few` },
      ];
    }
    if (Array.isArray(v)) {
      const gridData =
        path.length >= 2 &&
        path[path.length - 2] === 'grid' &&
        (path[path.length - 1] === 'x' || path[path.length - 1] === 'y');
      if (gridData) {
        const bad = v.findIndex((x) => typeof x !== 'number');
        if (bad >= 0)
          return [
            {
              path: pathToString([...path, bad]),
              message: `must be a number (got ${jsonType(v[bad])} ${show(v[bad])}); a painted grid holds numbers only`,
            },
          ];
        continue;
      }
      if (v.length > MAX_LIST_ITEMS) {
        return [
          {
            path: pathToString(path),
            message: `holds ${v.length} items; at most ${MAX_LIST_ITEMS} (only a painted grid's x and y may be longer)`,
          },
        ];
      }
      if (v.length > MAX_OBJECT_ITEMS && v.some(isPlainObject)) {
        return [
          {
            path: pathToString(path),
            message: `holds ${v.length} items with objects among them; a list of objects (wind parts, land shapes, probes) holds at most ${MAX_OBJECT_ITEMS}`,
          },
        ];
      }
      for (let k = 0; k < v.length; k++) stack.push({ v: v[k], path: [...path, k] });
    } else {
      const keys = Object.keys(v);
      if (keys.length > MAX_KEYS) {
        return [
          {
            path: pathToString(path),
            message: `${path.length ? 'the object' : 'the top level'} holds ${keys.length.toLocaleString('en-US')} keys; at most ${MAX_KEYS.toLocaleString('en-US')} (a scenario's objects have a few dozen)`,
          },
        ];
      }
      for (const key of keys) stack.push({ v: (v as Record<string, unknown>)[key], path: [...path, key] });
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
  if (options.locations)
    out.sort((a, b) => Number(a.summary ?? false) - Number(b.summary ?? false) || (a.line ?? 0) - (b.line ?? 0));
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
