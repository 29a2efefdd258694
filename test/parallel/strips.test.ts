// The strip decomposition of the linear step must give the bits of the one-thread step: the same
// arithmetic per cell, only the order of rows across threads differs. Basins with land (coasts,
// free and no slip), sponge bands (also across strip edges), a wind that changes in time,
// friction and viscosity. The worker threads are real (worker_threads) and terminated after.

import { afterEach, describe, expect, it } from 'vitest';
import {
  basin,
  changingWind,
  countingHost,
  expectSameSteps,
  model,
  sameBits,
  STRIP_CASES,
} from '../support/strip-helpers.ts';
import { linearStepPlain, linearWork } from '../../model/dynamics/linear.ts';
import { InputError } from '../../model/errors.ts';
import { Grid } from '../../model/grid.ts';
import { Model } from '../../model/model.ts';
import { stepInStrips, stripBounds } from '../../model/dynamics/step-schedule.ts';
import { stepFields, TsRows } from '../../model/dynamics/linear-rows.ts';
import { chooseThreads } from '../../model/parallel/threads.ts';

const open: Model[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((m) => m.close()));
});

describe('strip schedule on one thread', () => {
  it('equals the plain row loops for every strip count of a small basin, sponges across strip edges', () => {
    const cfg = basin(24, 9, 'no', 3);
    const a = model(cfg);
    a.advance(60);
    const c = a.coefficients;
    const p = a.physics;
    for (let strips = 1; strips <= 9; strips++) {
      const x = a.state.clone();
      const wx = linearWork(a.grid);
      const ax = (a as unknown as { accelX: Float64Array }).accelX;
      const ay = (a as unknown as { accelY: Float64Array }).accelY;
      const bounds = stripBounds(a.grid.ny, strips);
      const f = stepFields(a.grid);
      f.u[0].set(x.u);
      f.v[0].set(x.v);
      f.h.set(x.h);
      f.accelX.set(ax);
      f.accelY.set(ay);
      const rows = new TsRows(a.grid, c, f);
      rows.params(p.friction, p.viscosity);
      let cur = 0;
      for (let s = 0; s < 30; s++) {
        linearStepPlain(a.grid, c, p.friction, p.viscosity, ax, ay, x, wx);
        stepInStrips(() => rows, cur, bounds);
        cur = 1 - cur;
      }
      expect(sameBits(x.u, f.u[cur]), `u, ${strips} strips`).toBe(true);
      expect(sameBits(x.v, f.v[cur]), `v, ${strips} strips`).toBe(true);
      expect(sameBits(x.h, f.h), `h, ${strips} strips`).toBe(true);
    }
  });

  it('cuts rows into contiguous strips covering the grid once', () => {
    for (const [ny, n] of [
      [7, 7],
      [13, 3],
      [240, 2],
      [5, 4],
    ]) {
      const b = stripBounds(ny, n);
      expect(b[0].j0).toBe(0);
      expect(b[n - 1].j1).toBe(ny);
      for (let s = 0; s < n; s++) {
        expect(b[s].j1).toBeGreaterThan(b[s].j0);
        if (s > 0) expect(b[s].j0).toBe(b[s - 1].j1);
      }
    }
    expect(() => stripBounds(4, 5)).toThrow(RangeError);
  });
});

