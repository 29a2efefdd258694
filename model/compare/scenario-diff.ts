// The table of scenario differences: every value that differs between two scenarios, as a flat
// list of JSON paths. Arrays are compared index by index, so wind part 2 of A is set against wind
// part 2 of B; a part of another kind shows as a difference of its 'kind' and of its contents.

export interface ScenarioDifference {
  /** JSON path, e.g. "physics.frictionDays" or "wind.parts[0].envelope.duration". */
  path: string;
  /** The values; undefined where one scenario does not have the key. */
  a: unknown;
  b: unknown;
  /** For values inside a wind part: which part, e.g. "wind part 1 (fixed 'westerly burst')". */
  part?: string;
}

/** Keys that do not change a run and are left out of the table. */
const IGNORED = new Set(['$schema']);

function isObject(x: unknown): x is Record<string, unknown> {
  return x !== null && typeof x === 'object' && !Array.isArray(x);
}

function keyPath(base: string, key: string): string {
  const plain = /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key);
  if (!base) return plain ? key : `[${JSON.stringify(key)}]`;
  return plain ? `${base}.${key}` : `${base}[${JSON.stringify(key)}]`;
}

function same(a: unknown, b: unknown): boolean {
  return a === b || (typeof a === 'number' && typeof b === 'number' && Number.isNaN(a) && Number.isNaN(b));
}

function partLabel(index: number, a: unknown, b: unknown): string {
  const one = (p: unknown) => {
    if (!isObject(p)) return 'none';
    return `${String(p.kind ?? '?')}${typeof p.name === 'string' ? ` '${p.name}'` : ''}`;
  };
  const la = one(a);
  const lb = one(b);
  return `wind part ${index + 1} (${la === lb ? la : `${la} / ${lb}`})`;
}

function walk(a: unknown, b: unknown, path: string, out: ScenarioDifference[], part?: string): void {
  if (Array.isArray(a) && Array.isArray(b)) {
    const n = Math.max(a.length, b.length);
    for (let k = 0; k < n; k++) {
      const p = `${path}[${k}]`;
      const label = path === 'wind.parts' ? partLabel(k, a[k], b[k]) : part;
      walk(a[k], b[k], p, out, label);
    }
    return;
  }
  if (isObject(a) && isObject(b)) {
    const keys = [...Object.keys(a), ...Object.keys(b).filter((k) => !(k in a))];
    for (const k of keys) {
      if (!path && IGNORED.has(k)) continue;
      walk(a[k], b[k], keyPath(path, k), out, part);
    }
    return;
  }
  // A leaf, or a value that is an object on one side only: one row.
  if (!same(a, b)) out.push(part ? { path, a, b, part } : { path, a, b });
}

/** Every differing value of two scenarios (parsed JSON), in A's key order. */
export function diffScenarios(a: unknown, b: unknown): ScenarioDifference[] {
  const out: ScenarioDifference[] = [];
  walk(a, b, '', out);
  return out;
}

/** A value as the table shows it: JSON, with "(none)" for a missing key. */
export function showValue(x: unknown, maxLength = 60): string {
  if (x === undefined) return '(none)';
  const s = typeof x === 'string' ? JSON.stringify(x) : (JSON.stringify(x) ?? String(x));
  return s.length > maxLength ? `${s.slice(0, maxLength - 3)}...` : s;
}
