// The map sends to the GPU only what changed: in Chromium, redraws without new data (a cursor
// moved with the keyboard) upload no field and no arrows and leave the WebGL canvas alone; a new
// field choice uploads the field but not the arrows; a new frame uploads both; arrows switched
// off redraw the canvas without an upload. Counts come from MapView.counts via window.__pycno.gpu.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { buildPage, chromiumMissing, launch, servePage, type Served } from '../support/browser-harness.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface Counts {
  fieldUploads: number;
  arrowUploads: number;
  glDraws: number;
  overlayDraws: number;
}
interface Info {
  ready: boolean;
  status: string;
  framesReceived: number;
  lastDay: number;
  shownDay: number;
  gpu: Counts;
}

const read = (page: Page) =>
  page.evaluate(() => {
    const p = (window as unknown as { __pycno: Info }).__pycno;
    return { framesReceived: p.framesReceived, lastDay: p.lastDay, shownDay: p.shownDay, gpu: { ...p.gpu } };
  });
/** Two animation frames: any queued draw has run. */
const settle = (page: Page) =>
  page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));

async function stepAndWait(page: Page): Promise<void> {
  const before = (await read(page)).framesReceived;
  await page.click('#btn-step');
  await page.waitForFunction(
    (n) => {
      const p = (window as unknown as { __pycno: Info }).__pycno;
      return p.status === 'paused' && p.framesReceived > n && p.shownDay === p.lastDay;
    },
    before,
    { timeout: 60_000 },
  );
  await settle(page);
}