describe('strip team on worker threads', () => {
  for (const { name, cfg, threads, steps } of STRIP_CASES) {
    it(`gives the one-thread bits for u, v and h (${name})`, async () => {
      const one = model(cfg);
      const many = model(cfg, threads);
      open.push(many);
      const counter = countingHost();
      const choice = await many.startThreads(counter.host);
      expect(choice.threads).toBe(threads);
      expect(many.threads).toBe(threads);
      expect(counter.started()).toBe(threads - 1);
      expectSameSteps(one, many, steps);
      // the run did something: a flow, and thickness anomalies of both signs
      expect(Math.max(...one.state.h)).toBeGreaterThan(0);
      expect(Math.min(...one.state.h)).toBeLessThan(0);
      await many.close();
      const codes = await Promise.all(counter.exits);
      expect(codes).toHaveLength(threads - 1);
      for (const code of codes) expect(typeof code).toBe('number');
      expect(many.threads).toBe(1);
    });
  }

  it('with the volume-keeping sponge: the one-thread bits, and the volume kept', async () => {
    const cfg = basin(64, 30, 'free', 5);
    cfg.physics.sponge = { ...cfg.physics.sponge, conserveVolume: true };
    const one = model(cfg);
    const many = model(cfg, 2);
    open.push(many);
    await many.startThreads(countingHost().host);
    expect(many.threads).toBe(2);
    const v0 = one.integrals().volume;
    one.advance(200);
    many.advance(200);
    expect(sameBits(many.state.h, one.state.h)).toBe(true);
    expect(sameBits(many.state.u, one.state.u)).toBe(true);
    expect(sameBits(many.state.v, one.state.v)).toBe(true);
    // Flux-form continuity plus a sponge that relaxes toward the band means: no volume gained or lost.
    expect(Math.abs(one.integrals().volume - v0) / v0).toBeLessThan(1e-13);
    expect(Math.min(...one.state.h)).toBeLessThan(0);
  });

  it('matches the WebAssembly one-thread run as well, and steps on one thread while the workers start', async () => {
    const cfg = basin(64, 30, 'free', 5);
    const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
    const dt = new Model(cfg).dt;
    const wasm = new Model(cfg, { kernel: 'wasm', wind: changingWind(grid, dt) });
    const many = new Model(cfg, { kernel: 'wasm', wind: changingWind(grid, dt), threads: 2 });
    open.push(many);
    const starting = many.startThreads(countingHost().host);
    many.advance(20); // before the team is ready: the model's own kernel
    await starting;
    expect(many.threads).toBe(2);
    many.advance(180);
    wasm.advance(200);
    expect(sameBits(many.state.h, wasm.state.h)).toBe(true);
    expect(sameBits(many.state.u, wasm.state.u)).toBe(true);
    expect(sameBits(many.state.v, wasm.state.v)).toBe(true);
  });

  it('starts one team for two overlapping startThreads calls, and a close during the start stops it', async () => {
    const cfg = basin(40, 12, 'free', 2);
    const m = model(cfg, 2);
    const counter = countingHost();
    const [a, b] = await Promise.all([m.startThreads(counter.host), m.startThreads(counter.host)]);
    expect(a.threads).toBe(2);
    expect(b.threads).toBe(2);
    expect(counter.started()).toBe(1);
    await m.close();
    const early = model(cfg, 3);
    const c2 = countingHost();
    void early.startThreads(c2.host);
    await early.close(); // waits for the start, then stops the two workers
    expect(early.threads).toBe(1);
    expect(await Promise.all(c2.exits)).toHaveLength(2);
  });

  it('clamps more threads than rows, with a message, and still gives the same bits', async () => {
    const cfg = basin(20, 5, 'no', 1);
    const one = model(cfg);
    const many = model(cfg, 9);
    open.push(many);
    const counter = countingHost();
    const choice = await many.startThreads(counter.host);
    expect(choice.threads).toBe(5);
    expect(choice.notice).toMatch(/threads 9 clamped to 5: the grid has 5 rows/);
    one.advance(200);
    many.advance(200);
    expect(sameBits(many.state.h, one.state.h)).toBe(true);
    expect(sameBits(many.state.v, one.state.v)).toBe(true);
  });

  it('refuses a thread count that is not a whole number from 1 to 64', () => {
    const cfg = basin(20, 8, 'free', 1);
    for (const bad of [0, -1, 1.5, 65, Number.NaN, 'two']) {
      expect(() => new Model(cfg, { threads: bad as number })).toThrow(InputError);
    }
    expect(() => new Model(cfg, { threads: 0 })).toThrow(/threads: must be a whole number from 1 to 64/);
  });

  it("'auto' takes one thread per core while a strip keeps 40,000 cells, and over WebAssembly only from 4 cores", () => {
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 2, 'wasm').threads).toBe(1);
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 2, 'wasm').notice).toMatch(
      /WebAssembly step is faster than 2 TypeScript strips/,
    );
    expect(chooseThreads('auto', { nx: 1280, ny: 480 }, 4, 'wasm').threads).toBe(4);
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 2).threads).toBe(2);
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 8).threads).toBe(3);
    expect(chooseThreads('auto', { nx: 160, ny: 60 }, 8).threads).toBe(1);
    expect(chooseThreads('auto', { nx: 1280, ny: 480 }, 1).threads).toBe(1);
  });
});
