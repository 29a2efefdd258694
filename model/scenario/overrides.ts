// --set path=value: change single values of a scenario from the command line or a script, e.g.
//   physics.reducedGravity=0.05   time.days=30   wind.parts[0].enabled=false   initial={"kind":"rest"}
// Values are read as JSON when they can be (numbers, true/false, null, "quoted", [..], {..}),
// otherwise as plain strings (nonlinear, auto). Paths are checked against the schema; the result
// is validated like a file.

import { pathToString, shortText, show, type PathSegment, type ScenarioIssue } from './errors.ts';
import {
  chooseBranch,
  deref,
  discriminatorKinds,
  hasOwn,
  isPlainObject,
  scenarioSchema,
  type SchemaNode,
} from './schema.ts';
import { closest } from './suggest.ts';
import type { Scenario } from './types.ts';
import { collectIssues } from './validate.ts';
import { withDefaults } from './defaults.ts';
import type { ScenarioFile } from './types.ts';

export interface Override {
  text: string;
  path: PathSegment[];
  value: unknown;
}

export type OverrideResult = { ok: true; json: unknown; scenario: Scenario } | { ok: false; errors: ScenarioIssue[] };

/** Apply the overrides in order to a copy of the scenario JSON and validate the result. */
export function applyOverrides(json: unknown, sets: readonly string[]): OverrideResult {
  const out: unknown = structuredClone(json);
  const errors: ScenarioIssue[] = [];
  const applied: Override[] = [];
  for (const text of sets) {
    const parsed = parseOverride(text);
    if ('issue' in parsed) {
      errors.push(parsed.issue);
      continue;
    }
    const issue = setAtPath(out, parsed);
    if (issue) errors.push(issue);
    else applied.push(parsed);
  }
  if (errors.length) return { ok: false, errors };
  const issues = collectIssues(out);
  if (issues.length) {
    // Say which --set produced a value at fault.
    return {
      ok: false,
      errors: issues.map((i) => {
        const src = applied.find((a) => {
          const p = pathToString(a.path);
          return i.path === p || i.path.startsWith(`${p}.`) || i.path.startsWith(`${p}[`);
        });
        return src ? { ...i, message: `${i.message} (from --set ${src.text})` } : i;
      }),
    };
  }
  return { ok: true, json: out, scenario: withDefaults(out as ScenarioFile) };
}

/** "a.b[2].c=value" -> path segments and a typed value. */
export function parseOverride(text: string): Override | { issue: ScenarioIssue } {
  const eq = text.indexOf('=');
  if (eq < 0)
    return {
      issue: { path: '', message: `--set ${show(text)}: expected path=value, e.g. physics.reducedGravity=0.05` },
    };
  const pathText = text.slice(0, eq).trim();
  const raw = text.slice(eq + 1);
  const path = parsePath(pathText);
  if (typeof path === 'string') return { issue: { path: pathText, message: `--set ${show(text)}: ${path}` } };
  if (raw.trim() === '') {
    return {
      issue: {
        path: pathText,
        message: `--set ${show(text)}: no value after =; write a number, true, false, null, a word, or "" for an empty string`,
      },
    };
  }
  const value = parseValue(raw.trim());
  if (typeof value === 'object' && value !== null && 'bad' in value) {
    return { issue: { path: pathText, message: `--set ${show(text)}: ${(value as { bad: string }).bad}` } };
  }
  return { text, path, value: (value as { ok: unknown }).ok };
}

function parsePath(text: string): PathSegment[] | string {
  if (text === '') return 'the path before = is empty';
  const segs: PathSegment[] = [];
  const re = /([^.[\]]+)|\[(\d+)\]|(\.)/gy;
  let expectKey = true;
  let last = 0;
  for (let m = re.exec(text); m !== null; m = re.exec(text)) {
    if (m[1] !== undefined) {
      if (!expectKey) return `a "." is missing before '${m[1]}'`;
      segs.push(m[1]);
      expectKey = false;
    } else if (m[2] !== undefined) {
      if (expectKey) return `an index [${m[2]}] must follow a key`;
      segs.push(Number(m[2]));
    } else {
      if (expectKey) return `the path ${show(text)} has an empty key`;
      expectKey = true;
    }
    last = re.lastIndex;
  }
  if (last !== text.length)
    return `bad path ${show(text)} near '${text.slice(last)}'; write keys with dots and list indices in brackets, e.g. wind.parts[0].enabled`;
  if (expectKey) return `the path ${show(text)} ends with "."`;
  return segs;
}

