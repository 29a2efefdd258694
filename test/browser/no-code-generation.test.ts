// No run-time code generation in the program (a Node test, no browser): our own sources have none,
// and in the built page every eval / Function / string timer comes from regl's code generator
// (node_modules/regl/dist/regl.js), found through the build's source map.

import { readdirSync, readFileSync, rmSync, statSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build } from 'vite';
import { ROOT } from '../support/browser-harness.ts';
import { builtScripts, findCodeGeneration, originalSource, type Hit } from '../support/code-generation.ts';

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    if (statSync(p).isDirectory()) return sourceFiles(p);
    return /\.(ts|js|mjs)$/.test(f) ? [p] : [];
  });
}

describe('run-time code generation', () => {
  let outDir: string;

  beforeAll(async () => {
    outDir = mkdtempSync(join(tmpdir(), 'pycno-scan-'));
    await build({
      root: join(ROOT, 'viewer'),
      configFile: join(ROOT, 'vite.config.ts'),
      logLevel: 'error',
      build: { outDir, emptyOutDir: true, sourcemap: true },
    });
  }, 120_000);

  afterAll(() => rmSync(outDir, { recursive: true, force: true }));

  it('the pattern finds what it must and not what it must not', () => {
    const found = (s: string) => findCodeGeneration('x', s).map((h) => h.text);
    expect(
      found('eval("1"); new Function("a", "b"); Function("x")(); Function.apply(null, s); setTimeout("go()", 1)'),
    ).toHaveLength(5);
    expect(found('evaluate(x); x.Function(1); isFunction(y); setTimeout(() => go(), 1); myFunction(2)')).toEqual([]);
  });

  it('our own code (model, worker, viewer, bin) has none', () => {
    const hits: Hit[] = [];
    for (const d of ['model', 'worker', 'viewer', 'bin']) {
      for (const f of sourceFiles(join(ROOT, d)))
        hits.push(...findCodeGeneration(relative(ROOT, f), readFileSync(f, 'utf8')));
    }
    expect(hits).toEqual([]);
  });

  it("in the built page (main chunk, engine worker, every chunk) each one maps to regl's code generator", () => {
    const scripts = builtScripts(outDir);
    expect(scripts.some((s) => s.name.startsWith('browser-entry'))).toBe(true);
    const places: Array<{ chunk: string; source: string | null; text: string }> = [];
    for (const s of scripts) {
      expect(s.map, `${s.name} has a source map`).not.toBeNull();
      for (const h of findCodeGeneration(s.name, s.text))
        places.push({ chunk: s.name, source: originalSource(s.map!, h.line, h.column), text: h.text });
    }
    // regl is there (the page cannot draw without it) and it is the only one.
    expect(places.length).toBeGreaterThan(0);
    for (const p of places)
      expect(p, `${p.text} in ${p.chunk}`).toMatchObject({
        source: expect.stringMatching(/node_modules\/regl\/dist\/regl\.js$/),
      });
    // And it is the Function.apply of regl's code generator, in the page's main chunk, not the worker's.
    expect(places.every((p) => p.chunk.startsWith('index-'))).toBe(true);
    expect(readFileSync(join(ROOT, 'node_modules/regl/dist/regl.js'), 'utf8')).toContain(
      'var proc = Function.apply(null, linkedNames.concat(src))',
    );
  });
});
