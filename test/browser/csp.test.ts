// The Content-Security-Policy in real Chromium.
// (a) The page as `vite preview` serves it (vite.config.ts pagePolicy): a scenario with random
//     bursts and a formula wind runs in the nonlinear mode, a run is saved and opened, and no
//     violation is seen: not by a securitypolicyviolation listener installed before the page's
//     scripts, not in the page's or the engine worker's console. The worker compiles WebAssembly.
// (b) The same build served with 'unsafe-eval' taken out. Enforced: the page cannot draw, and
//     the violations all come from regl's code generator (mapped through the build's source map).
//     Report-only (the served policy enforced, the one without 'unsafe-eval' reported): the whole
//     page and its engine run as in (a), and every reported violation, from the page or the worker
//     (collected by a listener and by the policy's report-uri), is regl's again. So regl is the one
//     blocker, and nothing else in the program needs eval.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, preview, type PreviewServer } from 'vite';
import type { Browser, Page } from 'playwright-core';
import { chromiumMissing, launch, ROOT, servePage, type Served } from '../support/browser-harness.ts';
import { builtScripts, originalSource, type SourceMapV3 } from '../support/code-generation.ts';
import { pagePolicy } from '../../vite.config.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface Violation {
  where: 'page' | 'report';
  directive: string;
  blocked: string;
  sourceFile: string;
  line: number;
  column: number;
  sample: string;
  disposition: string;
}
type Pycno = { framesDrawn: number; status: string; errors: string[] };

const withoutEval = pagePolicy.replace(" 'unsafe-eval'", '');

/** A nonlinear random-bursts run with a formula part too, short and small. */
function scenario(dir: string): string {
  const sc = JSON.parse(readFileSync(join(ROOT, 'configs/random-bursts.json'), 'utf8'));
  delete sc.$schema;
  sc.name = 'CSP check';
  sc.basin.resolution = 1;
  sc.physics.dynamics = 'nonlinear';
  sc.time = { days: 12, outputEveryDays: 1 };
  Object.assign(sc.wind.parts[0], { ratePerYear: 150, window: [0, 8], duration: [2, 4] });
  sc.wind.parts.push({
    kind: 'fixed',
    name: 'formula breeze',
    quantity: 'stress',
    source: {
      kind: 'shaped',
      shape: { kind: 'formula', expression: '0.01 * exp(-(lat / 5)^2) * cos(lon / 20)' },
      x: 1,
      y: 0,
    },
    envelope: { kind: 'constant' },
  });
  const path = join(dir, 'csp-check.json');
  writeFileSync(path, JSON.stringify(sc, null, 2));
  return path;
}

/** Listen for violations before any script of the page runs. */
async function listen(page: Page): Promise<void> {
  await page.addInitScript(() => {
    const w = window as unknown as { __violations: unknown[] };
    w.__violations = [];
    document.addEventListener('securitypolicyviolation', (e) =>
      w.__violations.push({
        where: 'page',
        directive: e.effectiveDirective,
        blocked: e.blockedURI,
        sourceFile: e.sourceFile,
        line: e.lineNumber,
        column: e.columnNumber,
        sample: e.sample,
        disposition: e.disposition,
      }),
    );
  });
}
const pageViolations = (page: Page) =>
  page.evaluate(() => (window as unknown as { __violations: Violation[] }).__violations);

/** Console lines of the page and its workers that speak of the policy. */
function cspConsole(page: Page, into: string[]): void {
  const take = (text: string) => {
    if (/Content Security Policy|Content-Security-Policy|Refused to/i.test(text)) into.push(text);
  };
  page.on('console', (m) => take(m.text()));
  page.on('worker', (w) => w.on('console', (m) => take(m.text())));
}

/** Load the scenario, run it to the end, save it in the library and open it there. */
async function exercise(page: Page, path: string): Promise<void> {
  await page.waitForFunction(() => ((window as unknown as { __pycno?: Pycno }).__pycno?.framesDrawn ?? 0) > 0, null, {
    timeout: 60_000,
  });
  await page.setInputFiles('#scenario-file', path);
  await page.waitForFunction(
    () =>
      document.getElementById('run-name')!.textContent === 'CSP check' &&
      (window as unknown as { __pycno: Pycno }).__pycno.status === 'ready',
  );
  await page.selectOption('#speed', 'max');
  await page.click('#btn-run');
  await page.waitForFunction(() => (window as unknown as { __pycno: Pycno }).__pycno.status === 'finished', null, {
    timeout: 120_000,
  });
  await page.waitForFunction(() =>
    (window as unknown as { __pycnoLibrary: { ready(): boolean } }).__pycnoLibrary.ready(),
  );
  await page.click('#lib-save-open');
  await page.fill('#lib-save-name', 'under the policy');
  await page.click('#lib-save');
  await page.waitForSelector('.lib-item[data-name="under the policy"]');
  await page.click('.lib-item[data-name="under the policy"] .lib-open');
  await page.waitForFunction(
    () =>
      (window as unknown as { __pycnoLibrary: { viewShown(): string | null } }).__pycnoLibrary.viewShown() ===
      'under the policy',
  );
}

