// Saved runs and comparison in real Chromium, with a persistent profile: two westerly-burst runs
// with different friction are saved, the browser is closed and started again on the same profile,
// both runs are found, compared (difference map, scenario table, measured Kelvin speeds beside
// theory), one is exported as NetCDF and imported again with every value intact, a foreign file
// is refused with the reader's message, and a delete is undone.

import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import {
  ARTIFACTS,
  buildPage,
  CHROMIUM,
  chromiumMissing,
  isNoise,
  servePage,
  type Served,
} from '../support/browser-harness.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

interface RunMeta {
  id: string;
  name: string;
  notes: string;
  sizeBytes: number;
  snapshots: number;
  records: number;
  frictionDays: number | null;
}
interface WaveRow {
  wave: string;
  measured: string;
  theory: string;
  speed: number | null;
  standardError: number | null;
  theorySpeed: number;
}
interface CompareState {
  status: string;
  message: string;
  gridNote: string;
  commonTimes: number;
  fieldTimes: number;
  shownDay: number | null;
  field: string | null;
  maxAbsShown: number | null;
  table: Array<{ path: string; a: string; b: string }>;
  waves: { a: WaveRow[]; b: WaveRow[] };
}
type Lib = {
  ready(): boolean;
  runs(): RunMeta[];
  live(): { records: number; lastDay: number | null; keptEvery: number; snapshots: number };
  compare(): CompareState | null;
  viewWaves(): WaveRow[];
  viewShown(): string | null;
  summary(): {
    file: string;
    members: number;
    complete: number;
    failed: number;
    missing: number;
    ensembles: number;
    rows: string[][];
  } | null;
};

const lib = <T>(page: Page, f: (l: Lib) => T) =>
  page.evaluate(`(${f.toString()})(window.__pycnoLibrary)`) as Promise<T>;
const runs = (page: Page) => lib(page, (l) => l.runs());

async function launchOn(profile: string): Promise<BrowserContext> {
  return chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1280, height: 900 },
    acceptDownloads: true,
    args: [
      '--no-sandbox',
      '--enable-unsafe-swiftshader',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

async function openPage(ctx: BrowserContext, url: string, errors: string[]): Promise<Page> {
  const page = ctx.pages()[0] ?? (await ctx.newPage());
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => {
    if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
      errors.push(m.text());
  });
  await page.goto(url);
  await page.waitForFunction(
    () => {
      const w = window as unknown as { __pycno?: { framesDrawn: number }; __pycnoLibrary?: { ready(): boolean } };
      return (w.__pycno?.framesDrawn ?? 0) > 0 && w.__pycnoLibrary?.ready() === true;
    },
    null,
    { timeout: 60_000 },
  );
  return page;
}

/** Apply friction and a 40-day length in the scenario panel, run to the end, save with a name. */
async function runAndSave(page: Page, friction: string, name: string, every: string): Promise<void> {
  await page.fill('input[name="time.days"]', '40');
  await page.fill('input[name="physics.frictionDays"]', friction);
  await page.selectOption('#speed', 'max');
  const framesBefore = await page.evaluate(
    () => (window as unknown as { __pycno: { framesReceived: number } }).__pycno.framesReceived,
  );
  // "Apply and run" starts the run by itself; wait for this run's frames, not the last run's end.
  await page.click('#btn-apply');
  await page.waitForFunction(
    (n) => {
      const p = (window as unknown as { __pycno: { status: string; framesReceived: number } }).__pycno;
      return p.framesReceived > n && p.status === 'finished';
    },
    framesBefore,
    { timeout: 120_000 },
  );
  // Every output record (day 0 to 40) reached the library's recorder, each with its fields.
  await page.waitForFunction(() => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.live().records === 41);
  const live = await lib(page, (l) => l.live());
  expect(live).toMatchObject({ records: 41, lastDay: 40, keptEvery: 1, snapshots: 41 });
  const before = (await runs(page)).length;
  await page.click('#lib-save-open');
  await page.fill('#lib-save-name', name);
  await page.fill('#lib-save-notes', `friction ${friction} days`);
  await page.selectOption('#lib-save-every', every);
  // The size is shown before saving, for the interval picked.
  expect(await page.textContent('#lib-save-what')).toMatch(
    /41 output records .* maps every \d+ records; about [\d.]+ MB in this browser/,
  );
  await page.click('#lib-save');
  await page.waitForFunction(
    (n) => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.runs().length === n,
    before + 1,
  );
}

