// Turns the raw output of the JSON Schema validator into one clear line per mistake.
//
// The validator reports every keyword that failed, including summaries ("a subschema had errors")
// and the failures of every oneOf branch that did not apply. We keep only the branch the value
// means (chosen by its "kind", or by its JSON type), drop the summaries, and phrase the rest.

import type { OutputUnit } from '@cfworker/json-schema';
import { jsonType, pathToString, show, type PathSegment, type ScenarioIssue } from './errors.ts';
import {
  chooseBranch,
  describeAccepted,
  deref,
  discriminatorKinds,
  hasOwn,
  hintOf,
  isPlainObject,
  nodeAtKeywordLocation,
  pointerSegments,
  type SchemaNode,
} from './schema.ts';
import { didYouMean } from './suggest.ts';
import { MAX_SUGGESTIONS, unknownKeyIssue, type SuggestionBudget } from './unknown-keys.ts';

/** Keywords that only summarise failures reported elsewhere. */
const SUMMARY_KEYWORDS = new Set([
  'properties',
  'items',
  'prefixItems',
  '$ref',
  'allOf',
  'anyOf',
  'false',
  'if',
  'then',
  'else',
  'contains',
]);

export { MAX_SUGGESTIONS } from './unknown-keys.ts';

export function issuesFromValidator(errors: readonly OutputUnit[], instance: unknown): ScenarioIssue[] {
  // Keyword locations of oneOf branches that do not apply; a location is dropped when it or one
  // of its ancestors is in the set (a walk up its own segments, not a scan of the set).
  const dropped = new Set<string>();
  const isDropped = (loc: string) => {
    for (let cut = loc.length; cut > 0; cut = loc.lastIndexOf('/', cut - 1))
      if (dropped.has(loc.slice(0, cut))) return true;
    return false;
  };
  const issues: ScenarioIssue[] = [];

  // oneOf first, outermost first, so that an inner oneOf of a dropped branch is ignored.
  const oneOfs = errors
    .filter((e) => e.keyword === 'oneOf')
    .sort((a, b) => a.keywordLocation.length - b.keywordLocation.length);
  for (const e of oneOfs) {
    if (isDropped(e.keywordLocation)) continue;
    const branches = nodeAtKeywordLocation(e.keywordLocation) as unknown as SchemaNode[] | undefined;
    if (!Array.isArray(branches)) continue;
    const parent = nodeAtKeywordLocation(e.keywordLocation.replace(/\/oneOf$/, '')) ?? {};
    const { segments, value } = instanceAt(instance, e.instanceLocation);
    let chosen = chooseBranch(branches, value);
    // A value of the right type that misses a lone constant ("auto") reads better as "number or 'auto'".
    if (chosen !== null && !discriminatorKinds(branches) && hasOwn(deref(branches[chosen]), 'const')) chosen = null;
    branches.forEach((_, i) => {
      if (i !== chosen) dropped.add(`${e.keywordLocation}/${i}`);
    });
    if (chosen === null) issues.push(noBranchIssue(branches, parent, segments, value));
  }

  // The validator reports an unknown key once per key; its object is phrased once, all its keys together.
  const objectsDone = new Set<string>();
  const budget: SuggestionBudget = { left: MAX_SUGGESTIONS };
  for (const e of errors) {
    if (e.keyword === 'oneOf' || SUMMARY_KEYWORDS.has(e.keyword) || isDropped(e.keywordLocation)) continue;
    if (e.keyword === 'additionalProperties') {
      const key = `${e.keywordLocation}\u0000${e.instanceLocation}`;
      if (objectsDone.has(key)) continue;
      objectsDone.add(key);
      for (const i of unknownKeys(e, instance, budget)) issues.push(i);
      continue;
    }
    for (const i of phrase(e, instance)) issues.push(i);
  }
  return dedupe(issues);
}

/** One issue per unknown key of the object an additionalProperties error is about. */
function unknownKeys(e: OutputUnit, instance: unknown, budget: SuggestionBudget): ScenarioIssue[] {
  const node = nodeAtKeywordLocation(e.keywordLocation.replace(/\/[^/]*$/, '')) ?? {};
  const { segments, value } = instanceAt(instance, e.instanceLocation);
  const allowedList = Object.keys(node.properties ?? {});
  const allowed = new Set(allowedList);
  const allowedText = allowedList.join(', ');
  if (!isPlainObject(value)) return [];
  return Object.keys(value)
    .filter((k) => !allowed.has(k))
    .map((k) => unknownKeyIssue(segments, k, allowedList, allowedText, budget));
}

