// The coupled scenario in the page (real Chromium): the coupled panel draws the SST anomaly with
// the answering wind beside the thermocline map, plots the two indices, and shows the coupled mode
// measured as the run goes, also in the derived numbers; the map offers the SST anomaly with the
// answering wind's arrows; the wind designer edits an answering part and previews its answer.
// Screenshots go to test-artifacts/browser/.

import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import {
  ARTIFACTS,
  buildPage,
  chromiumMissing,
  isNoise,
  launch,
  servePage,
  type Served,
} from '../support/browser-harness.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface Info {
  status: string;
  lastDay: number;
  framesDrawn: number;
}

describe.skipIf(missing !== null)('a coupled run in the page', () => {
  let served: Served;
  let browser: Browser;
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    served = await servePage(await buildPage());
    browser = await launch();
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    page.on('pageerror', (e) => errors.push(e.message));
    page.on('console', (m) => {
      if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
        errors.push(m.text());
    });
  });

  afterAll(async () => {
    await browser?.close();
    await served?.stop();
  });

  it('runs the coupled scenario: SST beside the thermocline, the indices, the measured mode in the derived numbers', async () => {
    await page.goto(served.url);
    await page.waitForFunction(() => ((window as unknown as { __pycno?: Info }).__pycno?.framesDrawn ?? 0) > 0, null, {
      timeout: 30_000,
    });
    await page.selectOption('#scenario-pick', 'coupled-oscillation.json');
    await page.waitForFunction(
      () =>
        document.getElementById('run-name')!.textContent === 'Coupled oscillation' &&
        (window as unknown as { __pycno: Info }).__pycno.status === 'ready',
      null,
      { timeout: 30_000 },
    );
    expect(await page.isVisible('#coupled-panel')).toBe(true);
    expect(await page.textContent('#derived')).toMatch(/Answering wind20(\.0)? m\/s per K, every 8 steps/);
    await page.selectOption('#speed', 'max');
    await page.click('#btn-run');
    // Three complete half cycles need about four years of the 2.6-year mode.
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.lastDay >= 1700, null, {
      timeout: 170_000,
    });
    await page.click('#btn-pause');
    await page.waitForFunction(() => (window as unknown as { __pycno: Info }).__pycno.status === 'paused', null, {
      timeout: 20_000,
    });
    const mode = await page.textContent('#coupled-mode');
    expect(mode).toMatch(/Coupled mode: period \d+ days .* growth rate -?\d/);
    const period = Number(/period (\d+) days/.exec(mode!)![1]);
    // The same scenario measured by the command line and the tests: about 970 days.
    expect(period).toBeGreaterThan(800);
    expect(period).toBeLessThan(1150);
    expect(await page.textContent('#derived')).toMatch(/Coupled mode \(period, growth\)\d\.\d+ years, [+\u2212]\d/);
    // The panel's map is drawn: red and blue both in it (the SST has both signs somewhere in a cycle, or one sign and white).
    const tinted = await page.evaluate(() => {
      const c = document.getElementById('coupled-map') as HTMLCanvasElement;
      const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
      let n = 0;
      for (let k = 0; k < d.length; k += 4) if (Math.abs(d[k] - d[k + 2]) > 40) n++;
      return n;
    });
    expect(tinted).toBeGreaterThan(20);
    expect(await page.textContent('#coupled-scale')).toMatch(
      /SST anomaly, ±[\d.e-]+ K .* answering wind up to [\d.e-]+ m\/s/,
    );
    // The map shows the SST anomaly with the answering wind's arrows on request.
    const options = await page.$$eval('#field-pick option', (o) => o.map((x) => (x as HTMLOptionElement).value));
    expect(options).toContain('sst_anom');
    expect(options).toContain('atm_speed');
    await page.selectOption('#field-pick', 'sst_anom');
    await page.waitForTimeout(300);
    await page.screenshot({ path: join(ARTIFACTS, 'coupled-run.png'), fullPage: true });
    expect(errors).toEqual([]);
  });

  it('edits an answering part in the wind designer and previews its answer to a warm region', async () => {
    await page.click('#wd-add-answering');
    await page.waitForSelector('.wd-answering-note');
    expect(await page.isVisible('select[name="drag"]')).toBe(true);
    expect(await page.isVisible('input[name="strength"]')).toBe(true);
    expect(await page.isVisible('input[name="sst.region.lon"]')).toBe(true);
    // Two answering parts are one too many: the validator says so at the new part.
    await page.waitForFunction(
      () =>
        (window as unknown as { __pycnoWind: { issues(): string[] } }).__pycnoWind
          .issues()
          .some((t) => /at most one answering part/.test(t)),
      null,
      { timeout: 10_000 },
    );
    // A negative strength is refused at its field too; undo takes both edits back.
    await page.fill('input[name="strength"]', '-1');
    await page.waitForFunction(
      () =>
        (window as unknown as { __pycnoWind: { issues(): string[] } }).__pycnoWind
          .issues()
          .some((t) => /strength/.test(t)),
      null,
      { timeout: 10_000 },
    );
    await page.click('#wd-undo');
    await page.click('#wd-undo');
    await page.waitForFunction(
      () => !(window as unknown as { __pycnoWind: { issues(): string[] } }).__pycnoWind.issues().length,
      null,
      { timeout: 10_000 },
    );
    await page.fill('#wd-preview-day', '0');
    await page.check('#wd-preview-on');
    await page.waitForFunction(
      () =>
        (
          window as unknown as { __pycnoWind: { preview(): { peak: { value: number } } | null } }
        ).__pycnoWind.preview() !== null,
      null,
      { timeout: 10_000 },
    );
    const preview = await page.evaluate(() =>
      (
        window as unknown as { __pycnoWind: { preview(): { peak: { value: number; lon: number } } } }
      ).__pycnoWind.preview(),
    );
    // At day 0 the burst is off; what shows is the answer to 1 K over the region at 85E: tens of mN m-2.
    expect(preview.peak.value).toBeGreaterThan(0.005);
    expect(preview.peak.value).toBeLessThan(0.5);
    await page.screenshot({ path: join(ARTIFACTS, 'coupled-preview.png'), fullPage: true });
    expect(errors).toEqual([]);
  });
});
