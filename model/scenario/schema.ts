// The scenario JSON Schema and the few ways of walking it that messages, defaults and --set need.
// Only local references ("#/$defs/...") are used, so a reference is a plain lookup.

import schemaJson from '../../configs/scenario.schema.json' with { type: 'json' };

/** A JSON Schema node, loosely typed: the file is ours and checked by the tests. */
export type SchemaNode = { [keyword: string]: any };

export const scenarioSchema: SchemaNode = schemaJson as SchemaNode;

export function hasOwn(o: object, key: string): boolean {
  return Object.hasOwn(o, key);
}

export function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Follow a node's $ref (repeatedly); a description beside the $ref wins over the target's. */
export function deref(node: SchemaNode): SchemaNode {
  let cur = node;
  let description: string | undefined = node.description;
  for (let guard = 0; typeof cur.$ref === 'string' && guard < 20; guard++) {
    cur = lookupRef(cur.$ref);
    description ??= cur.description;
  }
  return description !== undefined && cur.description !== description ? { ...cur, description } : cur;
}

function lookupRef(ref: string): SchemaNode {
  if (!ref.startsWith('#/')) throw new Error(`scenario schema: only local references are supported (${ref})`);
  let cur: any = scenarioSchema;
  for (const seg of ref.slice(2).split('/')) cur = cur?.[decodeSegment(seg)];
  if (!cur || typeof cur !== 'object') throw new Error(`scenario schema: dangling reference ${ref}`);
  return cur;
}

export function decodeSegment(seg: string): string {
  return decodeURIComponent(seg).replace(/~1/g, '/').replace(/~0/g, '~');
}

/** The segments of a "#/a/b/0" pointer as the validator writes them. */
export function pointerSegments(pointer: string): string[] {
  const body = pointer.startsWith('#') ? pointer.slice(1) : pointer;
  return body === '' ? [] : body.slice(1).split('/').map(decodeSegment);
}

/**
 * The schema node a validator keywordLocation points into (without the final keyword), with
 * the description that applies there (the one beside a $ref wins).
 */
export function nodeAtKeywordLocation(location: string): SchemaNode | undefined {
  const segs = pointerSegments(location);
  let cur: any = scenarioSchema;
  let description: string | undefined = cur.description;
  for (const seg of segs) {
    if (cur === undefined) return undefined;
    if (seg === '$ref') {
      const target = lookupRef(cur.$ref);
      if (cur.description === undefined) description = target.description;
      cur = target;
    } else {
      cur = cur[seg];
      if (cur && typeof cur === 'object' && !Array.isArray(cur)) description = cur.description;
    }
  }
  if (!cur || typeof cur !== 'object') return undefined;
  return Array.isArray(cur) ? cur : description !== cur.description ? { ...cur, description } : cur;
}

/** If every branch fixes a "kind" constant, the list of kinds; else null. */
export function discriminatorKinds(branches: SchemaNode[]): string[] | null {
  const kinds: string[] = [];
  for (const b of branches.map(deref)) {
    const k = b.properties?.kind?.const;
    if (typeof k !== 'string') return null;
    kinds.push(k);
  }
  return kinds;
}

/** JSON types a node accepts ("number" also covers integers). */
export function acceptedTypes(node: SchemaNode): string[] {
  const n = deref(node);
  if (n.type !== undefined) return Array.isArray(n.type) ? n.type : [n.type];
  if (hasOwn(n, 'const')) return [jsonKind(n.const)];
  if (Array.isArray(n.enum)) return [...new Set(n.enum.map(jsonKind))];
  if (Array.isArray(n.oneOf)) return [...new Set(n.oneOf.flatMap((b: SchemaNode) => acceptedTypes(b)))];
  return ['string', 'number', 'integer', 'boolean', 'null', 'object', 'array'];
}

function jsonKind(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'array';
  return typeof v;
}

export function typeAccepts(types: string[], value: unknown): boolean {
  const k = jsonKind(value);
  if (k === 'number') return types.includes('number') || (types.includes('integer') && Number.isInteger(value));
  return types.includes(k);
}

/**
 * The branch of a oneOf that applies to a value: by "kind" when the branches are discriminated,
 * else by JSON type. null when none applies.
 */
export function chooseBranch(branches: SchemaNode[], value: unknown): number | null {
  const kinds = discriminatorKinds(branches);
  if (kinds) {
    if (!isPlainObject(value) || typeof value.kind !== 'string') return null;
    const i = kinds.indexOf(value.kind);
    return i >= 0 ? i : null;
  }
  const matching = branches.map((b, i) => (typeAccepts(acceptedTypes(b), value) ? i : -1)).filter((i) => i >= 0);
  return matching.length >= 1 ? matching[0] : null;
}

/** A few words for what a node accepts: "a number", "the string \"auto\"", "an object {lon, lat}". */
export function describeAccepted(node: SchemaNode): string {
  const n = deref(node);
  if (hasOwn(n, 'const'))
    return typeof n.const === 'string' ? `the string ${JSON.stringify(n.const)}` : JSON.stringify(n.const);
  if (Array.isArray(n.enum)) return `one of ${n.enum.map((v: unknown) => JSON.stringify(v)).join(', ')}`;
  const types = acceptedTypes(n);
  return types
    .map((t) => {
      if (t === 'object' && isPlainObject(n.properties)) return `an object {${Object.keys(n.properties).join(', ')}}`;
      if (t === 'integer') return 'a whole number';
      if (t === 'array') return 'a list [...]';
      if (t === 'object') return 'an object';
      if (t === 'null') return 'null';
      return `a ${t}`;
    })
    .join(' or ');
}

/** Words that keep their capital when a description is quoted inside a message. */
const PROPER_WORDS = new Set([
  'Gaussian',
  'Kelvin',
  'Rossby',
  'Coriolis',
  'Rayleigh',
  'Laplacian',
  'Hovmoller',
  'Poisson',
  'Large',
]);

/** The first clause of a description, made to follow a "; " in a message. */
export function hintOf(description: unknown): string {
  if (typeof description !== 'string' || description === '') return '';
  let depth = 0;
  let end = description.length;
  for (let k = 0; k < description.length; k++) {
    const ch = description[k];
    if (ch === '(') depth++;
    else if (ch === ')') depth = Math.max(0, depth - 1);
    else if (
      depth === 0 &&
      (ch === ';' || ch === '.') &&
      (description[k + 1] === ' ' || k === description.length - 1)
    ) {
      end = k;
      break;
    }
  }
  const clause = description.slice(0, end).trim();
  const first = /^[A-Za-z]+/.exec(clause)?.[0] ?? '';
  return /^[A-Z][a-z]/.test(clause) && !PROPER_WORDS.has(first) ? clause[0].toLowerCase() + clause.slice(1) : clause;
}
