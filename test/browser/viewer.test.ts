// The page in real Chromium (headless, SwiftShader WebGL): built with vite, served by vite preview.
// Screenshots of the main states go to test-artifacts/browser/ for a reviewer.

import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import {
  ARTIFACTS,
  buildPage,
  chromiumMissing,
  isNoise,
  launch,
  ROOT,
  servePage,
  type Served,
} from '../support/browser-harness.ts';
import { EARTH } from '../../model/config.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface Info {
  ready: boolean;
  status: string;
  framesReceived: number;
  framesDrawn: number;
  lastDay: number;
  shownDay: number;
  errors: string[];
}

const info = (page: Page) => page.evaluate(() => (window as unknown as { __pycno: Info }).__pycno);

/** Pixels of the WebGL canvas inside a lon/lat box (the canvas keeps its drawing buffer). */
async function pixelsIn(
  page: Page,
  box: { lonW: number; lonE: number; latS: number; latN: number },
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
) {
  return page.evaluate(
    ({ box, basin }) => {
      const gl = document.getElementById('map-gl') as HTMLCanvasElement;
      const [left, top, width, height] = gl.dataset.plot!.split(',').map(Number);
      const scale = gl.width / gl.clientWidth;
      const c = document.createElement('canvas');
      c.width = gl.width;
      c.height = gl.height;
      const ctx = c.getContext('2d')!;
      ctx.drawImage(gl, 0, 0);
      const px = (lon: number) => (left + ((lon - basin.lonWest) / (basin.lonEast - basin.lonWest)) * width) * scale;
      const py = (lat: number) => (top + ((basin.latNorth - lat) / (basin.latNorth - basin.latSouth)) * height) * scale;
      const x0 = Math.round(px(box.lonW));
      const x1 = Math.round(px(box.lonE));
      const y0 = Math.round(py(box.latN));
      const y1 = Math.round(py(box.latS));
      const d = ctx.getImageData(x0, y0, Math.max(1, x1 - x0), Math.max(1, y1 - y0)).data;
      const out: Array<[number, number, number]> = [];
      for (let k = 0; k < d.length; k += 4) out.push([d[k], d[k + 1], d[k + 2]]);
      return out;
    },
    { box, basin },
  );
}

async function mapPoint(
  page: Page,
  lon: number,
  lat: number,
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
) {
  const plot = await page.getAttribute('#map-gl', 'data-plot');
  const [left, top, width, height] = plot!.split(',').map(Number);
  return {
    x: left + ((lon - basin.lonWest) / (basin.lonEast - basin.lonWest)) * width,
    y: top + ((basin.latNorth - lat) / (basin.latNorth - basin.latSouth)) * height,
  };
}

const shot = (page: Page, name: string) => page.screenshot({ path: join(ARTIFACTS, name), fullPage: true });

