// Helpers of the strip tests (TypeScript and WebAssembly strips): bit comparison, basins with land
// and sponges, a wind that changes in time, a Node host that counts its workers.

import { expect } from 'vitest';
import type { ModelConfig } from '../../model/config.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { Grid } from '../../model/grid.ts';
import { Model, type LinearKernelName } from '../../model/model.ts';
import type { StripHost } from '../../model/parallel/team.ts';
import { referenceConfig } from '../../model/reference-kernel.ts';
import { nodeStripHost } from '../../worker/strips-node.ts';
import { sameBits } from './bits.ts';

export { sameBits };

/** A basin of nx x ny cells with the reference's island and block, sponge bands of spongeRows. */
export function basin(nx: number, ny: number, slip: 'free' | 'no', spongeRows: number): ModelConfig {
  const cfg = referenceConfig(nx, ny);
  cfg.basin.land = [...cfg.basin.land, { kind: 'rectangle', lonWest: 100, lonEast: 120, latSouth: -4, latNorth: 12 }];
  cfg.physics = {
    ...cfg.physics,
    slip,
    sponge: { widthDeg: spongeRows * cfg.basin.dLat, rateAtWall: 1 / (2 * 86400), conserveVolume: false },
  };
  cfg.time = { dt: null, safety: 0.9 };
  return cfg;
}

/** A wind that changes every third step: a drifting zonal jet and a meridional wobble. */
export function changingWind(grid: Grid, dt: number): WindStress {
  return {
    steady: false,
    updateSeconds: 3 * dt,
    fill(t, taux, tauy) {
      const phase = t / (2 * 86400);
      taux.fill(0);
      tauy.fill(0);
      for (let j = 0; j < grid.ny; j++) {
        for (let i = 0; i <= grid.nx; i++) {
          taux[grid.idx(i, j)] =
            -0.06 *
            Math.cos((Math.PI * (j + 0.5)) / grid.ny - 0.5 * Math.PI + 0.3 * Math.sin(phase)) *
            (1 + 0.2 * Math.sin((6 * i) / grid.nx + phase));
        }
      }
      for (let j = 0; j <= grid.ny; j++) {
        for (let i = 0; i < grid.nx; i++)
          tauy[grid.idx(i, j)] = 0.02 * Math.sin((Math.PI * j) / grid.ny + phase) * Math.cos((3 * i) / grid.nx);
      }
    },
  };
}

/** A model of the basin under the changing wind, on the given one-thread kernel. */
export function model(cfg: ModelConfig, threads: number | 'auto' = 1, kernel: LinearKernelName = 'ts'): Model {
  const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
  const probe = new Model(cfg, { kernel: 'ts' });
  return new Model(cfg, { kernel, wind: changingWind(grid, probe.dt), threads });
}

/** The Node host, recording every worker it starts and the exit code each one ends with. */
export function countingHost(): { host: StripHost; started: () => number; exits: Array<Promise<unknown>> } {
  const base = nodeStripHost();
  const exits: Array<Promise<unknown>> = [];
  let started = 0;
  return {
    exits,
    started: () => started,
    host: {
      cores: 2,
      spawn() {
        started++;
        const port = base.spawn();
        return {
          ...port,
          terminate() {
            const p = Promise.resolve(port.terminate());
            exits.push(p);
            return p;
          },
        };
      },
    },
  };
}

/** The basins both strip teams are checked on: odd sizes, one row a strip, sponges at strip edges. */
export const STRIP_CASES: Array<{ name: string; cfg: ModelConfig; threads: number; steps: number[] }> = [
  { name: '64 x 48, 2 threads, free slip', cfg: basin(64, 48, 'free', 8), threads: 2, steps: [1, 49, 250] },
  { name: '40 x 7, one row per strip, sponge at strip edges', cfg: basin(40, 7, 'no', 2), threads: 7, steps: [300] },
  {
    name: '33 x 13 (odd rows and columns), 3 threads, no slip',
    cfg: basin(33, 13, 'no', 3),
    threads: 3,
    steps: [7, 293],
  },
  { name: '50 x 24, 4 threads, no slip', cfg: basin(50, 24, 'no', 4), threads: 4, steps: [120, 180] },
];

/** Advance both models by each count in turn; after each, the step count, time and every bit of u, v, h agree. */
export function expectSameSteps(one: Model, many: Model, steps: number[]): void {
  for (const n of steps) {
    one.advance(n);
    many.advance(n);
    expect(many.state.steps).toBe(one.state.steps);
    expect(many.state.time).toBe(one.state.time);
    expect(sameBits(many.state.u, one.state.u), 'u').toBe(true);
    expect(sameBits(many.state.v, one.state.v), 'v').toBe(true);
    expect(sameBits(many.state.h, one.state.h), 'h').toBe(true);
  }
}
