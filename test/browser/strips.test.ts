// The page's engine with the linear step in latitude strips (nested workers over shared memory,
// the page being cross-origin isolated; the WebAssembly kernel over one shared WebAssembly.Memory) ends in the same state as the same engine on one worker,
// both in Chromium. The built engine worker is driven directly with comlink's message format (a
// plain object per call), so the page's own engine and viewer are left alone. Without the
// COOP/COEP headers the engine says it runs on one worker, and still runs.

import { readdirSync, readFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { extname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { buildPage, chromiumMissing, isNoise, launch, servePage, type Served } from '../support/browser-harness.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

/** Kelvin pulse (560 x 160 cells) with friction, viscosity and 8 days: about 130 steps. */
const SETS = ['time.days=8', 'time.outputEveryDays=4', 'physics.viscosity=500', 'physics.frictionDays=60'];

interface EngineRun {
  ok: boolean;
  notes: string[];
  step: number;
  status: string;
  h: number[] | null;
}

/** In the page: start the built engine worker, load, run to the end, return the h anomaly field. */
async function runEngine(
  page: Page,
  workerPath: string,
  scenario: string,
  threads: number | 'auto',
): Promise<EngineRun> {
  return page.evaluate(
    async ({ workerPath, scenario, sets, threads }) => {
      const w = new Worker(workerPath, { type: 'module' });
      let n = 0;
      const call = (name: string, ...args: unknown[]) =>
        new Promise<any>((resolve, reject) => {
          const id = `call-${++n}`;
          const on = (e: MessageEvent) => {
            if (e.data?.id !== id) return;
            w.removeEventListener('message', on);
            if (e.data.type === 'HANDLER') reject(new Error(JSON.stringify(e.data.value)));
            else resolve(e.data.value);
          };
          w.addEventListener('message', on);
          w.postMessage({
            id,
            type: 'APPLY',
            path: [name],
            argumentList: args.map((value) => ({ type: 'RAW', value })),
          });
        });
      try {
        const loaded = await call('load', scenario, 'kelvin-pulse.json', { sets, threads });
        if (!loaded.ok) return { ok: false, notes: [JSON.stringify(loaded.error)], step: 0, status: 'failed', h: null };
        await call('setSpeed', 'max');
        await call('start');
        const end = await call('idle');
        const frame = await call('currentFrame');
        return {
          ok: true,
          notes: loaded.scenario.notes ?? [],
          step: end.step,
          status: end.status,
          h: frame?.fields?.h_anom ? Array.from(frame.fields.h_anom as Float32Array) : null,
        };
      } finally {
        w.terminate();
      }
    },
    { workerPath, scenario, sets: SETS, threads },
  );
}

/** The built folder served without COOP/COEP: the page is not cross-origin isolated. */
function servePlain(dir: string): Promise<{ url: string; server: Server }> {
  const types: Record<string, string> = {
    '.html': 'text/html',
    '.js': 'text/javascript',
    '.css': 'text/css',
    '.json': 'application/json',
  };
  const server = createServer((req, res) => {
    const path = new URL(req.url ?? '/', 'http://x').pathname;
    try {
      const body = readFileSync(join(dir, path === '/' ? 'index.html' : path));
      res.writeHead(200, { 'Content-Type': types[extname(path)] ?? 'text/html' }).end(body);
    } catch {
      res.writeHead(404).end();
    }
  });
  return new Promise((resolve) =>
    server.listen(0, '127.0.0.1', () =>
      resolve({ url: `http://127.0.0.1:${(server.address() as { port: number }).port}/`, server }),
    ),
  );
}

describe.skipIf(missing !== null)('the page engine with strip workers', () => {
  let served: Served;
  let plain: { url: string; server: Server };
  let browser: Browser;
  let page: Page;
  let workerPath = '';
  const errors: string[] = [];
  const scenario = readFileSync(join(import.meta.dirname, '../../configs/kelvin-pulse.json'), 'utf8');

  beforeAll(async () => {
    const dir = await buildPage();
    const engineFile = readdirSync(join(dir, 'assets')).find((f) => /^browser-entry-.*\.js$/.test(f));
    if (!engineFile) throw new Error(`no built engine worker in ${dir}/assets`);
    workerPath = `/assets/${engineFile}`;
    plain = await servePlain(dir);
    served = await servePage(dir);
    browser = await launch();
    page = await browser.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      // (a 404 is the page's missing favicon)
      if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
        errors.push(m.text());
    });
  }, 180_000);

  afterAll(async () => {
    await browser?.close();
    await served?.stop(); // also removes the built folder
    await new Promise((r) => plain?.server.close(r));
  });

  it('gives the one-worker h field exactly, with 2 strips in a cross-origin isolated page', async () => {
    await page.goto(served.url);
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(true);
    const strips = await runEngine(page, workerPath, scenario, 2);
    const one = await runEngine(page, workerPath, scenario, 1);
    expect(strips.ok && one.ok, [...strips.notes, ...one.notes].join('; ')).toBe(true);
    // the page's engine steps on WebAssembly, so its strips run the WebAssembly kernel too
    expect(strips.notes).toContain('linear step on 2 threads (latitude strips), WebAssembly SIMD');
    expect(one.notes.some((n) => /threads/.test(n))).toBe(false);
    expect(strips.status).toBe('finished');
    expect(strips.step).toBe(one.step);
    expect(strips.step).toBeGreaterThan(100);
    const h = strips.h!;
    expect(h).toHaveLength(560 * 160);
    // The pulse has moved and spread: a field worth comparing.
    expect(Math.max(...h)).toBeGreaterThan(1);
    expect(Math.min(...h)).toBeLessThan(-1e-3);
    let differ = 0;
    for (let k = 0; k < h.length; k++) if (!Object.is(h[k], one.h![k])) differ++;
    expect(differ).toBe(0);
    expect(errors).toEqual([]);
  }, 240_000);

  it('runs on one worker and says why when the page is not cross-origin isolated', async () => {
    await page.goto(plain.url);
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(false);
    const run = await runEngine(page, workerPath, scenario, 2);
    expect(run.ok).toBe(true);
    expect(run.status).toBe('finished');
    expect(run.notes.join('\n')).toMatch(
      /threads 2: the page is not cross-origin isolated .*the step runs on one thread/,
    );
  }, 240_000);
});