function parseValue(raw: string): { ok: unknown } | { bad: string } {
  try {
    return { ok: JSON.parse(raw) };
  } catch (e) {
    // A value that looks like JSON but is not is a mistake, not a string.
    if (/^[[{"]/.test(raw) || /^[-+.]?\d/.test(raw)) {
      return {
        bad: `the value ${show(raw)} is not valid JSON (${(e as Error).message}); numbers like 0.05 or 1e-3, strings in double quotes`,
      };
    }
    return { ok: raw };
  }
}

/** Set a value, checking each key against the schema; creates missing objects on the way. */
function setAtPath(root: unknown, o: Override): ScenarioIssue | null {
  let node: SchemaNode = scenarioSchema;
  let container: any = root;
  const done: PathSegment[] = [];
  const fail = (message: string): ScenarioIssue => ({
    path: pathToString(o.path),
    message: `--set ${show(o.text)}: ${message}`,
  });
  for (let k = 0; k < o.path.length; k++) {
    const seg = o.path[k];
    const last = k === o.path.length - 1;
    node = branchFor(deref(node), container);
    let child: SchemaNode | undefined;
    if (typeof seg === 'string') {
      const props = allProperties(node);
      if (!props || !isPlainObject(container)) {
        return fail(
          `${pathToString(done) || 'the top level'} holds ${props ? 'no object' : 'a single value'}, so it has no key '${seg}'`,
        );
      }
      if (!hasOwn(props, seg)) {
        const keys = Object.keys(props);
        const near = seg.length <= 200 ? closest(seg, keys) : [];
        const where = done.length ? `in ${shortText(pathToString(done), 200)}` : 'at the top level';
        return fail(
          `unknown key '${shortText(seg)}' ${where}${near.length ? `; did you mean ${near.map((n) => `'${n}'`).join(' or ')}?` : ''} (keys: ${keys.join(', ')})`,
        );
      }
      child = props[seg];
    } else {
      if (!Array.isArray(container)) return fail(`${pathToString(done)} is not a list, so [${seg}] does not apply`);
      if (seg >= container.length) {
        return fail(
          `${pathToString(done)} has ${container.length} entr${container.length === 1 ? 'y' : 'ies'}; index ${seg} is out of range (0..${container.length - 1})`,
        );
      }
      child = Array.isArray(node.prefixItems) ? node.prefixItems[seg] : node.items;
    }
    if (!child) return fail(`nothing can be set at ${pathToString([...done, seg])}`);
    done.push(seg);
    if (last) {
      (container as any)[seg] = structuredClone(o.value);
      return null;
    }
    let next = (container as any)[seg];
    if (next === undefined || next === null) {
      next = emptyFor(deref(child), o.path[k + 1]);
      (container as any)[seg] = next;
    }
    container = next;
    node = child;
  }
  return null;
}

/** For a oneOf, the branch the current value is (or, while unknown, all branches merged). */
function branchFor(node: SchemaNode, value: unknown): SchemaNode {
  if (!Array.isArray(node.oneOf)) return node;
  const i = chooseBranch(node.oneOf, value);
  if (i !== null) return branchFor(deref(node.oneOf[i]), value);
  const objects = node.oneOf.map(deref).filter((b: SchemaNode) => isPlainObject(b.properties));
  if (objects.length === 0) return node;
  return { type: 'object', properties: Object.assign({}, ...objects.map((b: SchemaNode) => b.properties)) };
}

function allProperties(node: SchemaNode): Record<string, SchemaNode> | null {
  return isPlainObject(node.properties) ? (node.properties as Record<string, SchemaNode>) : null;
}

/** A new container for a missing section; for a "kind" union, preset the kind that has the next key. */
function emptyFor(node: SchemaNode, nextSeg: PathSegment): unknown {
  if (Array.isArray(node.oneOf)) {
    const kinds = discriminatorKinds(node.oneOf);
    if (kinds && typeof nextSeg === 'string' && nextSeg !== 'kind') {
      const having = node.oneOf
        .map(deref)
        .map((b: SchemaNode, i: number) => (hasOwn(b.properties ?? {}, nextSeg) ? kinds[i] : null))
        .filter(Boolean);
      if (having.length === 1) return { kind: having[0] };
    }
    return {};
  }
  return typeof nextSeg === 'number' ? [] : {};
}
