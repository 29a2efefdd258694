// Reproducible across hosts: the same scenario run in Chromium's engine worker (the page), in the
// engine in Node and through the command line ends in the same model state, bit for bit. The
// state is compared by SHA-256 over the Float64 bytes of u, v and h (worker/state-checksum.ts);
// the command line's state is read back from its restart file. Linear (the WebAssembly kernel on
// both hosts) and nonlinear.
//
// Measured before model/portable-math.ts existed: Chromium's Math.log, exp, sin, cos, tanh, pow...
// differ from Node 20's in the last bit for a few percent of arguments (sqrt and + - * / agree,
// being exact IEEE operations), so the seeded random bursts (log for the waiting times, exp for
// the patches) gave different bits in the page. The model now computes those functions itself
// from IEEE arithmetic only, and all three winds here agree: one of arithmetic only, the seeded
// bursts, and a formula wind that calls most of the formula language's functions; and so does a
// coupled run, whose answering wind steps an SST (tanh) and solves Gill's atmosphere (exp).

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import {
  buildPage,
  chromiumMissing,
  isNoise,
  launch,
  ROOT,
  servePage,
  type Served,
} from '../support/browser-harness.ts';
import { Engine } from '../../worker/engine.ts';
import { stateChecksum, type StateChecksum } from '../../worker/state-checksum.ts';
import { readRestart } from '../../model/io/restart.ts';
import { fakeHost } from '../support/engine-fixture.ts';

const missing = chromiumMissing();
if (missing) console.warn(`browser tests skipped: ${missing}`);

const BIN = join(ROOT, 'bin/pycno.js');

/** A steady uniform westerly: its stress takes no Math function at all. */
const ARITHMETIC_WIND = {
  kind: 'fixed',
  name: 'steady westerly',
  quantity: 'stress',
  source: { kind: 'shaped', shape: { kind: 'uniform' }, x: 0.02, y: 0 },
  envelope: { kind: 'constant' },
};

/** A wind whose stress goes through sin, cos, tan, tanh, sinh, cosh, exp, log, log10, atan, atan2, asin, acos, pow, hypot and ^. */
const FORMULA_WIND = {
  kind: 'fixed',
  name: 'transcendental westerly',
  quantity: 'stress',
  source: {
    kind: 'shaped',
    shape: {
      kind: 'formula',
      expression:
        '0.6 + 0.2*sin(rad(3*lon))*cos(rad(7*lat)) + 0.1*tanh(lat/5) + 0.1*exp(-lat^2/50) + 0.05*log(2 + abs(lon)/100)' +
        ' + 0.02*atan2(lat, lon) + 0.02*pow(1.5, lat/10) + 0.01*hypot(lat, lon)/200 + 0.01*sinh(lat/20) + 0.01*cosh(lat/20)' +
        ' + 0.01*atan(lat) + 0.01*asin(sin(rad(lat))) + 0.01*acos(cos(rad(lat))) + 0.01*log10(2 + abs(lat)) + 0.01*tan(rad(lat))' +
        ' + 0.05*sin(2*pi*t/9) + (1.1 + 0.1*cos(rad(lon)))^1.7 / 10',
    },
    x: 0.03,
    y: 0.003,
  },
  envelope: { kind: 'constant' },
};

/** An answering wind, strongly coupled, SST kicked, zonal advection on: its SST goes through tanh, its atmosphere through exp. */
const ANSWERING_WIND = {
  kind: 'answering',
  name: 'answering wind',
  strength: 60,
  everySteps: 3,
  drag: 'bulk',
  background: { x: -5, y: 1 },
  sst: { region: { kind: 'patch', lon: 110, lat: 0, lonWidth: 15, latWidth: 4 }, meanGradient: -1.5, initial: 0.8 },
  atmosphere: { heatingModes: 3 },
};

type Wind = 'bursts' | 'arithmetic' | 'formula' | 'answering';

/** configs/random-bursts.json made small and short, with bursts falling inside the run. */
function scenario(dynamics: 'linear' | 'nonlinear', wind: Wind): string {
  const sc = JSON.parse(readFileSync(join(ROOT, 'configs/random-bursts.json'), 'utf8'));
  delete sc.$schema;
  sc.name = `${wind}, ${dynamics}, for the checksum`;
  sc.basin.resolution = 1;
  sc.physics.dynamics = dynamics;
  sc.time = { days: 30, outputEveryDays: 2 };
  Object.assign(sc.wind.parts[0], { ratePerYear: 150, window: [0, 20], duration: [3, 8] });
  sc.seed = 20261201;
  if (wind === 'arithmetic') sc.wind.parts = [ARITHMETIC_WIND];
  if (wind === 'formula') sc.wind.parts = [FORMULA_WIND];
  if (wind === 'answering') sc.wind.parts.push(ANSWERING_WIND);
  return JSON.stringify(sc, null, 2);
}

type Pycno = { framesDrawn: number; status: string; stateChecksum(): Promise<StateChecksum | null> };

async function runInPage(page: Page, path: string, name: string): Promise<StateChecksum> {
  await page.setInputFiles('#scenario-file', path);
  await page.waitForFunction(
    (n) =>
      document.getElementById('run-name')!.textContent === n &&
      (window as unknown as { __pycno: Pycno }).__pycno.status === 'ready',
    name,
  );
  await page.selectOption('#speed', 'max');
  await page.click('#btn-run');
  await page.waitForFunction(() => (window as unknown as { __pycno: Pycno }).__pycno.status === 'finished', null, {
    timeout: 120_000,
  });
  return (await page.evaluate(() => (window as unknown as { __pycno: Pycno }).__pycno.stateChecksum()))!;
}