describe.skipIf(missing !== null)('the page in Chromium', () => {
  let served: Served;
  let browser: Browser;
  let page: Page;
  const pageErrors: string[] = [];
  const consoleErrors: string[] = [];
  const burst = JSON.parse(readFileSync(join(ROOT, 'configs/westerly-burst.json'), 'utf8'));
  const basin = burst.basin;

  beforeAll(async () => {
    served = await servePage(await buildPage());
    browser = await launch();
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
        consoleErrors.push(m.text());
    });
  });

  afterAll(async () => {
    await browser?.close();
    await served?.stop();
  });

  it('loads with the default scenario ready, the map white at rest', async () => {
    await page.goto(served.url);
    await page.waitForFunction(() => ((window as unknown as { __pycno?: Info }).__pycno?.framesDrawn ?? 0) > 0, null, {
      timeout: 30_000,
    });
    const i = await info(page);
    expect(i.status).toBe('ready');
    expect(await page.textContent('#run-name')).toBe(burst.name);
    expect(await page.textContent('footer')).toMatch(/not forecasts.*navigation or safety/);
    // At rest every ocean pixel is the diverging map's middle: no red, no blue.
    const px = await pixelsIn(page, { lonW: 60, lonE: 100, latS: -1, latN: 1 }, basin);
    const tinted = px.filter(([r, , b]) => Math.abs(r - b) > 30).length;
    expect(tinted / px.length).toBeLessThan(0.1);
    await shot(page, '01-ready.png');
  });

  it('runs: frames arrive transferred, the page stays responsive, the Kelvin wave shows red east of the patch', async () => {
    const worker = page.workers()[0];
    expect(worker).toBeDefined();
    // Count what the worker posts through message ports (comlink's callback channel) and check that
    // every transferred buffer is detached on the worker side right after the post.
    await worker.evaluate(() => {
      const s = { posts: 0, buffers: 0, bytes: 0, detached: 0 };
      (self as unknown as { __sent: typeof s }).__sent = s;
      const orig = MessagePort.prototype.postMessage;
      MessagePort.prototype.postMessage = function (this: MessagePort, msg: unknown, transfer?: unknown) {
        const list = (
          Array.isArray(transfer) ? transfer : ((transfer as { transfer?: unknown[] })?.transfer ?? [])
        ) as unknown[];
        const bufs = list.filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);
        const sizes = bufs.reduce((a, b) => a + b.byteLength, 0);
        orig.call(this, msg, transfer as StructuredSerializeOptions);
        if (bufs.length) {
          s.posts++;
          s.buffers += bufs.length;
          s.bytes += sizes;
          s.detached += bufs.filter((b) => b.byteLength === 0).length;
        }
      } as typeof orig;
    });
    // Timer jitter on the main thread while the model runs.
    await page.evaluate(() => {
      const w = window as unknown as { __jitter: { worst: number; ticks: number; longTasks: number } };
      w.__jitter = { worst: 0, ticks: 0, longTasks: 0 };
      let last = performance.now();
      setInterval(() => {
        const now = performance.now();
        w.__jitter.worst = Math.max(w.__jitter.worst, now - last - 20);
        w.__jitter.ticks++;
        last = now;
      }, 20);
      try {
        new PerformanceObserver((l) => (w.__jitter.longTasks += l.getEntries().length)).observe({
          type: 'longtask',
          buffered: false,
        });
      } catch {
        /* long-task timing is optional */
      }
    });
    await page.selectOption('#speed', '20');
    await page.click('#btn-run');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.lastDay >= 42, null, {
      timeout: 60_000,
    });
    // Pause first: a full-page screenshot is slow on a loaded machine, and the wave must not have
    // reached the coast (about day 68) by the time the map is read.
    await page.click('#btn-pause');
    await shot(page, '02-running.png');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'paused', null, {
      timeout: 10_000,
    });
    // Let the last frame reach the canvas before reading it: on a loaded machine the draw can lag.
    await page.waitForFunction(
      () => {
        const p = (window as unknown as { __pycno: Info }).__pycno;
        return p.shownDay === p.lastDay;
      },
      null,
      { timeout: 10_000 },
    );
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
    const i = await info(page);
    expect(i.framesReceived).toBeGreaterThan(5);
    expect(i.framesDrawn).toBeGreaterThan(2);

    const sent = await worker.evaluate(
      () => (self as unknown as { __sent: { posts: number; buffers: number; bytes: number; detached: number } }).__sent,
    );
    expect(sent.posts).toBeGreaterThan(3);
    expect(sent.detached).toBe(sent.buffers);
    const nxny =
      ((basin.lonEast - basin.lonWest) / basin.resolution) * ((basin.latNorth - basin.latSouth) / basin.resolution);
    expect(sent.bytes).toBeGreaterThanOrEqual(sent.posts * nxny * 4);

    // Generous on purpose: a behaviour check that the page never blocks, not a speed target.
    const jitter = await page.evaluate(
      () => (window as unknown as { __jitter: { worst: number; ticks: number } }).__jitter,
    );
    expect(jitter.ticks).toBeGreaterThan(20);
    expect(jitter.worst).toBeLessThan(1500);

    // The downwelling Kelvin wave from the burst (30E, peak about day 17) travels east at
    // c = sqrt(g'H); check the equatorial strip around where it should be on the shown day.
    const c = Math.sqrt(burst.physics.reducedGravity * burst.physics.layerThickness);
    const degPerDay = (c * 86400 * 180) / (Math.PI * EARTH.radius);
    const centre = Math.min(125, 30 + degPerDay * (i.shownDay - 17));
    const px = await pixelsIn(page, { lonW: centre - 8, lonE: centre + 8, latS: -1, latN: 1 }, basin);
    const red = px.filter(([r, , b]) => r > b + 30).length;
    const blue = px.filter(([r, , b]) => b > r + 30).length;
    expect(red / px.length).toBeGreaterThan(0.6);
    expect(blue).toBeLessThan(red / 10);
    await shot(page, '03-paused.png');
  });

  it('run totals say what the sponges did to the volume, the fastest flow and the Courant number', async () => {
    const totals = await page.textContent('#totals');
    expect(totals).toMatch(/Volume by sponges[\u2212+][\d.e-]+ % of the layer/);
    expect(totals).toMatch(/Fastest flow[\d.]+ m\/s/);
    expect(totals).toMatch(/Courant number0\.\d+/);
  });

  it('the derived numbers show the western boundary layer, and say what to raise when it is unresolved', async () => {
    const derived = page.locator('#derived');
    await expect
      .poll(() => derived.textContent())
      .toMatch(/Western boundary layer[\d.]+ km \(Munk\), 1\.\d\d \u00d7 dx/);
    const box = page.locator('input[name="physics.viscosity"]');
    await box.fill('0');
    await expect
      .poll(() => derived.textContent())
      .toMatch(
        /Unresolved: the western boundary layer is narrower than one grid interval.*raise physics\.viscosity to at least 4000 m2\/s/,
      );
    await page.click('#btn-revert');
    await expect.poll(() => derived.textContent()).not.toMatch(/Unresolved/);
  });

  it('the precision is a choice of the scenario panel: float32 lowers the solver memory, and revert takes it back', async () => {
    const derived = page.locator('#derived');
    const memory = async () => Number(/Solver memory([\d.]+) MB/.exec((await derived.textContent()) ?? '')?.[1]);
    const before = await memory();
    expect(before).toBeGreaterThan(0);
    expect(await page.$eval('select[name="numerics.precision"]', (s) => (s as HTMLSelectElement).value)).toBe(
      'float64',
    );
    await page.selectOption('select[name="numerics.precision"]', 'float32');
    await expect.poll(memory).toBeLessThan(before);
    await page.click('#btn-revert');
    await expect.poll(memory).toBe(before);
  });

  it('the Hovmoller diagram grows as the run goes', async () => {
    const before = Number(await page.getAttribute('#hovmoller', 'data-rows'));
    expect(before).toBeGreaterThan(30);
    // One output interval a click; the second click waits for the first step to end (a click while
    // a step still runs asks for the same pause, not another step).
    for (const k of [1, 2]) {
      await page.click('#btn-step');
      await page.waitForFunction((n) => Number(document.getElementById('hovmoller')!.dataset.rows) >= n, before + k, {
        timeout: 20_000,
      });
    }
  });

  it('any latitude can get its own Hovmoller diagram: earlier days from the kept frames, later ones as the run goes', async () => {
    await page.fill('#hov-lat-other', '4');
    await page.click('#btn-hov-lat');
    await expect
      .poll(async () => page.$eval('#hov-lat', (s) => (s as HTMLSelectElement).selectedOptions[0]?.textContent ?? ''))
      .toMatch(/^4(\.\d+)?°N$/);
    const rows = Number(await page.getAttribute('#hovmoller', 'data-rows'));
    expect(rows).toBeGreaterThan(10);
    await page.click('#btn-step');
    await page.waitForFunction((n) => Number(document.getElementById('hovmoller')!.dataset.rows) >= n + 1, rows, {
      timeout: 20_000,
    });
    // A latitude outside the basin is refused with a message, and the page goes on.
    await page.fill('#hov-lat-other', '80');
    await page.click('#btn-hov-lat');
    await expect.poll(async () => (await info(page)).errors.join('\n')).toMatch(/latitude 80 lies outside the basin/);
    await page.selectOption('#hov-lat', '0');
    await shot(page, '04a-hovmoller-4N.png');
  });

  it('a click on the map adds a probe whose series plots', async () => {
    const series = Number(await page.getAttribute('#probe-chart', 'data-series'));
    const p = await mapPoint(page, 100, 0.2, basin);
    await page.click('#map-gl', { position: p });
    await page.waitForFunction(
      (n) => Number(document.getElementById('probe-chart')!.dataset.series) === n + 1,
      series,
      { timeout: 10_000 },
    );
    const item = page.locator('#probe-list li', { hasText: 'P1' });
    await expect.poll(async () => Number(await item.getAttribute('data-points'))).toBeGreaterThan(0);
    const n0 = Number(await item.getAttribute('data-points'));
    await page.click('#btn-step');
    await expect
      .poll(async () => Number(await item.getAttribute('data-points')), { timeout: 20_000 })
      .toBeGreaterThan(n0);
    // The read-out follows the click: longitude and every field's value.
    const readout = await page.textContent('#readout');
    expect(readout).toMatch(/(99|100)(\.\d+)?°E/);
    expect(readout).toMatch(/Thermocline depth anomaly/);
    expect(readout).toMatch(/Surface current speed/);
    await shot(page, '04-probe.png');
  });

  it('the keyboard moves the read-out cursor', async () => {
    await page.focus('#map-gl');
    const before = await page.textContent('#readout');
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => page.textContent('#readout')).not.toBe(before);
  });

  it('an invalid parameter shows the validator message at the field', async () => {
    const box = page.locator('input[name="physics.reducedGravity"]');
    await box.fill('-0.02');
    const msg = page.locator('#msg-physics-reducedGravity');
    await expect.poll(() => msg.textContent()).toMatch(/must be > 0 \(got -0\.02\)/);
    expect(await page.isDisabled('#btn-apply')).toBe(true);
    await shot(page, '05-invalid.png');
    await box.fill(String(burst.physics.reducedGravity));
    await expect.poll(() => msg.textContent()).toBe('');
    // A changed value needs a restart, and the page says so.
    await box.fill('0.03');
    expect(await page.isVisible('#restart-note')).toBe(true);
    await page.click('#btn-revert');
    expect(await page.isVisible('#restart-note')).toBe(false);
  });

  it('a blow-up shows its message and the page keeps working', async () => {
    // A thin linear layer under a strong steady westerly: the thermocline reaches the surface.
    const bad = structuredClone(burst);
    bad.name = 'Layer runs dry';
    bad.physics.layerThickness = 20;
    bad.physics.surfaceLayer = { depth: 10, dampingDays: 2 };
    bad.physics.entrainment = { minThickness: 10, timeDays: 1 };
    bad.wind.parts[0].source.x = 2;
    bad.wind.parts[0].envelope = { kind: 'constant' };
    bad.time.days = 120;
    const file = join(ARTIFACTS, 'layer-runs-dry.json');
    writeFileSync(file, JSON.stringify(bad, null, 2));
    await page.setInputFiles('#scenario-file', file);
    await page.waitForFunction(() => document.getElementById('run-name')!.textContent === 'Layer runs dry', null, {
      timeout: 20_000,
    });
    await page.selectOption('#speed', 'max');
    await page.click('#btn-run');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'failed', null, {
      timeout: 60_000,
    });
    const text = await page.textContent('#messages');
    expect(text).toMatch(/blew up on day [\d.]+ at .*upper layer vanished/);
    await shot(page, '06-blow-up.png');
    // Still usable: pick the default scenario again and run it.
    await page.selectOption('#scenario-pick', 'westerly-burst.json');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'ready', null, {
      timeout: 20_000,
    });
    const before = (await info(page)).framesReceived;
    await page.click('#btn-run');
    await page.waitForFunction((n) => (window as unknown as { __pycno: Info }).__pycno.framesReceived > n + 3, before, {
      timeout: 30_000,
    });
    await page.click('#btn-pause');
    expect(pageErrors).toEqual([]);
    expect(consoleErrors).toEqual([]);
  });

  it("a shipped scenario that starts from another one's spin-up loads: the worker runs the spin-up first", async () => {
    const errorsBefore = (await info(page)).errors.length;
    await page.selectOption('#scenario-pick', 'trade-relaxation.json');
    // Loaded (its name shows) or refused (a message): whichever comes first.
    await page.waitForFunction(
      (n) =>
        /relax/i.test(document.getElementById('run-name')!.textContent ?? '') ||
        (window as unknown as { __pycno: Info }).__pycno.errors.length > n,
      errorsBefore,
      { timeout: 120_000 },
    );
    expect((await info(page)).errors.slice(errorsBefore)).toEqual([]);
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'ready', null, {
      timeout: 30_000,
    });
    // The spun-up trades tilt the thermocline: deep (red) in the west, shallow (blue) in the east.
    const tradeBasin = { lonWest: 0, lonEast: 140, latSouth: -25, latNorth: 25 };
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
    const west = await pixelsIn(page, { lonW: 8, lonE: 20, latS: -1, latN: 1 }, tradeBasin);
    const east = await pixelsIn(page, { lonW: 120, lonE: 132, latS: -1, latN: 1 }, tradeBasin);
    expect(west.filter(([r, , b]) => r > b + 30).length / west.length).toBeGreaterThan(0.6);
    expect(east.filter(([r, , b]) => b > r + 30).length / east.length).toBeGreaterThan(0.6);
    await shot(page, '06a-spun-up.png');
    await page.selectOption('#scenario-pick', 'westerly-burst.json');
    await page.waitForFunction(
      (name) =>
        document.getElementById('run-name')!.textContent === name &&
        (window as unknown as { __pycno: Info }).__pycno.status === 'ready',
      burst.name,
      { timeout: 30_000 },
    );
  });

  it('a file that fails validation is refused with the validator lines; the run on screen stays', async () => {
    const file = join(ARTIFACTS, 'bad-gravity.json');
    const bad = structuredClone(burst);
    bad.physics.reducedGravity = -1;
    writeFileSync(file, JSON.stringify(bad, null, 2));
    await page.setInputFiles('#scenario-file', file);
    await expect
      .poll(() => page.textContent('#messages'))
      .toMatch(/bad-gravity\.json: line \d+: physics\.reducedGravity: must be > 0/);
    expect(await page.textContent('#run-name')).toBe(burst.name);
  });

  it('without WebGL the page says so instead of going blank', async () => {
    const b = await launch(['--disable-webgl', '--disable-3d-apis']);
    try {
      const p = await b.newPage({ viewport: { width: 900, height: 600 } });
      await p.goto(served.url);
      await p.waitForSelector('#no-go:not([hidden])', { timeout: 20_000 });
      expect(await p.textContent('#no-go')).toMatch(/no WebGL/);
      await p.screenshot({ path: join(ARTIFACTS, '07-no-webgl.png') });
    } finally {
      await b.close();
    }
  });
});
