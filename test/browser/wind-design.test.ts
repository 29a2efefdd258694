// The wind designer in real Chromium, end to end: from a scenario with its wind removed, build the
// trade-relaxation experiment on the map (a westerly patch drawn by dragging, a painted part, the
// trades), preview it (pixels checked), apply and run it, save the scenario, reload it and get the
// identical JSON; then the saved file through the command line and through the engine in Node
// gives the page's run bit for bit.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { mapColour } from '../../model/display/colour-maps.ts';
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
import { Engine } from '../../worker/engine.ts';
import type { Frame } from '../../worker/protocol.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import { fieldChecksum } from '../../viewer/wind/checksum.ts';
import { fakeHost } from '../support/engine-fixture.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

const BIN = join(ROOT, 'bin/pycno.js');
const basin = { lonWest: 0, lonEast: 140, latSouth: -25, latNorth: 25 }; // configs/westerly-burst.json, the page's default

/** CSS pixel of a lon/lat on the map (the tool canvas lies exactly over it). */
async function mapPoint(page: Page, lon: number, lat: number) {
  const plot = (await page.getAttribute('#map-gl', 'data-plot'))!.split(',').map(Number);
  const box = (await page.locator('#map-gl').boundingBox())!;
  const [left, top, width, height] = plot;
  return {
    x: box.x + left + ((lon - basin.lonWest) / (basin.lonEast - basin.lonWest)) * width,
    y: box.y + top + ((basin.latNorth - lat) / (basin.latNorth - basin.latSouth)) * height,
  };
}

/** The WebGL canvas's colour at a lon/lat (the canvas keeps its drawing buffer). */
async function colourAt(page: Page, lon: number, lat: number): Promise<[number, number, number]> {
  return page.evaluate(
    ({ lon, lat, basin }) => {
      const gl = document.getElementById('map-gl') as HTMLCanvasElement;
      const [left, top, width, height] = gl.dataset.plot!.split(',').map(Number);
      const s = gl.width / gl.clientWidth;
      const c = document.createElement('canvas');
      c.width = gl.width;
      c.height = gl.height;
      const ctx = c.getContext('2d')!;
      ctx.drawImage(gl, 0, 0);
      const x = Math.round((left + ((lon - basin.lonWest) / (basin.lonEast - basin.lonWest)) * width) * s);
      const y = Math.round((top + ((basin.latNorth - lat) / (basin.latNorth - basin.latSouth)) * height) * s);
      const d = ctx.getImageData(x, y, 1, 1).data;
      return [d[0], d[1], d[2]] as [number, number, number];
    },
    { lon, lat, basin },
  );
}

const design = (page: Page) =>
  page.evaluate(() => JSON.parse((window as unknown as { __pycnoWind: { json(): string } }).__pycnoWind.json()));
const partAt = async (page: Page, k: number) => (await design(page)).wind.parts[k];

async function drag(page: Page, from: [number, number], to: [number, number]) {
  await page.locator('#map-gl').scrollIntoViewIfNeeded();
  const a = await mapPoint(page, ...from);
  const b = await mapPoint(page, ...to);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  await page.mouse.move((a.x + b.x) / 2, (a.y + b.y) / 2, { steps: 4 });
  await page.mouse.move(b.x, b.y, { steps: 4 });
  await page.mouse.up();
}

