// The WebAssembly strips (model/parallel/wasm-strips.ts, the shared build of wasm/rows.as.ts) must give the
// bits of the plain TypeScript step for every value of u, v and h: the same row arithmetic, the
// same strip schedule and barriers as the TypeScript strips, only the rows computed by the
// WebAssembly kernel over one shared memory. The same basins as strips.test.ts (land, free and no
// slip, sponges across strip edges, a wind that changes in time, friction, viscosity).

import { afterEach, describe, expect, it } from 'vitest';
import { linearStepPlain, linearWork } from '../../model/dynamics/linear.ts';
import type { Model } from '../../model/model.ts';
import { needsEdgeSponge, stepInStrips, stripBounds } from '../../model/dynamics/step-schedule.ts';
import { chooseThreads } from '../../model/parallel/threads.ts';
import { createWasmStripMemory, wasmStripRows, wasmStripsAvailable } from '../../model/parallel/wasm-strips.ts';
import { basin, countingHost, expectSameSteps, model, sameBits, STRIP_CASES } from '../support/strip-helpers.ts';

const open: Model[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((m) => m.close()));
});

describe('WebAssembly strip kernel on one thread', () => {
  it('compiles with shared memory here', () => {
    expect(wasmStripsAvailable()).toBe(true);
  });

  it('equals linearStepPlain for every strip count of a small basin, phases serialised, sponges across strip edges', () => {
    const cfg = basin(25, 9, 'no', 3);
    const a = model(cfg);
    a.advance(60);
    const c = a.coefficients;
    const p = a.physics;
    const ax = (a as unknown as { accelX: Float64Array }).accelX;
    const ay = (a as unknown as { accelY: Float64Array }).accelY;
    let edgeCounts = 0;
    for (let strips = 1; strips <= 9; strips++) {
      const x = a.state.clone();
      const wx = linearWork(a.grid);
      const { shared, fields } = createWasmStripMemory(a.grid, c);
      fields.u[0].set(x.u);
      fields.v[0].set(x.v);
      fields.h.set(x.h);
      fields.accelX.set(ax);
      fields.accelY.set(ay);
      const bounds = stripBounds(a.grid.ny, strips);
      // one instance per strip on the one memory, as the threads of a team have
      const kernels = bounds.map(() => wasmStripRows(shared, a.grid, c));
      if (bounds.some((s) => needsEdgeSponge(c, s))) edgeCounts++;
      let cur = 0;
      for (let s = 0; s < 30; s++) {
        // a friction and viscosity that change between steps count as well
        const r = p.friction * (1 + 0.1 * (s % 3));
        const A = p.viscosity * (1 + 0.05 * (s % 2));
        linearStepPlain(a.grid, c, r, A, ax, ay, x, wx);
        for (const k of kernels) k.params(r, A);
        stepInStrips((n) => kernels[n], cur, bounds);
        cur = 1 - cur;
      }
      expect(sameBits(x.u, fields.u[cur]), `u, ${strips} strips`).toBe(true);
      expect(sameBits(x.v, fields.v[cur]), `v, ${strips} strips`).toBe(true);
      expect(sameBits(x.h, fields.h), `h, ${strips} strips`).toBe(true);
    }
    // some of the strip counts put a strip's bottom v row into a sponge band (the edge phase)
    expect(edgeCounts).toBeGreaterThan(0);
  });
});

describe('WebAssembly strip team on worker threads', () => {
  for (const { name, cfg, threads, steps } of STRIP_CASES) {
    it(`gives the plain TypeScript bits for u, v and h (${name})`, async () => {
      const one = model(cfg);
      const many = model(cfg, threads, 'wasm');
      open.push(many);
      const counter = countingHost();
      const choice = await many.startThreads(counter.host);
      expect(choice.threads).toBe(threads);
      expect(many.threads).toBe(threads);
      expect(many.stripKernel).toBe('wasm');
      expect(counter.started()).toBe(threads - 1);
      expectSameSteps(one, many, steps);
      expect(Math.max(...one.state.h)).toBeGreaterThan(0);
      expect(Math.min(...one.state.h)).toBeLessThan(0);
      await many.close();
      const codes = await Promise.all(counter.exits);
      expect(codes).toHaveLength(threads - 1);
      expect(many.threads).toBe(1);
    });
  }

  it('the state stays readable after close, and a TypeScript model keeps the TypeScript strips', async () => {
    const cfg = basin(48, 20, 'free', 3);
    const one = model(cfg);
    const w = model(cfg, 2, 'wasm');
    const t = model(cfg, 2, 'ts');
    open.push(w, t);
    await w.startThreads(countingHost().host);
    await t.startThreads(countingHost().host);
    expect(w.stripKernel).toBe('wasm');
    expect(t.stripKernel).toBe('ts');
    for (const m of [one, w, t]) m.advance(150);
    await w.close();
    expect(sameBits(w.state.h, one.state.h)).toBe(true);
    expect(sameBits(t.state.h, one.state.h)).toBe(true);
    expect(sameBits(t.state.u, w.state.u)).toBe(true);
  });

  it("'auto' over the WebAssembly strips takes one thread per core while a strip keeps 40,000 cells", () => {
    const two = chooseThreads('auto', { nx: 640, ny: 240 }, 2, 'wasm', 'wasm');
    expect(two.threads).toBe(2);
    expect(two.notice).toMatch(/threads auto: 2 \(2 cores for strips, 640 x 240 cells/);
    // only TypeScript strips at hand: the one-thread WebAssembly step is kept below 4 cores
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 2, 'wasm', 'ts').threads).toBe(1);
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 8, 'wasm', 'wasm').threads).toBe(3);
    expect(chooseThreads('auto', { nx: 160, ny: 60 }, 8, 'wasm', 'wasm').threads).toBe(1);
    expect(chooseThreads('auto', { nx: 640, ny: 240 }, 1, 'wasm', 'wasm').threads).toBe(1);
  });
});
