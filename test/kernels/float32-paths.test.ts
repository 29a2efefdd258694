// The float32 precision (numerics.precision = float32): every path of either mode gives the same
// bits, as in double. The TypeScript rows with Math.fround after every operation
// (linear-rows32.ts, nonlinear-rows32.ts) are the statement; the WebAssembly f32x4 rows on one
// thread, and both kernels in latitude strips on worker threads, must equal them bit for bit. On
// every shipped scenario in both modes, and on the strip test basins. Also: the state really is
// float32, a restart file of it continues bit for bit, and the run stays within float32 round-off
// of the double run.

import { afterEach, describe, expect, it } from 'vitest';
import type { ModelConfig } from '../../model/config.ts';
import { Grid } from '../../model/grid.ts';
import { readRestart, writeRestart } from '../../model/io/restart.ts';
import { Model, type ModelOptions } from '../../model/model.ts';
import { basin, changingWind, countingHost, STRIP_CASES } from '../support/strip-helpers.ts';
import { differences } from '../support/plain-nonlinear.ts';
import { scenarioCase, SHIPPED } from '../support/scenario-cases.ts';

const open: Model[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((m) => m.close()));
});

const float32 = (cfg: ModelConfig, mode: 'linear' | 'nonlinear'): ModelConfig => ({
  ...cfg,
  precision: 'float32',
  physics: { ...cfg.physics, mode },
});

describe('float32 on one thread: TypeScript rows and WebAssembly f32x4 rows', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    for (const file of SHIPPED) {
      it(`${file}, ${mode}`, () => {
        const sc = scenarioCase(file, [`physics.dynamics=${mode}`, 'numerics.precision=float32']);
        expect(sc.cfg.precision).toBe('float32');
        // a scenario whose wind starts later is compared from the first state that moves
        let initial: ModelOptions['initial'] = sc.initial;
        const probe = new Model(sc.cfg, { wind: sc.wind(), initial: sc.initial });
        probe.advance(150);
        while (probe.state.u.every((x) => x === 0) && probe.day < 60) probe.advance(200);
        if (probe.state.steps > 150) initial = probe.state.clone();
        const ts = new Model(sc.cfg, { wind: sc.wind(), initial, kernel: 'ts' });
        const wasm = new Model(sc.cfg, { wind: sc.wind(), initial, kernel: 'wasm' });
        for (const n of [1, 2, 150]) {
          ts.advance(n);
          wasm.advance(n);
          expect(differences(ts.state, wasm.state), `after ${ts.state.steps} steps`).toEqual([]);
        }
        expect(ts.state.u).toBeInstanceOf(Float32Array);
        if (mode === 'nonlinear') expect(ts.state.history.du[0]).toBeInstanceOf(Float32Array);
        expect(Math.max(...ts.state.u.map(Math.abs))).toBeGreaterThan(1e-3);
      });
    }
  }
});

describe('float32 in latitude strips on worker threads', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    for (const kernel of ['ts', 'wasm'] as const) {
      for (const { name, cfg: base, threads, steps } of STRIP_CASES.slice(0, 3)) {
        it(`${mode}, ${kernel === 'ts' ? 'TypeScript' : 'WebAssembly'} strips (${name})`, async () => {
          const cfg = float32(base, mode);
          const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
          const dt = new Model(cfg, { kernel: 'ts' }).dt;
          const one = new Model(cfg, { kernel: 'ts', wind: changingWind(grid, dt) });
          const many = new Model(cfg, { kernel, wind: changingWind(grid, dt), threads });
          open.push(many);
          await many.startThreads(countingHost().host);
          expect(many.stripKernel).toBe(kernel);
          for (const n of steps) {
            one.advance(n);
            many.advance(n);
            expect(differences(one.state, many.state), `after ${one.state.steps} steps`).toEqual([]);
          }
        });
      }
    }
  }
});

describe('float32 state', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    it(`a restart file of a float32 run continues it bit for bit (${mode})`, async () => {
      const cfg = float32(basin(48, 24, 'no', 3), mode);
      const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
      const dt = new Model(cfg, { kernel: 'ts' }).dt;
      const a = new Model(cfg, { wind: changingWind(grid, dt) });
      a.advance(60);
      const bytes = await writeRestart(a);
      const b = new Model(cfg, { wind: changingWind(grid, dt), initial: readRestart(bytes, a.grid) });
      a.advance(40);
      b.advance(40);
      expect(differences(a.state, b.state)).toEqual([]);
    });

    it(`stays within float32 round-off of the double run (${mode})`, () => {
      const cfg = float32(basin(64, 48, 'free', 4), mode);
      const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
      const dt = new Model(cfg, { kernel: 'ts' }).dt;
      const single = new Model(cfg, { wind: changingWind(grid, dt) });
      const double = new Model({ ...cfg, precision: 'float64' }, { wind: changingWind(grid, dt) });
      single.advance(300);
      double.advance(300);
      let diff = 0;
      let top = 0;
      for (let k = 0; k < grid.size; k++) {
        diff = Math.max(diff, Math.abs(single.state.h[k] - double.state.h[k]));
        top = Math.max(top, Math.abs(double.state.h[k]));
      }
      expect(top).toBeGreaterThan(1);
      expect(diff).toBeGreaterThan(0); // it is float32
      expect(diff / top).toBeLessThan(1e-5); // 300 steps of 6e-8 rounding each, with growth
    });
  }

  it('refuses a precision it does not know, naming the key', () => {
    expect(() => new Model({ ...basin(20, 8, 'free', 1), precision: 'float16' as never })).toThrow(
      /numerics\.precision: must be one of float64, float32/,
    );
  });
});