/** The worker compiles a WebAssembly module (the linear kernel needs it). */
async function workerCompilesWasm(page: Page): Promise<string> {
  const w = page.workers().find((x) => x.url().includes('browser-entry'))!;
  return w.evaluate(() => {
    try {
      new WebAssembly.Module(new Uint8Array([0, 97, 115, 109, 1, 0, 0, 0]));
      return 'compiled';
    } catch (e) {
      return String(e);
    }
  });
}

describe.skipIf(missing !== null)('Content-Security-Policy in Chromium', () => {
  let browser: Browser;
  const dir = mkdtempSync(join(tmpdir(), 'pycno-csp-'));
  let path: string;

  beforeAll(async () => {
    browser = await launch();
    path = scenario(dir);
  });
  afterAll(async () => {
    await browser?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  describe('(a) as served', () => {
    let served: Served;
    beforeAll(async () => {
      const outDir = mkdtempSync(join(tmpdir(), 'pycno-page-'));
      await build({
        root: join(ROOT, 'viewer'),
        configFile: join(ROOT, 'vite.config.ts'),
        logLevel: 'error',
        build: { outDir, emptyOutDir: true },
      });
      served = await servePage(outDir);
    }, 120_000);
    afterAll(async () => served?.stop());

    it('the page runs a scenario, saves and opens a run, and no violation happens', async () => {
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      const consoleLines: string[] = [];
      cspConsole(page, consoleLines);
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await listen(page);
      const res = await page.goto(served.url);
      expect(res!.headers()['content-security-policy']).toBe(pagePolicy);
      expect(pagePolicy).toMatch(/script-src 'self' 'wasm-unsafe-eval' 'unsafe-eval';/);
      expect(pagePolicy).not.toMatch(/unsafe-inline/);
      await exercise(page, path);
      expect(await workerCompilesWasm(page)).toBe('compiled');
      expect(await pageViolations(page)).toEqual([]);
      expect(consoleLines).toEqual([]);
      expect(errors).toEqual([]);
      expect(await page.evaluate(() => (window as unknown as { __pycno: Pycno }).__pycno.errors)).toEqual([]);
      await page.close();
    });
  });

  describe("(b) without 'unsafe-eval'", () => {
    let outDir: string;
    let maps: Map<string, SourceMapV3>;

    /** Serve the build with these headers; reports to /__csp-report are collected. */
    async function serveWith(
      headers: Record<string, string>,
    ): Promise<{ url: string; reports: Violation[]; close(): Promise<void> }> {
      const reports: Violation[] = [];
      const server: PreviewServer = await preview({
        root: join(ROOT, 'viewer'),
        configFile: join(ROOT, 'vite.config.ts'),
        logLevel: 'error',
        build: { outDir },
        preview: { host: '127.0.0.1', port: 0, strictPort: false, headers },
        plugins: [
          {
            name: 'collect-csp-reports',
            configurePreviewServer(s) {
              s.middlewares.use('/__csp-report', (req, res) => {
                let body = '';
                req.on('data', (d) => (body += d));
                req.on('end', () => {
                  try {
                    const r = JSON.parse(body)['csp-report'];
                    reports.push({
                      where: 'report',
                      directive: r['effective-directive'],
                      blocked: r['blocked-uri'],
                      sourceFile: r['source-file'] ?? '',
                      line: r['line-number'] ?? 0,
                      column: r['column-number'] ?? 0,
                      sample: r['script-sample'] ?? '',
                      disposition: r.disposition,
                    });
                  } catch {
                    reports.push({
                      where: 'report',
                      directive: 'unreadable report',
                      blocked: body.slice(0, 200),
                      sourceFile: '',
                      line: 0,
                      column: 0,
                      sample: '',
                      disposition: '',
                    });
                  }
                  res.statusCode = 204;
                  res.end();
                });
              });
            },
          },
        ],
      });
      const url = server.resolvedUrls!.local[0];
      return { url, reports, close: () => server.close() };
    }

    /** Where a violation's script place comes from, through the source map of its chunk. */
    function origin(v: Violation): string {
      const name = v.sourceFile.split('/').pop() ?? '';
      const map = maps.get(name);
      if (!map) return `no source map for '${v.sourceFile}'`;
      // Chromium gives 1-based lines and columns.
      return originalSource(map, v.line, Math.max(0, v.column - 1)) ?? `unmapped ${name}:${v.line}:${v.column}`;
    }

    beforeAll(async () => {
      outDir = mkdtempSync(join(tmpdir(), 'pycno-page-'));
      await build({
        root: join(ROOT, 'viewer'),
        configFile: join(ROOT, 'vite.config.ts'),
        logLevel: 'error',
        build: { outDir, emptyOutDir: true, sourcemap: true },
      });
      maps = new Map(builtScripts(outDir).map((s) => [s.name, s.map!]));
    }, 120_000);
    afterAll(() => rmSync(outDir, { recursive: true, force: true }));

    const isolation = { 'Cross-Origin-Opener-Policy': 'same-origin', 'Cross-Origin-Embedder-Policy': 'require-corp' };
    const reporting = (p: string) =>
      p.replace("script-src 'self'", "script-src 'self' 'report-sample'") + '; report-uri /__csp-report';

    it("enforced: the page cannot draw, and every violation is regl's code generation", async () => {
      const s = await serveWith({ ...isolation, 'Content-Security-Policy': reporting(withoutEval) });
      const page = await browser.newPage();
      try {
        await listen(page);
        await page.goto(s.url);
        await page.waitForFunction(
          () => (window as unknown as { __violations: unknown[] }).__violations.length > 0,
          null,
          { timeout: 30_000 },
        );
        // The page does not go blank: it says that the policy stops its drawing library (the
        // refused Function surfaces as an EvalError), not that WebGL is missing.
        await page.waitForFunction(() => !document.getElementById('no-go')!.hidden);
        expect(await page.textContent('#no-go h2')).toBe("The page's security policy stops its drawing library");
        expect(await page.textContent('#no-go')).toContain("'unsafe-eval'");
        const seen = await pageViolations(page);
        for (const v of seen) {
          expect(v).toMatchObject({ directive: 'script-src', blocked: 'eval', disposition: 'enforce' });
          expect(origin(v)).toMatch(/node_modules\/regl\/dist\/regl\.js$/);
          expect(v.sourceFile).toMatch(/\/assets\/index-[\w-]+\.js$/);
        }
        await expect.poll(() => s.reports.length, { timeout: 10_000 }).toBeGreaterThan(0);
        for (const r of s.reports) expect(origin(r)).toMatch(/node_modules\/regl\/dist\/regl\.js$/);
      } finally {
        await page.close();
        await s.close();
      }
    });

    it("report-only: the whole page and its engine run; every eval the program attempts is regl's", async () => {
      const s = await serveWith({
        ...isolation,
        'Content-Security-Policy': pagePolicy,
        'Content-Security-Policy-Report-Only': reporting(withoutEval),
      });
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      try {
        await listen(page);
        await page.goto(s.url);
        await exercise(page, path);
        expect(await workerCompilesWasm(page)).toBe('compiled');
        const programs = [...(await pageViolations(page)), ...s.reports];
        // A control: a string timer started in the engine worker is reported to the collector,
        // so a worker that needed eval could not go unseen.
        const w = page.workers().find((x) => x.url().includes('browser-entry'))!;
        await w.evaluate(() =>
          (setTimeout as unknown as (code: string, ms: number) => void)('self.pycnoCspControl = 1', 0),
        );
        await expect
          .poll(() => s.reports.filter((r) => /pycnoCspControl/.test(r.sample)).length, { timeout: 10_000 })
          .toBe(1);
        expect(s.reports.find((r) => /pycnoCspControl/.test(r.sample))!.disposition).toBe('report');
        const seen = programs;
        // regl compiles its commands as the page starts and draws, so there are some...
        expect(seen.length).toBeGreaterThan(0);
        // ...and each one is regl's: none from the engine worker, the validator, the formula
        // language, the library, the charts or our code.
        const where = new Set(seen.map((v) => `${v.directive} ${v.blocked} ${v.disposition} ${origin(v)}`));
        for (const w of where) expect(w).toMatch(/^script-src eval report .*node_modules\/regl\/dist\/regl\.js$/);
        expect(seen.filter((v) => /browser-entry|strip/.test(v.sourceFile))).toEqual([]);
      } finally {
        await page.close();
        await s.close();
      }
    });
  });
});
