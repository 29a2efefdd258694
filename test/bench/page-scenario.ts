// The benchmark basin for the page benchmarks: the shipped westerly burst moved to a wider basin
// of our own (0-160E, 30S-30N) at a quarter degree, so 640 x 240 cells. Only the grid, the run
// length and the output interval change; the wind, physics and probes are the shipped ones.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT } from '../support/browser-harness.ts';

export const BENCH_NX = 640;
export const BENCH_NY = 240;

export function benchScenario(opts: { days: number; outputEveryDays: number }): Record<string, unknown> {
  const s = JSON.parse(readFileSync(join(ROOT, 'configs/westerly-burst.json'), 'utf8')) as {
    $schema?: string;
    name: string;
    description: string;
    basin: Record<string, unknown>;
    time: Record<string, unknown>;
    probes: Array<{ name: string; lon: number; lat: number }>;
  };
  delete s.$schema;
  s.name = `Benchmark basin ${BENCH_NX}x${BENCH_NY}`;
  s.description = `The westerly burst in a 160 x 60 degree basin at 0.25 degrees (${BENCH_NX} x ${BENCH_NY} cells), for the page benchmarks.`;
  s.basin = { ...s.basin, lonWest: 0, lonEast: 160, latSouth: -30, latNorth: 30, resolution: 0.25 };
  s.time = { ...s.time, days: opts.days, outputEveryDays: opts.outputEveryDays };
  s.probes = s.probes.map((p) => (p.name === 'east' ? { ...p, lon: 159.5 } : p));
  return s;
}
