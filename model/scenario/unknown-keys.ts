// Unknown keys, found by walking the scenario beside its schema before the schema validator runs.
//
// The validator reports an unknown key as two errors and carries every error of a subtree up
// through one spread call per level; a file of a hundred thousand unknown keys is therefore the
// costliest input it can get (and one of a few hundred thousand overflows the host's stack). Here
// each object is looked at once: its keys against the properties its schema node allows (the
// branch of a oneOf chosen by "kind" or by JSON type, as messages.ts chooses it), one issue per
// unknown key, and a copy without them goes to the validator. Only the first MAX_SUGGESTIONS
// unknown keys get a "did you mean ...?", the one costly part (an edit distance to every allowed
// key). Where no branch applies the object is left as it is: the validator says why.

import { pathToString, shortText, type PathSegment, type ScenarioIssue } from './errors.ts';
import { chooseBranch, deref, hasOwn, isPlainObject, scenarioSchema, type SchemaNode } from './schema.ts';
import { didYouMean } from './suggest.ts';

/** Unknown keys that get a "did you mean ...?"; the first ones are enough to show the mistake. */
export const MAX_SUGGESTIONS = 20;

/** A budget of suggestions shared by every object of one validation. */
export interface SuggestionBudget {
  left: number;
}

/**
 * The line for an unknown key (the same wherever it is found). The first ones, while the budget
 * lasts, also say which key was probably meant and list the allowed keys; the rest (a hostile
 * file's thousands, of which only a count is shown) just name the key.
 */
export function unknownKeyIssue(
  segments: readonly PathSegment[],
  key: string,
  allowed: readonly string[],
  allowedText: string,
  budget: SuggestionBudget,
  parent = pathToString(segments),
): ScenarioIssue {
  const where = parent === '' ? 'at the top level' : `in ${shortText(parent, 200)}`;
  const path = parent === '' ? key : `${parent}.${key}`;
  const name = shortText(key);
  if (budget.left <= 0) return { path, message: `unknown key '${name}' ${where}` };
  budget.left--;
  return {
    path,
    message: `unknown key '${name}' ${where}${key.length <= 200 ? didYouMean(key, allowed) : ''} (allowed: ${allowedText})`,
  };
}

/** The schema node that applies to a value: $refs followed, the oneOf branch chosen; null when none applies. */
function nodeFor(node: SchemaNode, value: unknown): SchemaNode | null {
  let n = deref(node);
  for (let guard = 0; Array.isArray(n.oneOf) && guard < 10; guard++) {
    const i = chooseBranch(n.oneOf, value);
    if (i === null) return null;
    n = deref(n.oneOf[i]);
  }
  return n;
}

/**
 * The scenario without its unknown keys, and one issue per unknown key. The input is not
 * changed; objects and lists are copied on the way (the walk is as deep as the nesting, which
 * the shape check has bounded).
 */
export function pruneUnknownKeys(
  json: unknown,
  budget: SuggestionBudget = { left: MAX_SUGGESTIONS },
): { pruned: unknown; issues: ScenarioIssue[] } {
  const issues: ScenarioIssue[] = [];
  const allowedOf = new Map<SchemaNode, { list: string[]; set: Set<string>; text: string }>();
  const walk = (value: unknown, node: SchemaNode | undefined, segments: PathSegment[]): unknown => {
    if (value === null || typeof value !== 'object') return value;
    const n = node ? nodeFor(node, value) : null;
    if (Array.isArray(value)) {
      // Lists of numbers (a painted grid's data, table points) hold no keys: kept as they are.
      if (!value.some((v) => v !== null && typeof v === 'object')) return value;
      const items = n?.items;
      const prefix: SchemaNode[] | undefined = Array.isArray(n?.prefixItems) ? n!.prefixItems : undefined;
      return value.map((v, k) =>
        walk(v, prefix ? prefix[k] : isPlainObject(items) ? items : undefined, [...segments, k]),
      );
    }
    const obj = value as Record<string, unknown>;
    const props = n && isPlainObject(n.properties) ? (n.properties as Record<string, SchemaNode>) : null;
    const closed = n !== null && n.additionalProperties === false && props !== null;
    let allowed = n ? allowedOf.get(n) : undefined;
    if (closed && !allowed) {
      const list = Object.keys(props!);
      allowed = { list, set: new Set(list), text: list.join(', ') };
      allowedOf.set(n!, allowed);
    }
    const out: Record<string, unknown> = {};
    let parent: string | undefined;
    for (const key of Object.keys(obj)) {
      if (closed && !allowed!.set.has(key)) {
        parent ??= pathToString(segments);
        issues.push(unknownKeyIssue(segments, key, allowed!.list, allowed!.text, budget, parent));
        continue;
      }
      const child = props && hasOwn(props, key) ? props[key] : undefined;
      // Keys such as "__proto__" stay plain properties of the copy.
      Object.defineProperty(out, key, {
        value: walk(obj[key], child, [...segments, key]),
        enumerable: true,
        writable: true,
        configurable: true,
      });
    }
    return out;
  };
  const pruned = walk(json, scenarioSchema, []);
  return { pruned, issues };
}
