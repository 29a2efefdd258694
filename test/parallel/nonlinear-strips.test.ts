// The nonlinear step in latitude strips must give the bits of the plain nonlinear step
// (nonlinearStep, whole-grid loops): every cell sees the same operations in the same order, the
// rows a strip shares with a neighbour (the diagnosed U, V, q, B of the row beyond its edge) are
// computed by both from the same old values, and the multistep history and the sponge volume go
// through the same binding. Checked on one thread with the strips in turn (every strip count of a
// small basin, TypeScript rows and WebAssembly rows with one instance and one ring per strip on
// one shared memory), and on real worker threads (the strip test basins, a changing wind, the
// volume-keeping sponge, and every shipped scenario switched to nonlinear on 2 WebAssembly strips).

import { afterEach, describe, expect, it } from 'vitest';
import type { ModelConfig } from '../../model/config.ts';
import { STEP_PARAMS } from '../../model/dynamics/field-binding.ts';
import { runStripsInTurn, stripBounds } from '../../model/dynamics/step-schedule.ts';
import { Grid } from '../../model/grid.ts';
import { Model } from '../../model/model.ts';
import { createStripSetup, stripStep } from '../../model/parallel/strip-kernel.ts';
import { State } from '../../model/state.ts';
import { differences, PlainNonlinear } from '../support/plain-nonlinear.ts';
import { scenarioCase, SHIPPED } from '../support/scenario-cases.ts';
import { basin, changingWind, countingHost, STRIP_CASES } from '../support/strip-helpers.ts';

const open: Model[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((m) => m.close()));
});

function nonlinear(cfg: ModelConfig, conserveVolume = false): ModelConfig {
  return { ...cfg, physics: { ...cfg.physics, mode: 'nonlinear', sponge: { ...cfg.physics.sponge, conserveVolume } } };
}

describe('nonlinear strips in turn on one thread', () => {
  for (const kernel of ['ts', 'wasm'] as const) {
    it(`equal the plain step for every strip count of a small basin, ${kernel === 'ts' ? 'TypeScript' : 'WebAssembly'} rows`, () => {
      const cfg = nonlinear(basin(25, 9, 'no', 3));
      const start = new Model(cfg, {
        kernel: 'ts',
        wind: changingWind(new Grid(cfg.basin, cfg.physics.earthRadius), 1e9),
      });
      start.advance(25); // some flow and a full history first
      const { grid, coefficients: c, physics } = start;
      let moved = 0;
      for (let strips = 1; strips <= 9; strips++) {
        const plain = new PlainNonlinear(
          cfg,
          {
            steady: true,
            fill: (_t, x, y) => {
              x.set(start.taux);
              y.set(start.tauy);
            },
          },
          start.state.clone(),
        );
        const { setup, binding } = createStripSetup(grid, c, physics, kernel, strips);
        const rows = Array.from({ length: strips }, (_, s) => stripStep(setup, s));
        const bounds = stripBounds(grid.ny, strips);
        const state = new State(grid);
        state.copyFrom(plain.state);
        binding.adopt(state);
        binding.setStress(start.taux, start.tauy);
        const p = new Float64Array(STEP_PARAMS);
        let cur = 0;
        for (let n = 0; n < 30; n++) {
          binding.stepParams(state, physics.friction, physics.viscosity, p);
          for (const k of rows) k.params(p);
          runStripsInTurn((s) => rows[s], cur, bounds);
          state.volumeBudget!.spongeMeasured -= binding.spongeTaken(cur);
          cur = 1 - cur;
          binding.bind(state, cur);
          binding.stepped(state);
          state.steps++;
          state.time = start.clock.timeAt(state.steps);
        }
        plain.advance(30);
        expect(differences(plain.state, state), `${strips} strips`).toEqual([]);
        moved = Math.max(moved, ...state.u.map(Math.abs));
      }
      expect(moved).toBeGreaterThan(1e-3);
    });
  }
});

describe('nonlinear strips on worker threads', () => {
  for (const kernel of ['ts', 'wasm'] as const) {
    for (const { name, cfg: linearCfg, threads, steps } of STRIP_CASES) {
      it(`${kernel === 'ts' ? 'TypeScript' : 'WebAssembly'} strips give the plain bits (${name})`, async () => {
        const cfg = nonlinear(linearCfg);
        const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
        const dt = new Model(cfg, { kernel: 'ts' }).dt;
        const plain = new PlainNonlinear(cfg, changingWind(grid, dt));
        const many = new Model(cfg, { kernel, wind: changingWind(grid, dt), threads });
        open.push(many);
        const counter = countingHost();
        const choice = await many.startThreads(counter.host);
        expect(choice.threads).toBe(threads);
        expect(many.stripKernel).toBe(kernel);
        expect(counter.started()).toBe(threads - 1);
        for (const n of steps) {
          plain.advance(n);
          many.advance(n);
          expect(differences(plain.state, many.state), `after ${plain.state.steps} steps`).toEqual([]);
        }
        await many.close();
        expect(await Promise.all(counter.exits)).toHaveLength(threads - 1);
        // after close the model goes on on one thread, from the same state
        plain.advance(5);
        many.advance(5);
        expect(differences(plain.state, many.state)).toEqual([]);
      });
    }
  }

  it('with the volume-keeping sponge: the plain bits, and the layer volume kept', async () => {
    const cfg = nonlinear(basin(48, 24, 'free', 4), true);
    const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
    const dt = new Model(cfg, { kernel: 'ts' }).dt;
    const plain = new PlainNonlinear(cfg, changingWind(grid, dt));
    const many = new Model(cfg, { kernel: 'wasm', wind: changingWind(grid, dt), threads: 3 });
    open.push(many);
    await many.startThreads(countingHost().host);
    const v0 = many.integrals().volume;
    plain.advance(240);
    many.advance(240);
    expect(differences(plain.state, many.state)).toEqual([]);
    const e = many.integrals();
    expect(Math.abs(e.volume - v0) / v0).toBeLessThan(1e-12);
    expect(e.spongeVolume).not.toBe(0);
  });

  for (const file of SHIPPED) {
    it(`${file}, switched to nonlinear, on 2 WebAssembly strips`, async () => {
      const sc = scenarioCase(file, ['physics.dynamics=nonlinear']);
      const probe = new Model(sc.cfg, { wind: sc.wind(), initial: sc.initial });
      probe.advance(200);
      while (probe.state.u.every((x) => x === 0) && probe.day < 60) probe.advance(200);
      const initial = probe.state.clone();
      const plain = new PlainNonlinear(sc.cfg, sc.wind(), initial);
      const many = new Model(sc.cfg, { wind: sc.wind(), initial, threads: 2 });
      open.push(many);
      await many.startThreads(countingHost().host);
      expect(many.threads).toBe(2);
      expect(many.stripKernel).toBe('wasm');
      plain.advance(150);
      many.advance(150);
      expect(differences(plain.state, many.state)).toEqual([]);
    });
  }
});
