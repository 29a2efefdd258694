// The program's modules import one another without cycles: every file of model/, worker/ and
// viewer/ can be read after the files it imports (type-only imports count too: a cycle of types
// is still two ideas that cannot be understood one before the other). A new cycle fails here and
// names its files.

import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, normalize, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOTS = ['model', 'worker', 'viewer'];
const IMPORT = /(?:^|\n)\s*(?:import|export)\s[^'"]*?from\s+['"](\.[^'"]+)['"]/g;

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? sources(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []));
}

/** Strongly connected groups of more than one file (Tarjan), each a cycle or a knot of them. */
function cycles(graph: Map<string, string[]>): string[][] {
  let next = 0;
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const out: string[][] = [];
  const visit = (v: string): void => {
    index.set(v, next);
    low.set(v, next++);
    stack.push(v);
    onStack.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!));
    }
    if (low.get(v) === index.get(v)) {
      const group: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        group.push(w);
      } while (w !== v);
      if (group.length > 1) out.push(group.sort());
    }
  };
  for (const v of graph.keys()) if (!index.has(v)) visit(v);
  return out;
}

describe('imports', () => {
  it('have no cycles in model/, worker/ and viewer/', () => {
    const files = ROOTS.flatMap(sources).map((f) => normalize(f));
    const known = new Set(files);
    const graph = new Map<string, string[]>();
    for (const f of files) {
      const deps: string[] = [];
      for (const m of readFileSync(f, 'utf8').matchAll(IMPORT)) {
        let target = normalize(join(dirname(f), m[1]));
        if (!target.endsWith('.ts')) target += '.ts';
        if (known.has(target)) deps.push(target);
      }
      graph.set(f, deps);
    }
    // The scan sees the imports (a check that it reads anything at all).
    expect([...graph.values()].reduce((n, d) => n + d.length, 0)).toBeGreaterThan(200);
    expect(cycles(graph).map((g) => g.map((f) => relative('.', f)))).toEqual([]);
  });
});
