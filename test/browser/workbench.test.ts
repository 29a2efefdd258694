// The page as a workbench, in real Chromium (issue: the analysis in one view): the map, the
// Hovmoller diagram and the probe series in the first viewport at 1440x900 while a run goes, the
// map and the Hovmoller diagram first at 1024x700; help from the page; Apply and run; the small
// fixes (favicon, description, east probe label, the map not moving when looking back, a value
// typed at "ready to run" kept, long names in their boxes); colour-bar ticks that never overlap;
// key arrows; the probe legend and a probe added late; formulas that cannot run keep Apply off;
// an edited scenario downloads under its own name. Screenshots of both layouts go to
// test-artifacts/browser/ (docs/img/ has copies).

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { roundUp } from '../../model/display/conventions.ts';
import {
  ARTIFACTS,
  buildPage,
  chromiumMissing,
  launch,
  ROOT,
  servePage,
  type Served,
} from '../support/browser-harness.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface Info {
  status: string;
  framesDrawn: number;
  lastDay: number;
  shownDay: number;
  errors: string[];
  arrows: () => Array<{ name: string; ref: number; set: boolean; longest: number; spacing: number }>;
}
const info = (page: Page) => page.evaluate(() => (window as unknown as { __pycno: Omit<Info, 'arrows'> }).__pycno);
const arrows = (page: Page) => page.evaluate(() => (window as unknown as { __pycno: Info }).__pycno.arrows());
const status = (page: Page) => page.evaluate(() => (window as unknown as { __pycno: Info }).__pycno.status);

/** The element's box in the viewport. */
const box = (page: Page, sel: string) =>
  page.$eval(sel, (e) => {
    const r = e.getBoundingClientRect();
    return { top: r.top, bottom: r.bottom, left: r.left, right: r.right, width: r.width, height: r.height };
  });

function inViewport(b: { top: number; bottom: number; left: number; right: number }, w: number, h: number): boolean {
  return b.top >= 0 && b.left >= 0 && b.bottom <= h + 0.5 && b.right <= w + 0.5;
}