describe.skipIf(missing !== null)('designing the wind in the page', () => {
  let served: Served;
  let browser: Browser;
  let page: Page;
  const errors: string[] = [];
  const dir = mkdtempSync(join(tmpdir(), 'pycno-wind-'));
  let savedText = '';
  let pageRun: { day: number; step: number; checksum: string } | null = null;

  beforeAll(async () => {
    served = await servePage(await buildPage());
    browser = await launch();
    page = await browser.newPage({ viewport: { width: 1280, height: 1000 }, acceptDownloads: true });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
        errors.push(m.text());
    });
    await page.goto(served.url);
    await page.waitForFunction(
      () => ((window as unknown as { __pycno?: { framesDrawn: number } }).__pycno?.framesDrawn ?? 0) > 0,
      null,
      { timeout: 30_000 },
    );
  });

  afterAll(async () => {
    await browser?.close();
    await served?.stop();
  });

  it('builds a westerly patch by dragging on the map, from a scenario without wind', async () => {
    // A short run keeps the test quick; the scenario panel's value goes into the saved file too.
    await page.fill('input[name="time.days"]', '12');
    await page.click('#wd-clear');
    expect((await design(page)).wind.parts).toEqual([]);
    await page.click('#wd-add-patch');
    // Adding a patch picks the patch tool: a drag on open water draws the patch from its centre.
    expect(await page.isChecked('input[name="wd-tool"][value="patch"]')).toBe(true);
    await drag(page, [30, 0], [42, 5]);
    let p = await partAt(page, 0);
    expect(p.source.shape.kind).toBe('patch');
    expect(p.source.shape.lon).toBeCloseTo(30, 0);
    expect(p.source.shape.lat).toBeCloseTo(0, 0);
    expect(p.source.shape.lonWidth).toBeCloseTo(12, 0);
    expect(p.source.shape.latWidth).toBeCloseTo(5, 0);
    // Then its east edge handle makes it wider, and the keyboard turns it and turns it back.
    await drag(page, [p.source.shape.lon + p.source.shape.lonWidth, p.source.shape.lat], [p.source.shape.lon + 15, 3]);
    p = await partAt(page, 0);
    expect(p.source.shape.lonWidth).toBeCloseTo(15, 0);
    await page.focus('#wind-tools');
    await page.keyboard.press('.');
    expect((await partAt(page, 0)).source.shape.tiltDeg).toBe(5);
    await page.keyboard.press(',');
    expect((await partAt(page, 0)).source.shape.tiltDeg).toBe(0);
    // Westerly relaxation of the trades, on from day 0 to day 30 (5-day ramps); x is eastward.
    const editor = page.locator('#wd-editor-host');
    await editor.locator('input[name="source.x"]').fill('0.05');
    await editor.locator('input[name="envelope.start"]').fill('0');
    await editor.locator('input[name="envelope.duration"]').fill('30');
    await editor.locator('input[name="envelope.ramp"]').fill('5');
    // A value out of range is shown at its field, and nothing is applied or lost.
    await editor.locator('input[name="envelope.ramp"]').fill('20');
    await expect.poll(() => editor.locator('[data-path="envelope.ramp"] .field-msg').textContent()).toMatch(/ramp/);
    expect(await page.isDisabled('#wd-apply')).toBe(true);
    await editor.locator('input[name="envelope.ramp"]').fill('5');
    await expect.poll(() => page.isDisabled('#wd-apply')).toBe(false);
  });

  it('paints a second part, with undo and redo', async () => {
    await page.fill('#wd-brush-strength', '0.04');
    await page.fill('#wd-brush-dir', '90');
    await page.fill('#wd-brush-radius', '4');
    await page.click('#wd-add-painted');
    expect(await page.isChecked('input[name="wd-tool"][value="paint"]')).toBe(true);
    await drag(page, [95, 10], [115, 10]);
    const painted = (await partAt(page, 1)).source.grid;
    const big = (g: { y: number[] }) => Math.max(...g.y);
    expect(big(painted)).toBeCloseTo(0.04, 6);
    expect(Math.max(...painted.x.map(Math.abs))).toBeLessThan(1e-6);
    await page.click('#wd-undo');
    expect(big((await partAt(page, 1)).source.grid)).toBe(0);
    await page.click('#wd-redo');
    expect(big((await partAt(page, 1)).source.grid)).toBeCloseTo(0.04, 6);
  });

  it('previews the stress: coloured inside the patch, background far away', async () => {
    await page.click('input[name="wd-tool"][value="off"]');
    await page.check('#wd-preview-on');
    await page.fill('#wd-preview-day', '15');
    await page.waitForFunction(
      () =>
        (window as unknown as { __pycnoWind: { preview(): { day: number } | null } }).__pycnoWind.preview()?.day === 15,
    );
    const pv = await page.evaluate(() =>
      (
        window as unknown as { __pycnoWind: { preview(): { peak: { value: number; lon: number; lat: number } } } }
      ).__pycnoWind.preview(),
    );
    expect(pv.peak.value).toBeCloseTo(0.05, 3);
    expect(pv.peak.lon).toBeCloseTo(30, 0);
    // The map is redrawn after the preview was computed: ask for a redraw and let two animation
    // frames pass (the draw is queued for the next one; framesDrawn counts new data only).
    await page.evaluate(() => window.dispatchEvent(new Event('resize')));
    await page.evaluate(() => new Promise<void>((r) => requestAnimationFrame(() => requestAnimationFrame(() => r()))));
    const zero = await colourAt(page, 130, -20);
    const inside = await colourAt(page, 30.5, 0.5);
    const brushed = await colourAt(page, 105, 10);
    // The strength map at 0 (Pycno Glow's pale straw end) far from both parts; something else in them.
    const [r0, g0, b0] = mapColour('strength', 0);
    expect(Math.abs(zero[0] - r0) + Math.abs(zero[1] - g0) + Math.abs(zero[2] - b0)).toBeLessThan(30);
    const differs = (a: number[], b: number[]) => Math.abs(a[0] - b[0]) + Math.abs(a[1] - b[1]) + Math.abs(a[2] - b[2]);
    expect(differs(inside, zero)).toBeGreaterThan(150);
    expect(differs(brushed, zero)).toBeGreaterThan(60);
    await page.screenshot({ path: join(ARTIFACTS, 'wind-preview.png'), fullPage: true });
  });

  it('adds the trades, applies and runs the design, saves it, and reloads it to the same JSON', async () => {
    await page.click('#wd-add-band'); // trades, -0.05 N m-2 to 30 degrees
    await page.uncheck('#wd-preview-on');
    await page.selectOption('#speed', 'max');
    // "Apply and run": the design from day 0, and the run goes at once.
    await page.click('#wd-apply');
    await expect.poll(() => page.textContent('#wd-note')).toBe('');
    await page.waitForFunction(
      () => (window as unknown as { __pycno: { status: string } }).__pycno.status === 'finished',
      null,
      { timeout: 120_000 },
    );
    await page.waitForFunction(
      () =>
        (window as unknown as { __pycno: { hAnomChecksum(): { day: number } | null } }).__pycno.hAnomChecksum()?.day ===
        12,
    );
    pageRun = await page.evaluate(() =>
      (
        window as unknown as { __pycno: { hAnomChecksum(): { day: number; step: number; checksum: string } } }
      ).__pycno.hAnomChecksum(),
    );

    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#wd-save')]);
    const path = join(dir, 'saved.json');
    await download.saveAs(path);
    savedText = readFileSync(path, 'utf8');
    // The design, under a name of its own: the wind was edited, so the file is named after the edit.
    const composed = JSON.parse(
      await page.evaluate(() => (window as unknown as { __pycnoWind: { json(): string } }).__pycnoWind.json()),
    );
    const saved = JSON.parse(savedText);
    expect(download.suggestedFilename()).toMatch(/-edited\.json$/);
    expect(saved).toEqual({ ...composed, name: `${composed.name} (edited)` });
    expect(saved.time.days).toBe(12);
    expect(
      saved.wind.parts.map(
        (p: { source: { kind: string; shape?: { kind: string } } }) => p.source.shape?.kind ?? p.source.kind,
      ),
    ).toEqual(['patch', 'painted', 'band']);

    // Load the saved file as a user would: the panel shows it, and composes the same text.
    await page.reload();
    await page.waitForFunction(
      () => ((window as unknown as { __pycno?: { framesDrawn: number } }).__pycno?.framesDrawn ?? 0) > 0,
      null,
      { timeout: 30_000 },
    );
    await page.setInputFiles('#scenario-file', path);
    await page.waitForFunction(
      () =>
        (document.getElementById('scenario-pick') as HTMLSelectElement).value === 'opened:saved.json' ||
        (window as unknown as { __pycno: { errors: string[] } }).__pycno.errors.length > 0,
    );
    await expect
      .poll(() => page.evaluate(() => (window as unknown as { __pycnoWind: { json(): string } }).__pycnoWind.json()))
      .toBe(savedText);
    expect(errors).toEqual([]);
  });

  it('the saved file reproduces the page run bit for bit: the engine in Node and the command line', async () => {
    expect(pageRun).not.toBeNull();
    // The engine in this process, on the same text.
    const engine = new Engine({ host: fakeHost(3) });
    const r = await engine.load(savedText, join(dir, 'saved.json'));
    expect(r.ok).toBe(true);
    let last: Frame | null = null;
    engine.onFrame((f) => (last = f));
    engine.start();
    await engine.idle();
    const final = last as unknown as Frame;
    expect(final.finished).toBe(true);
    expect({ day: final.day, step: final.step, checksum: fieldChecksum(final.fields.h_anom!) }).toEqual(pageRun);

    // The command line writes the same final h_anom (float32, land as the fill value).
    const out = spawnSync(process.execPath, [BIN, 'run', 'saved.json', '--out', 'x.nc', '--quiet'], {
      cwd: dir,
      encoding: 'utf8',
      timeout: 120_000,
    });
    expect(out.stderr).toBe('');
    expect(out.status).toBe(0);
    const nc = readNetcdf(new Uint8Array(readFileSync(join(dir, 'x.nc'))));
    const h = nc.variable('h_anom');
    const n = h.shape[1] * h.shape[2];
    const cli = Array.from((h.values as Float64Array).subarray((nc.numRecords - 1) * n, nc.numRecords * n));
    const node = Array.from(final.fields.h_anom!, (x) => (Number.isNaN(x) ? OUTPUT_FILL : x));
    expect(cli.length).toBe(node.length);
    expect(cli).toEqual(node);
    // And the run moved: the patch's downwelling is there.
    expect(Math.max(...node.filter((x) => x !== OUTPUT_FILL))).toBeGreaterThan(1);
  });
});
