// Every fast path of the linear step must reproduce the plain row loops bit for bit: same
// operations in the same order per value, only the traversal differs. The basins have coasts
// (free and no slip, so the sparse coast terms take part), sponges and a wind.

import { describe, expect, it } from 'vitest';
import type { ModelConfig } from '../../model/config.ts';
import { linearStepPlain, linearWork } from '../../model/dynamics/linear.ts';
import { Grid } from '../../model/grid.ts';
import { Model, type LinearKernelName } from '../../model/model.ts';
import { OUTPUT, rowsModuleText } from '../../model/dynamics/wasm/build.ts';
import { readFileSync } from 'node:fs';
import { referenceConfig, referenceStress } from '../../model/reference-kernel.ts';
import { sameBits } from '../support/bits.ts';

function testConfigs(): Array<{ name: string; cfg: ModelConfig }> {
  const out: Array<{ name: string; cfg: ModelConfig }> = [];
  for (const [nx, ny] of [
    [160, 60],
    [97, 48],
  ] as const) {
    for (const slip of ['free', 'no'] as const) {
      const cfg = referenceConfig(nx, ny);
      cfg.physics = { ...cfg.physics, slip };
      cfg.time = { dt: null, safety: 0.9 };
      out.push({ name: `${nx}x${ny} ${slip}`, cfg });
    }
  }
  return out;
}

function windyModel(cfg: ModelConfig, kernel: LinearKernelName = 'ts'): Model {
  return new Model(cfg, { wind: referenceStress(new Grid(cfg.basin, cfg.physics.earthRadius)), kernel });
}

describe('the one-thread TypeScript step (the step schedule over the TypeScript rows)', () => {
  for (const { name, cfg } of testConfigs()) {
    it(`equals the plain row loops bit for bit (${name})`, () => {
      const a = windyModel(cfg);
      a.advance(150); // some flow first, so every term is non-zero
      const x = a.state.clone();
      const wx = linearWork(a.grid);
      const p = a.physics;
      const ax = (a as unknown as { accelX: Float64Array }).accelX;
      const ay = (a as unknown as { accelY: Float64Array }).accelY;
      for (let s = 0; s < 40; s++) linearStepPlain(a.grid, a.coefficients, p.friction, p.viscosity, ax, ay, x, wx);
      a.advance(40);
      expect(sameBits(a.state.u, x.u)).toBe(true);
      expect(sameBits(a.state.v, x.v)).toBe(true);
      expect(sameBits(a.state.h, x.h)).toBe(true);
      let moving = 0;
      for (let k = 0; k < a.state.h.length; k++) moving = Math.max(moving, Math.abs(a.state.h[k]));
      expect(moving).toBeGreaterThan(1e-3);
    });
  }
});

describe('WebAssembly SIMD linear step', () => {
  for (const { name, cfg } of testConfigs()) {
    it(`equals the TypeScript step bit for bit through Model.advance (${name})`, () => {
      const a = windyModel(cfg, 'ts');
      const b = windyModel(cfg, 'wasm');
      a.advance(190);
      b.advance(190);
      expect(b.state.steps).toBe(190);
      expect(b.state.time).toBe(a.state.time);
      expect(sameBits(a.state.u, b.state.u)).toBe(true);
      expect(sameBits(a.state.v, b.state.v)).toBe(true);
      expect(sameBits(a.state.h, b.state.h)).toBe(true);
    });
  }
  it('continues a restart state bit for bit', () => {
    const { cfg } = testConfigs()[0];
    const a = windyModel(cfg, 'ts');
    a.advance(60);
    const b = new Model(cfg, {
      wind: referenceStress(new Grid(cfg.basin, cfg.physics.earthRadius)),
      kernel: 'wasm',
      initial: a.state.clone(),
    });
    a.advance(30);
    b.advance(30);
    expect(sameBits(a.state.h, b.state.h)).toBe(true);
    expect(sameBits(a.state.u, b.state.u)).toBe(true);
  });
  it('the committed module (both builds) is built from the current source', async () => {
    expect(readFileSync(OUTPUT, 'utf8')).toBe(await rowsModuleText());
  });
});
