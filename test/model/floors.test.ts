// The floors of the house (DEVELOPERS.md, "The house"): model/ is the numerical core and imports
// nothing from worker/ or viewer/ and no host module (no file system, no workers: it runs the same
// in the page and in Node); worker/ imports nothing from viewer/; the viewer reaches the engine
// only through the types of worker/protocol.ts, except engine-client.ts, its one door to the
// worker; nothing of the program imports the tests. A new import across a floor fails here and
// names the file and what it imports.

import { describe, expect, it } from 'vitest';
import { importGraph, type ImportEdge } from '../support/import-graph.ts';

const graph = importGraph();
const inside = (f: string, dir: string) => f.startsWith(`${dir}/`);

/** Every import of a file under `from` for which `bad` holds, as "file -> target". */
function crossings(from: string, bad: (e: ImportEdge, file: string) => boolean): string[] {
  const out: string[] = [];
  for (const [f, edges] of graph)
    if (inside(f, from))
      for (const e of edges) if (bad(e, f)) out.push(`${f} -> ${e.target}${e.typeOnly ? ' (type)' : ''}`);
  return out;
}

// Build scripts that live beside what they build and run only under Node (npm run build:wasm).
const NODE_SCRIPTS_IN_MODEL = new Set(['model/dynamics/wasm/build.ts']);

describe('the floors', () => {
  it('the scan sees every floor and the imports between them', () => {
    for (const dir of ['model', 'worker', 'viewer'])
      expect([...graph.keys()].filter((f) => inside(f, dir)).length, dir).toBeGreaterThan(20);
    // The viewer does import the engine's types, so the check below has something to pass.
    expect(crossings('viewer', (e) => inside(e.target, 'worker')).length).toBeGreaterThan(5);
  });

  it('model/ imports nothing from worker/, viewer/ or the tests', () => {
    expect(
      crossings('model', (e) => !e.external && !inside(e.target, 'model') && !e.target.startsWith('configs/')),
    ).toEqual([]);
  });

  it('model/ imports no host module (files, workers, processes)', () => {
    expect(
      crossings('model', (e, f) => e.external && e.target.startsWith('node:') && !NODE_SCRIPTS_IN_MODEL.has(f)),
    ).toEqual([]);
  });

  it('worker/ imports nothing from viewer/ or the tests', () => {
    expect(crossings('worker', (e) => !e.external && (inside(e.target, 'viewer') || inside(e.target, 'test')))).toEqual(
      [],
    );
  });

  it('viewer/ takes only the types of worker/protocol.ts from the engine, but for engine-client.ts', () => {
    expect(
      crossings(
        'viewer',
        (e, f) =>
          inside(e.target, 'worker') &&
          f !== 'viewer/engine-client.ts' &&
          !(e.target === 'worker/protocol.ts' && e.typeOnly),
      ),
    ).toEqual([]);
    expect(crossings('viewer', (e) => !e.external && inside(e.target, 'test'))).toEqual([]);
  });
});