describe.skipIf(missing !== null)(
  'the same state bits in the page worker, the Node engine and the command line',
  () => {
    let served: Served;
    let browser: Browser;
    let page: Page;
    const errors: string[] = [];
    const dir = mkdtempSync(join(tmpdir(), 'pycno-repro-'));

    beforeAll(async () => {
      served = await servePage(await buildPage());
      browser = await launch();
      page = await browser.newPage();
      page.on('pageerror', (e) => errors.push(e.message));
      page.on('console', (m) => {
        if (m.type() === 'error' && !isNoise(m.text()) && !/Failed to load resource.*404/.test(m.text()))
          errors.push(m.text());
      });
      await page.goto(served.url);
      await page.waitForFunction(
        () => ((window as unknown as { __pycno?: Pycno }).__pycno?.framesDrawn ?? 0) > 0,
        null,
        { timeout: 60_000 },
      );
    });

    afterAll(async () => {
      await browser?.close();
      await served?.stop();
      rmSync(dir, { recursive: true, force: true });
    });

    interface Three {
      page: StateChecksum;
      node: StateChecksum;
      cli: StateChecksum;
      atRest: string;
      bursts: number;
    }
    const results = new Map<string, Three>();

    /** The scenario through all three hosts (each once per test file). */
    async function three(dynamics: 'linear' | 'nonlinear', wind: Wind): Promise<Three> {
      const key = `${wind}-${dynamics}`;
      const known = results.get(key);
      if (known) return known;
      const text = scenario(dynamics, wind);
      const file = `${key}.json`;
      const path = join(dir, file);
      writeFileSync(path, text);
      const page = await runInPage(pageOf(), path, JSON.parse(text).name);

      const engine = new Engine({ host: fakeHost(3) });
      const loaded = await engine.load(text, path);
      expect(loaded.ok).toBe(true);
      engine.start();
      expect((await engine.idle()).status).toBe('finished');
      const node = stateChecksum(engine.model!.state);

      const out = spawnSync(
        process.execPath,
        [BIN, 'run', file, '--out', `${key}.nc`, '--restart-out', `${key}-end.nc`, '--quiet'],
        { cwd: dir, encoding: 'utf8', timeout: 120_000 },
      );
      expect(out.stderr).toBe('');
      expect(out.status).toBe(0);
      const cli = stateChecksum(
        readRestart(new Uint8Array(readFileSync(join(dir, `${key}-end.nc`))), engine.model!.grid),
      );

      const rest = new Engine({ host: fakeHost(3) });
      await rest.load(text, path);
      const r: Three = {
        page,
        node,
        cli,
        atRest: stateChecksum(rest.model!.state).sha256,
        bursts: loaded.ok ? loaded.scenario.bursts.length : 0,
      };
      expect(page.values).toBe(3 * engine.model!.grid.size);
      expect(page.step).toBeGreaterThan(100);
      // The run moved: its state is not the state at rest.
      expect(page.sha256).not.toBe(r.atRest);
      expect(errors).toEqual([]);
      results.set(key, r);
      return r;
    }
    const pageOf = () => page;

    for (const dynamics of ['linear', 'nonlinear'] as const) {
      it(`${dynamics}, a wind of arithmetic only: the page's checksum equals the Node engine's and the command line's`, async () => {
        const r = await three(dynamics, 'arithmetic');
        expect(r.node).toEqual(r.page);
        expect(r.cli).toEqual(r.page);
      });

      it(`${dynamics}, seeded random bursts: the Node engine and the command line agree bit for bit`, async () => {
        const r = await three(dynamics, 'bursts');
        // The bursts really fall inside the run, so the checksum covers the random forcing.
        expect(r.bursts).toBeGreaterThan(2);
        expect(r.cli).toEqual(r.node);
        expect(r.page.step).toBe(r.node.step);
      });

      // Failed (a known defect) while the model called the host's Math.log / Math.exp.
      it(`${dynamics}, seeded random bursts: the page's checksum equals the Node engine's`, async () => {
        const r = await three(dynamics, 'bursts');
        expect(r.page).toEqual(r.node);
      });

      it(`${dynamics}, a formula wind through the elementary functions: the page, the Node engine and the command line agree`, async () => {
        const r = await three(dynamics, 'formula');
        expect(r.node).toEqual(r.page);
        expect(r.cli).toEqual(r.page);
      });
    }

    for (const dynamics of ['linear', 'nonlinear'] as const) {
      it(`${dynamics}, bursts and an answering wind (the SST, Gill's atmosphere, the bulk drag): the page, the Node engine and the command line agree`, async () => {
        const r = await three(dynamics, 'answering');
        expect(r.node).toEqual(r.page);
        expect(r.cli).toEqual(r.page);
        // The answer changed the run: not the bursts-only state.
        expect(r.node.sha256).not.toBe((await three(dynamics, 'bursts')).node.sha256);
      });
    }

    it('the checksum tells runs apart: the two schemes and the three winds end in six different states', async () => {
      const all = [];
      for (const wind of ['arithmetic', 'bursts', 'formula'] as const)
        for (const dynamics of ['linear', 'nonlinear'] as const) all.push(await three(dynamics, wind));
      expect(new Set(all.map((r) => r.node.sha256)).size).toBe(6);
    });
  },
);
