// Shared by the library, comparison and report tests: real runs of small scenarios, collected
// into RunData the way the page and the command line do it.

import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import { RunCollector } from '../../model/io/run-collector.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from './engine-fixture.ts';

export { FIXTURE, FIXTURE_TEXT };

export const WESTERLY_BURST = fileURLToPath(new URL('../../configs/westerly-burst.json', import.meta.url));
export const WESTERLY_BURST_TEXT = readFileSync(WESTERLY_BURST, 'utf8');

/** Run a scenario text to its end in this thread and collect it. */
export async function collectRun(text: string, file: string, sets: string[] = [], snapshotEvery = 1): Promise<RunData> {
  const engine = new Engine({ host: fakeHost(2) });
  const r = await engine.load(text, file, { sets });
  if (!r.ok) throw new Error(r.error.message);
  const c = new RunCollector(
    { ...r.scenario, hovmollerRowLats: r.scenario.hovmollerRowLats },
    { snapshotEvery, createdAt: new Date('2031-05-06T07:08:09.000Z'), command: `test run of ${file}` },
  );
  engine.setRecorder((rec) => c.add(rec));
  engine.start();
  const end = await engine.idle();
  if (end.status !== 'finished') throw new Error(`run ended ${end.status}: ${end.error?.message}`);
  return c.finish();
}

/** The tiny fixture (40 x 20 cells, 6 days), with optional --set changes. */
export function tinyRun(sets: string[] = [], snapshotEvery = 1): Promise<RunData> {
  return collectRun(FIXTURE_TEXT, FIXTURE, sets, snapshotEvery);
}

/** Bit-level equality of two runs: every typed array compared through its bytes. */
export function expectSameRun(a: RunData, b: RunData): void {
  const bits = (x: ArrayBufferView) => Buffer.from(x.buffer, x.byteOffset, x.byteLength).toString('hex');
  const plain = (r: RunData) =>
    JSON.parse(JSON.stringify(r, (_k, v) => (ArrayBuffer.isView(v) ? `${v.constructor.name}:${bits(v)}` : v)));
  expect(plain(b)).toEqual(plain(a));
}

/** The shipped westerly burst, made smaller and shorter: 1° cells, 0-100°E, 15°S-15°N, 60 days. */
export const SHORT_BURST_SETS = [
  'basin.resolution=1',
  'basin.lonEast=100',
  'basin.latSouth=-15',
  'basin.latNorth=15',
  'time.days=60',
  'probes=[{"name":"patch","lon":30,"lat":0},{"name":"mid","lon":65,"lat":0},{"name":"east","lon":99.5,"lat":0}]',
  'hovmoller.lat=[0,4]',
];

let cached: RunData | null = null;
export async function shortBurst(): Promise<RunData> {
  cached ??= await collectRun(WESTERLY_BURST_TEXT, WESTERLY_BURST, SHORT_BURST_SETS, 5);
  return cached;
}