describe.skipIf(missing !== null)('the workbench in Chromium', () => {
  let served: Served;
  let browser: Browser;
  const errors: string[] = [];
  const burst = JSON.parse(readFileSync(join(ROOT, 'configs/westerly-burst.json'), 'utf8'));

  beforeAll(async () => {
    served = await servePage(await buildPage());
    browser = await launch();
  });
  afterAll(async () => {
    await browser?.close();
    await served?.stop();
  });

  async function open(width: number, height: number): Promise<Page> {
    const page = await browser.newPage({ viewport: { width, height }, acceptDownloads: true });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      // Every console error counts here, a favicon 404 or a CSP refusal included.
      if (m.type() === 'error' && !/GPU stall|GroupMarkerNotSet|Automatic fallback/.test(m.text()))
        errors.push(m.text());
    });
    await page.goto(served.url);
    await page.waitForFunction(() => ((window as unknown as { __pycno?: Info }).__pycno?.framesDrawn ?? 0) > 0, null, {
      timeout: 60_000,
    });
    return page;
  }

  it('1440x900: map, Hovmoller diagram with its theory lines, and probe series all in the first viewport while the run goes', async () => {
    const page = await open(1440, 900);
    await page.selectOption('#speed', '20');
    await page.click('#btn-run');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.lastDay >= 25, null, {
      timeout: 60_000,
    });
    expect(await status(page)).toBe('running');
    for (const sel of [
      '#map-gl',
      '#colour-bar',
      '#hovmoller',
      '#probe-chart canvas',
      '#probe-panel .probe-legend',
      '.hov-panel .legend',
    ]) {
      expect(inViewport(await box(page, sel), 1440, 900), `${sel} in the first viewport`).toBe(true);
    }
    expect(await page.$eval('#hovmoller', (c) => Number((c as HTMLCanvasElement).dataset.rows))).toBeGreaterThan(20);
    // The scenario values are there too, and they fold away.
    expect(await page.isVisible('#scenario-drawer')).toBe(true);
    await page.click('#btn-scenario-close');
    expect(await page.isVisible('#scenario-drawer')).toBe(false);
    expect(await page.getAttribute('#btn-scenario', 'aria-expanded')).toBe('false');
    await page.click('#btn-scenario');
    expect(await page.isVisible('#scenario-drawer')).toBe(true);
    await page.screenshot({ path: join(ARTIFACTS, 'workbench-1440x900.png') });
    await page.click('#btn-pause');

    // One legend of our own above the probe chart, none of the chart library's.
    expect(await page.locator('#probe-panel .u-legend').count()).toBe(0);
    expect(await page.locator('#probe-panel .probe-legend').count()).toBe(1);
    expect(await page.textContent('#probe-chart-legend')).toMatch(/day [\d.]+ \(newest\).*patch: [−\d.e-]+ m/);

    // A probe added after the run started: its series from the page's kept maps, from day 0.
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'paused');
    const day = Math.floor((await info(page)).lastDay);
    const plot = (await page.getAttribute('#map-gl', 'data-plot'))!.split(',').map(Number);
    const b = burst.basin;
    await page.click('#map-gl', {
      position: {
        x: plot[0] + ((100 - b.lonWest) / (b.lonEast - b.lonWest)) * plot[2],
        y: plot[1] + ((b.latNorth - 0.2) / (b.latNorth - b.latSouth)) * plot[3],
      },
    });
    const item = page.locator('#probe-list li', { hasText: 'P1' });
    await expect.poll(async () => Number(await item.getAttribute('data-points'))).toBe(day + 1);
    expect(await item.textContent()).toMatch(
      /P1 \(\d+(\.\d+)?°E, 0\.25°N\), days 0 to \d+ from the page’s maps of every output/,
    );
    // Pointing at an early day of the chart: the late probe has a value there, not a blank.
    const chart = await box(page, '#probe-chart .u-over');
    await page.mouse.move(chart.left + chart.width * 0.1, chart.top + chart.height / 2);
    await expect.poll(() => page.textContent('#probe-chart-legend')).toMatch(/P1: [−\d.e-]+ m/);
    expect(await page.textContent('#probe-chart-legend')).not.toMatch(/P1: —/);
    await page.close();
  });

  it('1024x700: the map and the Hovmoller diagram come first, side by side', async () => {
    const page = await open(1024, 700);
    expect(await page.isVisible('#scenario-drawer')).toBe(false);
    const map = await box(page, '#map-gl');
    const hov = await box(page, '#hovmoller');
    expect(inViewport(map, 1024, 700)).toBe(true);
    expect(inViewport(hov, 1024, 700)).toBe(true);
    const probes = await box(page, '#probe-panel');
    const cursor = await box(page, '#cursor-panel');
    expect(probes.top).toBeGreaterThan(hov.top);
    expect(cursor.top).toBeGreaterThan(map.top);
    await page.screenshot({ path: join(ARTIFACTS, 'workbench-1024x700.png') });
    await page.close();
  });

  it('help, favicon, full description, long names in their boxes, a value typed at "ready to run" kept', async () => {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } });
    page.on(
      'console',
      (m) =>
        m.type() === 'error' &&
        !/GPU stall|GroupMarkerNotSet|Automatic fallback/.test(m.text()) &&
        errors.push(m.text()),
    );
    await page.goto(served.url);
    // Type the moment the page says it is ready: the value must stay in its box.
    await page.waitForFunction(() => document.getElementById('status')!.textContent === 'ready to run', null, {
      timeout: 60_000,
      polling: 5,
    });
    await page.fill('input[name="physics.reducedGravity"]', '0.04');
    await page.waitForFunction(() => ((window as unknown as { __pycno: Info }).__pycno.framesDrawn ?? 0) > 0);
    await page.waitForTimeout(500);
    expect(await page.inputValue('input[name="physics.reducedGravity"]')).toBe('0.04');
    expect(await page.isVisible('#restart-note')).toBe(true);
    await page.click('#btn-revert');

    expect(
      await page.evaluate(
        async () => (await fetch((document.querySelector('link[rel="icon"]') as HTMLLinkElement).href)).ok,
      ),
    ).toBe(true);
    const desc = await page.$eval('#scenario-description', (e) => ({
      text: e.textContent,
      cut: e.scrollHeight > e.clientHeight + 1,
    }));
    expect(desc.text).toBe(burst.description);
    expect(desc.cut).toBe(false);
    // The wind part's name box shows the whole name.
    const name = page.locator('#wind-panel .wd-field[data-path="name"] input');
    expect(await name.inputValue()).toBe('westerly burst');
    expect(await name.evaluate((e) => (e as HTMLInputElement).scrollWidth <= (e as HTMLInputElement).clientWidth)).toBe(
      true,
    );

    // Help from the page: the docs, and a formula hint that opens the formula section.
    await page.click('#btn-help');
    expect(await page.isVisible('#help-panel')).toBe(true);
    expect(await page.textContent('#help-body h1')).toBe('The page');
    // A link between the docs stays in the help.
    await page.click('#help-body a[href="#help:library.md"]');
    expect(await page.getAttribute('#help-body', 'data-file')).toBe('library.md');
    await page.click('#help-nav button[data-file="wind.md"]');
    expect(await page.textContent('#help-body h1')).toBe('Wind forcing');
    await page.keyboard.press('Escape');
    expect(await page.isVisible('#help-panel')).toBe(false);
    await page.click('#wd-add-formula');
    await page.click('#wind-panel a[href="#help:wind.md#the-formula-language"]');
    expect(await page.getAttribute('#help-body', 'data-file')).toBe('wind.md');
    expect(await page.locator('#help-body #the-formula-language').isVisible()).toBe(true);
    await page.click('#btn-help-close');

    // A formula that does not compile stays in the box as typed, is marked, and keeps Apply off;
    // the message names the part as the list numbers it, in our syntax.
    const f = page.locator('#wind-panel .wd-formula textarea');
    await f.fill('lat^^2');
    await expect.poll(() => page.isDisabled('#wd-apply')).toBe(true);
    expect(await f.inputValue()).toBe('lat^^2');
    expect(await page.locator('#wind-panel .wd-formula.invalid').count()).toBe(1);
    expect(await page.textContent('#wind-panel .wd-formula')).toMatch(
      /'\^' must be followed by a number, a name or a bracket/,
    );
    expect(await page.textContent('#wind-panel .wd-formula')).not.toMatch(/\*\*/);
    expect(await page.locator('#wd-parts li.wd-part').nth(1).getAttribute('class')).toMatch(/invalid/);
    expect(await page.textContent('#wd-parts li.wd-part:nth-child(2) .wd-pick')).toMatch(/^2\. /);
    await page
      .evaluate(() => (window as unknown as { __pycnoWind: { issues(): string[] } }).__pycnoWind.issues())
      .then((issues) => expect(issues.join('\n')).toMatch(/wind part 2 \('formula'\)/));
    // A formula that compiles but gives NaN is not runnable either.
    await f.fill('sqrt(lat)');
    await expect.poll(() => page.textContent('#wind-panel .wd-formula')).toMatch(/gives NaN/);
    expect(await page.isDisabled('#wd-apply')).toBe(true);
    await f.fill('exp(-(lat/10)^2)');
    await expect.poll(() => page.isDisabled('#wd-apply')).toBe(false);
    expect(await status(page)).toBe('ready');
    await page.close();
  });

  it('Apply and run restarts and runs; looking back does not move the map; the east probe label stays inside', async () => {
    const page = await open(1440, 900);
    await page.selectOption('#speed', '60');
    await page.fill('input[name="time.days"]', '60');
    await page.click('#btn-apply');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.lastDay >= 10, null, {
      timeout: 60_000,
    });
    expect(['running', 'finished']).toContain(await status(page));
    await page.click('#btn-pause');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status !== 'running');
    const before = await box(page, '#map-gl');
    await page.$eval('#time-slider', (s) => {
      (s as HTMLInputElement).value = '2';
      s.dispatchEvent(new Event('input'));
    });
    await expect.poll(() => page.isVisible('#map-looking-back')).toBe(true);
    expect(await box(page, '#map-gl')).toEqual(before);
    await page.click('#btn-latest');
    // The 'east' probe sits at 139.5°E, half a degree from the east edge: its name is drawn to
    // the left of the mark, so nothing of it falls into the margin right of the plot.
    const right = await page.evaluate(() => {
      const o = document.getElementById('map-overlay') as HTMLCanvasElement;
      const [left, top, width, height] = document.getElementById('map-gl')!.dataset.plot!.split(',').map(Number);
      const s = o.width / o.clientWidth;
      const x0 = Math.ceil((left + width + 6) * s);
      const d = o.getContext('2d')!.getImageData(x0, Math.round(top * s), o.width - x0, Math.round(height * s)).data;
      let ink = 0;
      for (let k = 3; k < d.length; k += 4) if (d[k] > 0) ink++;
      return ink;
    });
    expect(right).toBe(0);
    await page.close();
  });

  it('colour bars: round ticks of one precision, never overlapping, for every field and for held ranges', async () => {
    const page = await open(1440, 900);
    await page.selectOption('#speed', 'max');
    await page.click('#btn-run');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.lastDay >= 30, null, {
      timeout: 60_000,
    });
    await page.click('#btn-pause');
    const check = async (what: string) => {
      const ticks = JSON.parse((await page.getAttribute('#colour-bar', 'data-ticks'))!) as Array<{
        label: string;
        left: number;
        right: number;
      }>;
      expect(ticks.length, what).toBeGreaterThanOrEqual(2);
      for (let k = 1; k < ticks.length; k++)
        expect(
          ticks[k].left - ticks[k - 1].right,
          `${what}: ${ticks[k - 1].label} | ${ticks[k].label}`,
        ).toBeGreaterThanOrEqual(6);
      expect(
        new Set(ticks.map((t) => (t.label.split('.')[1] ?? '').length)).size,
        `${what}: ${ticks.map((t) => t.label).join(' ')}`,
      ).toBe(1);
    };
    for (const field of await page.$$eval('#field-pick option', (os) =>
      os.map((o) => (o as HTMLOptionElement).value),
    )) {
      await page.selectOption('#field-pick', field);
      await page.waitForTimeout(150);
      await check(field);
    }
    await page.selectOption('#field-pick', 'h_anom');
    await page.check('input[name="range-mode"][value="fixed"]');
    for (const [lo, hi] of [
      ['-10', '10'],
      ['-8', '10'],
      ['0', '8'],
      ['-0.003', '0.003'],
      ['150', '163.2'],
      ['-2.5e-7', '2.5e-7'],
    ]) {
      await page.fill('#range-min', lo);
      await page.fill('#range-max', hi);
      await page.waitForTimeout(150);
      await check(`${lo} to ${hi}`);
    }
    await page.check('input[name="range-mode"][value="auto"]');

    // Key arrows: automatic at a round number below the fastest arrow (a high percentile, not the
    // extreme), settable, and a spacing control.
    await expect.poll(async () => (await arrows(page)).length).toBe(1);
    const auto = (await arrows(page))[0];
    expect(auto.set).toBe(false);
    expect(auto.ref).toBeGreaterThan(0);
    // Never more than the longest arrow rounded up (test/viewer/arrow-key.test.ts: one jet does not set it).
    expect(auto.ref).toBeLessThanOrEqual(roundUp(auto.longest));
    const m = auto.ref / 10 ** Math.floor(Math.log10(auto.ref) + 1e-9);
    expect([1, 2, 2.5, 5].some((x) => Math.abs(m - x) < 1e-6)).toBe(true);
    await page.fill('#arrow-ref-current', '0.05');
    await expect.poll(async () => (await arrows(page))[0]).toMatchObject({ ref: 0.05, set: true });
    await page.fill('#arrow-ref-current', 'fast');
    await expect.poll(() => page.textContent('#arrow-msg')).toMatch(/current key: give a speed above 0/);
    await page.fill('#arrow-ref-current', '');
    await page.selectOption('#arrow-density', '14');
    await expect.poll(async () => (await arrows(page))[0].spacing).toBe(14);
    await page.close();
  });

  it('an edited scenario downloads under its own name', async () => {
    const page = await open(1440, 900);
    await page.fill('input[name="physics.reducedGravity"]', '0.04');
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#wd-save')]);
    expect(dl.suggestedFilename()).toBe('westerly-burst-edited.json');
    const path = join(ARTIFACTS, 'edited-download.json');
    await dl.saveAs(path);
    const saved = JSON.parse(readFileSync(path, 'utf8'));
    expect(saved.name).toBe('Westerly burst (edited)');
    expect(saved.physics.reducedGravity).toBe(0.04);
    await page.click('#btn-revert');
    const [dl2] = await Promise.all([page.waitForEvent('download'), page.click('#wd-save')]);
    expect(dl2.suggestedFilename()).toBe('westerly-burst.json');
    await page.close();
    expect(errors).toEqual([]);
  });
});