function noBranchIssue(
  branches: SchemaNode[],
  parent: SchemaNode,
  segments: PathSegment[],
  value: unknown,
): ScenarioIssue {
  const kinds = discriminatorKinds(branches);
  const path = pathToString(segments);
  if (kinds) {
    const list = kinds.map((k) => `'${k}'`).join(', ');
    if (!isPlainObject(value)) {
      return {
        path,
        message: `must be an object with a "kind": one of ${list} (got ${jsonType(value)} ${show(value)})`,
      };
    }
    if (!hasOwn(value, 'kind'))
      return { path: pathToString([...segments, 'kind']), message: `is missing; say which kind: one of ${list}` };
    const k = value.kind;
    const near = typeof k === 'string' ? didYouMean(k, kinds) : '';
    return { path: pathToString([...segments, 'kind']), message: `unknown kind ${show(k)}; allowed: ${list}${near}` };
  }
  const what = branches.map(describeAccepted).join(', or ');
  const hint = hintOf(parent.description);
  return { path, message: `must be ${what} (got ${jsonType(value)} ${show(value)})${hint ? `; ${hint}` : ''}` };
}

function phrase(e: OutputUnit, instance: unknown): ScenarioIssue[] {
  const node = nodeAtKeywordLocation(e.keywordLocation.replace(/\/[^/]*$/, '')) ?? {};
  const { segments, value } = instanceAt(instance, e.instanceLocation);
  const path = pathToString(segments);
  const hint = hintOf(node.description);
  const withHint = (m: string) => ({ path, message: hint ? `${m}; ${hint}` : m });
  const got = `(got ${show(value)})`;

  switch (e.keyword) {
    case 'type': {
      const types: string[] = Array.isArray(node.type) ? node.type : [node.type];
      const words = types.map((t) =>
        t === 'integer'
          ? 'a whole number'
          : t === 'null'
            ? 'null'
            : t === 'array'
              ? 'a list'
              : t === 'object'
                ? 'an object'
                : `a ${t}`,
      );
      const exp = words.join(' or ');
      if (types.includes('integer') && typeof value === 'number') return [withHint(`must be a whole number ${got}`)];
      return [withHint(`must be ${exp} (got ${jsonType(value)} ${show(value)})`)];
    }
    case 'required': {
      const required: string[] = Array.isArray(node.required) ? node.required : [];
      const present = isPlainObject(value) ? value : {};
      return required
        .filter((k) => !hasOwn(present, k))
        .map((k) => {
          const sub = node.properties?.[k] ? deref(node.properties[k]) : {};
          const h = hintOf(sub.description);
          return { path: pathToString([...segments, k]), message: `is required but missing${h ? `; ${h}` : ''}` };
        });
    }
    case 'const':
      return [{ path, message: `must be ${show(node.const)} ${got}` }];
    case 'enum': {
      const options: unknown[] = node.enum ?? [];
      const near =
        typeof value === 'string'
          ? didYouMean(
              value,
              options.filter((o): o is string => typeof o === 'string'),
            )
          : '';
      return [{ path, message: `must be one of ${options.map(show).join(', ')} ${got}${near}` }];
    }
    case 'minimum':
      return [withHint(`must be >= ${node.minimum} ${got}`)];
    case 'exclusiveMinimum':
      return [withHint(`must be > ${node.exclusiveMinimum} ${got}`)];
    case 'maximum':
      return [withHint(`must be <= ${node.maximum} ${got}`)];
    case 'exclusiveMaximum':
      return [withHint(`must be < ${node.exclusiveMaximum} ${got}`)];
    case 'minItems':
    case 'maxItems': {
      const n = Array.isArray(value) ? value.length : 0;
      if (Array.isArray(node.prefixItems) && node.minItems === node.maxItems) {
        return [withHint(`must be a list of exactly ${node.minItems} numbers (got ${n})`)];
      }
      return e.keyword === 'minItems'
        ? [withHint(`must have at least ${node.minItems} entr${node.minItems === 1 ? 'y' : 'ies'} (got ${n})`)]
        : [withHint(`must have at most ${node.maxItems} entries (got ${n})`)];
    }
    case 'minLength':
      return [withHint(node.minLength === 1 ? 'must not be empty' : `must have at least ${node.minLength} characters`)];
    case 'maxLength':
      return [
        withHint(
          `must have at most ${node.maxLength} characters (got ${typeof value === 'string' ? value.length : '?'})`,
        ),
      ];
    case 'uniqueItems': {
      const list = Array.isArray(value) ? value.map((v) => JSON.stringify(v)) : [];
      const seen = new Set<string>();
      const twice = list.find((v) => seen.size === seen.add(v).size);
      return [{ path, message: `lists ${twice ?? 'an entry'} more than once` }];
    }
    default:
      return [{ path, message: e.error }];
  }
}

/** The value at a validator instanceLocation, and its path with array indices as numbers. */
function instanceAt(instance: unknown, location: string): { segments: PathSegment[]; value: unknown } {
  const segments: PathSegment[] = [];
  let cur: unknown = instance;
  for (const seg of pointerSegments(location)) {
    if (Array.isArray(cur)) {
      const i = Number(seg);
      segments.push(i);
      cur = cur[i];
    } else {
      segments.push(seg);
      cur = isPlainObject(cur) && hasOwn(cur, seg) ? cur[seg] : undefined;
    }
  }
  return { segments, value: cur };
}

function dedupe(issues: ScenarioIssue[]): ScenarioIssue[] {
  const seen = new Set<string>();
  return issues.filter((i) => {
    const key = `${i.path}\u0000${i.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}
