// The program's import graph, read from the sources (model/, worker/, viewer/): for each file the
// files it imports, whether each import is type-only, and the packages (node:fs, idb, ...) it
// imports. For the tests of cycles and of the floors (test/model/import-cycles.test.ts,
// test/model/floors.test.ts).

import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, normalize } from 'node:path';

export const ROOTS = ['model', 'worker', 'viewer'] as const;

export interface ImportEdge {
  /** The file imported, relative to the project root (normalised), or the package name. */
  target: string;
  /** `import type` / `export type`: no code of the target runs. */
  typeOnly: boolean;
  /** A package (node:fs, idb), not a file of ours. */
  external: boolean;
}

// Static imports and re-exports, `import type` included; the program has no dynamic import().
const IMPORT = /(?:^|\n)\s*(import|export)\s(type\s)?[^'"]*?from\s+['"]([^'"]+)['"]/g;

export function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? sources(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : [],
  );
}

/** Every source file of model/, worker/ and viewer/ with its imports. */
export function importGraph(): Map<string, ImportEdge[]> {
  const files = ROOTS.flatMap((r) => sources(r)).map((f) => normalize(f));
  const graph = new Map<string, ImportEdge[]>();
  for (const f of files) {
    const edges: ImportEdge[] = [];
    for (const m of readFileSync(f, 'utf8').matchAll(IMPORT)) {
      const spec = m[3];
      if (!spec.startsWith('.')) {
        edges.push({ target: spec, typeOnly: m[2] !== undefined, external: true });
        continue;
      }
      let target = normalize(join(dirname(f), spec));
      if (!target.endsWith('.ts') && !target.endsWith('.json')) target += '.ts';
      edges.push({ target, typeOnly: m[2] !== undefined, external: false });
    }
    graph.set(f, edges);
  }
  return graph;
}