/** Pixels of a canvas's plot area (the canvas keeps its drawing buffer). */
async function plotPixels(page: Page, id: string): Promise<Array<[number, number, number]>> {
  return page.evaluate((id) => {
    const gl = document.getElementById(id) as HTMLCanvasElement;
    const [left, top, width, height] = gl.dataset.plot!.split(',').map(Number);
    const scale = gl.width / gl.clientWidth;
    const c = document.createElement('canvas');
    c.width = gl.width;
    c.height = gl.height;
    const ctx = c.getContext('2d')!;
    ctx.drawImage(gl, 0, 0);
    const d = ctx.getImageData(
      Math.round(left * scale) + 2,
      Math.round(top * scale) + 2,
      Math.round(width * scale) - 4,
      Math.round(height * scale) - 4,
    ).data;
    const out: Array<[number, number, number]> = [];
    for (let k = 0; k < d.length; k += 4) out.push([d[k], d[k + 1], d[k + 2]]);
    return out;
  }, id);
}

async function downloadOf(
  page: Page,
  click: () => Promise<void>,
  dir: string,
): Promise<{ name: string; path: string; bytes: Buffer }> {
  const [dl] = await Promise.all([page.waitForEvent('download'), click()]);
  // Under its own name, so the file picker hands the page the name a user would see.
  const path = join(dir, `${Date.now()}-${dl.suggestedFilename()}`);
  await dl.saveAs(path);
  return { name: dl.suggestedFilename(), path, bytes: readFileSync(path) };
}

const itemButton = (page: Page, name: string, cls: string) => page.locator(`.lib-item[data-name="${name}"] .${cls}`);