describe.skipIf(missing !== null)('map uploads in Chromium', () => {
  let served: Served;
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    served = await servePage(await buildPage());
    browser = await launch();
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await page.goto(served.url);
    await page.waitForFunction(
      () =>
        (window as unknown as { __pycno: Info }).__pycno.ready &&
        (window as unknown as { __pycno: Info }).__pycno.status === 'ready',
      null,
      { timeout: 60_000 },
    );
    expect(await page.isChecked('#show-currents')).toBe(true);
    // The first step from day 0 is the initial output; the second one moves the model.
    await stepAndWait(page);
    await stepAndWait(page);
  });

  afterAll(async () => {
    await browser?.close();
    await served?.stop();
  });

  it('redraws without new data upload nothing and leave the WebGL canvas alone', async () => {
    const a = await read(page);
    await page.focus('#map-gl');
    for (const key of ['ArrowRight', 'ArrowRight', 'ArrowUp', 'ArrowLeft']) {
      await page.keyboard.press(key);
      await settle(page);
    }
    const b = await read(page);
    expect(b.framesReceived).toBe(a.framesReceived);
    expect(b.gpu.fieldUploads).toBe(a.gpu.fieldUploads);
    expect(b.gpu.arrowUploads).toBe(a.gpu.arrowUploads);
    expect(b.gpu.glDraws).toBe(a.gpu.glDraws);
    // The cursor itself is drawn, on the overlay.
    expect(b.gpu.overlayDraws).toBeGreaterThan(a.gpu.overlayDraws);
  });

  it('another field uploads the field once and not the arrows', async () => {
    const a = await read(page);
    await page.selectOption('#field-pick', 'ssh');
    await settle(page);
    const b = await read(page);
    expect(b.gpu.fieldUploads).toBe(a.gpu.fieldUploads + 1);
    expect(b.gpu.arrowUploads).toBe(a.gpu.arrowUploads);
    expect(b.gpu.glDraws).toBe(a.gpu.glDraws + 1);
  });

  it('a new frame uploads the field and the arrows, at most once per frame received', async () => {
    const a = await read(page);
    await stepAndWait(page);
    const b = await read(page);
    const frames = b.framesReceived - a.framesReceived;
    expect(frames).toBeGreaterThan(0);
    expect(b.gpu.fieldUploads - a.gpu.fieldUploads).toBeGreaterThanOrEqual(1);
    expect(b.gpu.fieldUploads - a.gpu.fieldUploads).toBeLessThanOrEqual(frames);
    expect(b.gpu.arrowUploads - a.gpu.arrowUploads).toBe(b.gpu.fieldUploads - a.gpu.fieldUploads);
  });

  it('arrows switched off redraw the canvas without an upload', async () => {
    const a = await read(page);
    await page.uncheck('#show-currents');
    await settle(page);
    const b = await read(page);
    expect(b.gpu.fieldUploads).toBe(a.gpu.fieldUploads);
    expect(b.gpu.arrowUploads).toBe(a.gpu.arrowUploads);
    expect(b.gpu.glDraws).toBe(a.gpu.glDraws + 1);
  });

  it('the 8-bit fallback (no float textures) draws the map at rest as the float path does', async () => {
    const meanColour = async (query: string) => {
      const p = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      try {
        await p.goto(`${served.url}${query}`);
        await p.waitForFunction(
          () => (window as unknown as { __pycno: { framesDrawn: number } }).__pycno.framesDrawn > 0,
          null,
          { timeout: 60_000 },
        );
        await settle(p);
        return await p.evaluate(() => {
          const gl = document.getElementById('map-gl') as HTMLCanvasElement;
          const [left, top, width, height] = gl.dataset.plot!.split(',').map(Number);
          const c = document.createElement('canvas');
          c.width = gl.width;
          c.height = gl.height;
          const ctx = c.getContext('2d')!;
          ctx.drawImage(gl, 0, 0);
          const s = gl.width / gl.clientWidth;
          const d = ctx.getImageData(
            Math.round(left * s),
            Math.round(top * s),
            Math.round(width * s),
            Math.round(height * s),
          ).data;
          const sum = [0, 0, 0];
          for (let k = 0; k < d.length; k += 4) for (let c = 0; c < 3; c++) sum[c] += d[k + c];
          return {
            float: (window as unknown as { __pycno: { floatTextures: boolean } }).__pycno.floatTextures,
            rgb: sum.map((v) => v / (d.length / 4)),
          };
        });
      } finally {
        await p.close();
      }
    };
    const f = await meanColour('');
    const b = await meanColour('?bytes');
    expect(f.float).toBe(true);
    expect(b.float).toBe(false);
    // The sea at rest is the middle of the diverging map, pale; not land grey (150) or black.
    expect(Math.min(...f.rgb)).toBeGreaterThan(200);
    for (let c = 0; c < 3; c++) expect(Math.abs(b.rgb[c] - f.rgb[c])).toBeLessThan(2);
  });

  it("once the time slider's budget is full, the frames are thinned back to the start and the note says so", async () => {
    await page.selectOption('#budget', '32');
    expect(await page.textContent('#budget-note')).not.toMatch(/thinned/);
    await page.selectOption('#speed', 'max');
    await page.click('#btn-run');
    // A frame of the default basin is 10 fields of 280 x 100 Float32 cells: 1.12 MB, so 32 MB
    // holds 28 of them, 31.36 MB.
    await page.waitForFunction(() => /thinned/.test(document.getElementById('budget-note')?.textContent ?? ''), null, {
      timeout: 120_000,
    });
    await page.click('#btn-pause');
    await page.waitForFunction(
      () => {
        const p = (window as unknown as { __pycno: Info }).__pycno;
        return p.status === 'paused' && p.shownDay === p.lastDay;
      },
      null,
      { timeout: 30_000 },
    );
    await settle(page);
    const note = (await page.textContent('#budget-note'))!;
    expect(note).toMatch(/^keeping 28 frames = 31 MB, thinned to one every [\d.]+ days? to reach back to the start$/);
    // The slider still starts at the run's first day and ends at the day on screen.
    const kept = /kept: day ([\d.]+) to ([\d.]+)/.exec((await page.textContent('#scrub-day'))!);
    expect(Number(kept![1])).toBe(0);
    const shown = await page.evaluate(() => (window as unknown as { __pycno: Info }).__pycno.shownDay);
    expect(Number(kept![2])).toBeCloseTo(shown, 1);
    const frames = await page.evaluate(
      () => (window as unknown as { __pycno: { kept(): { frames: number } } }).__pycno.kept().frames,
    );
    expect(frames).toBeLessThanOrEqual(28);
  });
});
