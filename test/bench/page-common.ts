// What the page benchmarks share: the page built and served, Chromium, a scenario loaded through
// the page's own file input, and the page's readiness read from window.__pycno.

import type { Browser, Page } from 'playwright-core';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'vite';
import { buildPage, chromiumMissing, launch, ROOT, servePage, type Served } from '../support/browser-harness.ts';

/** The page as shipped, or unminified so that a profile names our functions. */
async function buildFor(minify: boolean): Promise<string> {
  if (minify) return buildPage();
  const outDir = mkdtempSync(join(tmpdir(), 'pycno-page-'));
  await build({
    root: join(ROOT, 'viewer'),
    configFile: join(ROOT, 'vite.config.ts'),
    logLevel: 'error',
    build: { outDir, emptyOutDir: true, minify: false },
  });
  return outDir;
}

export interface PageInfo {
  ready: boolean;
  status: string;
  framesReceived: number;
  framesDrawn: number;
  lastDay: number;
  shownDay: number;
  errors: string[];
}

export const pageInfo = (page: Page) => page.evaluate(() => (window as unknown as { __pycno: PageInfo }).__pycno);

export interface BenchPage {
  page: Page;
  browser: Browser;
  served: Served;
  close(): Promise<void>;
}

export async function openPage(
  extraArgs: string[] = [],
  options: { minify?: boolean; width?: number } = {},
): Promise<BenchPage> {
  const missing = chromiumMissing();
  if (missing) throw new Error(`cannot run the page benchmark: ${missing}`);
  const served = await servePage(await buildFor(options.minify ?? true));
  let browser: Browser;
  try {
    browser = await launch(extraArgs);
  } catch (e) {
    await served.stop();
    throw e;
  }
  const page = await browser.newPage({ viewport: { width: options.width ?? 1280, height: 900 } });
  page.on('pageerror', (e) => console.error(`page error: ${e.message}`));
  // tsx keeps function names with a helper that the page does not have; functions passed to
  // page.evaluate from these scripts call it.
  await page.addInitScript(() => {
    (globalThis as unknown as { __name: (f: unknown) => unknown }).__name = (f: unknown) => f;
  });
  await page.goto(served.url);
  await page.waitForFunction(() => (window as unknown as { __pycno: PageInfo }).__pycno.ready, null, {
    timeout: 60_000,
  });
  return {
    page,
    browser,
    served,
    close: async () => {
      await browser.close();
      await served.stop();
    },
  };
}

/** Load a scenario through the page's "Open file…" input and wait until it is ready to run. */
export async function loadScenario(
  page: Page,
  scenario: Record<string, unknown>,
  speed: '5' | '20' | '60' | 'max',
): Promise<void> {
  await page.selectOption('#speed', speed);
  const name = String(scenario.name);
  await page.setInputFiles('#scenario-file', {
    name: 'bench.json',
    mimeType: 'application/json',
    buffer: Buffer.from(JSON.stringify(scenario)),
  });
  await page.waitForFunction(
    (n) =>
      document.getElementById('run-name')?.textContent === n &&
      (window as unknown as { __pycno: PageInfo }).__pycno.status === 'ready',
    name,
    {
      timeout: 120_000,
    },
  );
  const errors = (await pageInfo(page)).errors;
  if (errors.length) throw new Error(`the page refused the benchmark scenario: ${errors.join('; ')}`);
}

export function median(xs: number[]): number {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** The q-quantile (0..1) by nearest rank. */
export function quantile(xs: number[], q: number): number {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
}