describe.skipIf(missing !== null)('saved runs and comparison in Chromium (persistent profile)', () => {
  let served: Served;
  let ctx: BrowserContext | null = null;
  const profile = mkdtempSync(join(tmpdir(), 'pycno-profile-'));
  const files = mkdtempSync(join(tmpdir(), 'pycno-files-'));
  const errors: string[] = [];
  const A = 'burst, friction 730 days';
  const B = 'burst, friction 20 days';

  beforeAll(async () => {
    served = await servePage(await buildPage());
  });

  afterAll(async () => {
    await ctx?.close();
    await served?.stop();
    rmSync(profile, { recursive: true, force: true });
    rmSync(files, { recursive: true, force: true });
  });

  it('saves two runs of the westerly burst with different friction', async () => {
    ctx = await launchOn(profile);
    const page = await openPage(ctx, served.url, errors);
    expect(await runs(page)).toEqual([]);
    expect(await page.isDisabled('#lib-save-open')).toBe(true);
    await runAndSave(page, '730', A, '1');
    await runAndSave(page, '20', B, '2');
    const saved = await runs(page);
    expect(saved.map((r) => r.name).sort()).toEqual([A, B].sort());
    expect(saved.find((r) => r.name === A)).toMatchObject({
      records: 41,
      snapshots: 41,
      frictionDays: 730,
      notes: 'friction 730 days',
    });
    expect(saved.find((r) => r.name === B)).toMatchObject({ records: 41, snapshots: 21, frictionDays: 20 });
    await ctx.close();
    ctx = null;
  });

  it('finds both runs after the browser is started again on the same profile, and compares them', async () => {
    ctx = await launchOn(profile);
    const page = await openPage(ctx, served.url, errors);
    const saved = await runs(page);
    expect(saved.map((r) => r.name).sort()).toEqual([A, B].sort());
    await page.waitForSelector(`.lib-item[data-name="${A}"]`);
    expect(await page.textContent(`.lib-item[data-name="${A}"] .lib-summary`)).toMatch(
      /Westerly burst .*friction 730 days.*days 0–40, 41 records, 41 maps/,
    );
    const idA = saved.find((r) => r.name === A)!.id;
    const idB = saved.find((r) => r.name === B)!.id;
    await page.selectOption('#cmp-a', idA);
    await page.selectOption('#cmp-b', idB);
    await page.click('#cmp-go');
    await page.waitForFunction(
      () => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.compare()?.shownDay != null,
    );
    const st = (await lib(page, (l) => l.compare()))!;
    expect(st.status).toBe('ok');
    expect(st.commonTimes).toBe(41);
    // B kept every second map: maps match on the even days.
    expect(st.fieldTimes).toBe(21);
    expect(st.shownDay).toBe(40);
    expect(st.field).toBe('h_anom');
    expect(st.maxAbsShown).toBeGreaterThan(0.5);
    expect(st.gridNote).toMatch(/both runs on one 0.5° grid/);
    expect(st.table).toEqual([{ path: 'physics.frictionDays', part: '', a: '730', b: '20' }]);
    expect(await page.textContent('#cmp-scenario-table')).toContain('physics.frictionDays');
    // Variables by the page's own labels, not the file's names.
    expect(await page.$eval('#cmp-field', (s) => (s as HTMLSelectElement).selectedOptions[0].textContent)).toBe(
      'Thermocline depth anomaly (positive down) (m)',
    );
    expect(
      await page.$$eval('#cmp-field option', (os) =>
        os.map((o) => o.textContent ?? '').filter((t) => /^[a-z_]+:/.test(t)),
      ),
    ).toEqual([]);
    // The comparison's Hovmollers: A and B on one scale by the rule every view uses.
    expect(await page.getAttribute('#cmp-hov-a', 'data-scale')).toBe(
      await page.getAttribute('#cmp-hov-b', 'data-scale'),
    );
    // The difference map: white where the runs agree, coloured where friction damped B.
    const px = await plotPixels(page, 'cmp-map-diff-gl');
    const coloured = px.filter(([r, g, b]) => Math.max(r, g, b) - Math.min(r, g, b) > 40).length;
    expect(coloured / px.length).toBeGreaterThan(0.02);
    // A and B share one colour range.
    expect(await page.getAttribute('#cmp-map-a-gl', 'data-range')).toBe(
      await page.getAttribute('#cmp-map-b-gl', 'data-range'),
    );
    expect(await page.getAttribute('#cmp-hov-diff', 'width')).toBe('300');

    // Measured Kelvin speeds of both runs beside c = sqrt(g' H) = 2.74 m/s (Matsuno 1966). Both
    // keep pace with c: friction shrinks B's wave (20-day friction) as it goes, and the front level
    // follows each time's amplitude, so the damping does not slow the measured front.
    const c = Math.sqrt(0.05 * 150);
    for (const w of [st.waves.a[0], st.waves.b[0]]) {
      expect(w.wave).toBe('Kelvin');
      expect(w.theorySpeed).toBeCloseTo(c, 6);
      expect(w.speed).not.toBeNull();
      expect(w.standardError).toBeGreaterThan(0);
    }
    expect(Math.abs(st.waves.a[0].speed! - c) / c).toBeLessThan(0.01);
    expect(Math.abs(st.waves.b[0].speed! - c) / c).toBeLessThan(0.02);
    const waveText = await page.textContent('#cmp-waves');
    expect(waveText).toContain('c = 2.74 m/s');
    expect(waveText).toMatch(/Kelvin\s*2\.\d\d ± [\d.e-]+ m\/s east/);
    await page.locator('#compare-panel').screenshot({ path: join(ARTIFACTS, 'library-compare.png') });

    // Opening a run shows its map, Hovmoller, probes and the same box.
    await itemButton(page, A, 'lib-open').click();
    await page.waitForFunction(
      (n) => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.viewShown() === n,
      A,
    );
    const vw = await lib(page, (l) => l.viewWaves());
    expect(vw[0].speed).toBeCloseTo(st.waves.a[0].speed!, 10);
    expect(await page.getAttribute('#lib-view-hov', 'data-rows')).toBe('41');
    expect(await page.getAttribute('#lib-view-slider', 'max')).toBe('40');
    await page.locator('#library-panel').screenshot({ path: join(ARTIFACTS, 'library-panel.png') });
  });

  it('exports a run as NetCDF and imports it again with every value intact', async () => {
    const page = ctx!.pages()[0];
    const first = await downloadOf(page, () => itemButton(page, A, 'lib-export').click(), files);
    expect(first.name).toMatch(/\.nc$/);
    expect(first.bytes.subarray(0, 3).toString('latin1')).toBe('CDF');
    await page.setInputFiles('#lib-import', first.path);
    await page.waitForFunction(() => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.runs().length === 3);
    const imported = (await runs(page)).find((r) => r.name.endsWith('(imported)'))!;
    expect(imported).toMatchObject({ records: 41, snapshots: 41 });
    // Exported again, the imported run is the same file byte for byte: every value came back.
    const again = await downloadOf(page, () => itemButton(page, imported.name, 'lib-export').click(), files);
    expect(again.bytes.length).toBe(first.bytes.length);
    expect(Buffer.compare(again.bytes, first.bytes)).toBe(0);

    // B kept every second map: its export holds only those, on their own time axis, and the size
    // the save form stated is within 10 % of the file; the export said how far it had got.
    const metaB = (await runs(page)).find((r) => r.name === B)!;
    const fileB = await downloadOf(page, () => itemButton(page, B, 'lib-export').click(), files);
    expect(Math.abs(fileB.bytes.length - metaB.sizeBytes) / fileB.bytes.length).toBeLessThan(0.1);
    expect(await page.textContent('#lib-msg')).toMatch(
      new RegExp(`^Exported '${B}': .*21 kept maps on their own time axis map_time; the series of all 41 records`),
    );
    expect(await page.getAttribute('#lib-msg', 'data-progress')).toBe('1');
    // The library says what the saved runs take and what is left.
    expect(await page.textContent('#lib-storage')).toMatch(
      /^Storage: 3 saved runs, about [\d.]+ MB; this page uses [\d.]+ [kMG]?B of the browser's storage, about [\d.]+ [kMG]?B left\.$/,
    );

    // A file that is not a Pycno run is refused with the reader's message, and nothing is added.
    await page.setInputFiles('#lib-import', {
      name: 'notes.nc',
      mimeType: 'application/x-netcdf',
      buffer: Buffer.from('{"just": "json"}'),
    });
    await page.waitForFunction(() => /not imported/.test(document.getElementById('lib-msg')!.textContent ?? ''));
    expect(await page.textContent('#lib-msg')).toMatch(/^not imported: notes\.nc: /);
    expect((await runs(page)).length).toBe(3);

    // Delete with undo.
    await itemButton(page, imported.name, 'lib-delete').click();
    await page.waitForFunction(() => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.runs().length === 2);
    await page.click('.lib-undo-btn');
    await page.waitForFunction(() => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.runs().length === 3);
    expect(errors).toEqual([]);
  });

  it('opens a sweep summary (pycno sweep --gather): its members with states and results, and its spread report', async () => {
    const page = ctx!.pages()[0];
    // A two-member sweep gathered by the command line: member 2 (5 N m-2) blows up.
    const bin = fileURLToPath(new URL('../../bin/pycno.js', import.meta.url));
    const work = mkdtempSync(join(tmpdir(), 'pycno-page-summary-'));
    copyFileSync(fileURLToPath(new URL('../fixtures/engine-tiny.json', import.meta.url)), join(work, 'tiny.json'));
    const cli = (args: string[]) =>
      spawnSync(process.execPath, [bin, ...args], { cwd: work, encoding: 'utf8', timeout: 120_000 }).status;
    expect(
      cli(['sweep', 'tiny.json', '--vary', 'wind.parts[0].source.x=0.05,5', '--batch', 'b', '--per-task', '2']),
    ).toBe(0);
    expect(cli(['sweep', '--task', 'b', '1'])).toBe(1);
    expect(cli(['sweep', '--gather', 'b'])).toBe(1);
    const before = (await runs(page)).length;
    await page.setInputFiles('#lib-import', join(work, 'b', 'summary.nc'));
    await page.waitForFunction(() => (window as unknown as { __pycnoLibrary: Lib }).__pycnoLibrary.summary() !== null);
    const shown = (await lib(page, (l) => l.summary()))!;
    expect(shown).toMatchObject({ file: 'summary.nc', members: 2, complete: 1, failed: 1, missing: 0, ensembles: 0 });
    expect(shown.rows[0].slice(0, 3)).toEqual(['1', '0.05', 'complete']);
    expect(shown.rows[1].slice(0, 3)).toEqual(['2', '5', 'failed']);
    expect(shown.rows[1][6]).toMatch(/^the run blew up on day/);
    expect(await page.textContent('#lib-summary-line')).toBe(
      '2 members over wind.parts[0].source.x: 1 complete, 1 failed, 0 missing',
    );
    expect((await runs(page)).length).toBe(before); // shown, not saved as a run
    const report = await downloadOf(page, () => page.click('#lib-summary-report'), files);
    expect(report.name).toBe('summary-report.html');
    expect(report.bytes.toString('utf8')).toMatch(/Pycno sweep report: Tiny westerly patch/);
    await page.locator('#lib-summary').screenshot({ path: join(ARTIFACTS, 'library-summary.png') });
    await page.click('#lib-summary-close');
    expect(await lib(page, (l) => l.summary())).toBeNull();
    rmSync(work, { recursive: true, force: true });
    expect(errors).toEqual([]);
  });
});
