// The program's modules import one another without cycles: every file of model/, worker/ and
// viewer/ can be read after the files it imports (type-only imports count too: a cycle of types
// is still two ideas that cannot be understood one before the other). A new cycle fails here and
// names its files.

import { relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { importGraph } from '../support/import-graph.ts';

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
    const full = importGraph();
    const graph = new Map(
      [...full].map(([f, edges]) => [f, edges.filter((e) => !e.external && full.has(e.target)).map((e) => e.target)]),
    );
    // The scan sees the imports (a check that it reads anything at all).
    expect([...graph.values()].reduce((n, d) => n + d.length, 0)).toBeGreaterThan(200);
    expect(cycles(graph).map((g) => g.map((f) => relative('.', f)))).toEqual([]);
  });
});
