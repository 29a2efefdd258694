// Every fast path of the nonlinear step must reproduce the plain statement (nonlinearStep in
// model/dynamics/nonlinear.ts) bit for bit: the TypeScript rows and the WebAssembly SIMD rows on
// one thread, through Model.advance, with the history, the multistep order, the clock and the
// sponge volume of the budget carried alike. On every shipped scenario switched to nonlinear
// (configs/*.json with --set physics.dynamics=nonlinear) and on the set-ups of the nonlinear
// physics tests (conservation, entrainment, Kelvin wave, sponge volume). The strips are in
// test/parallel/nonlinear-strips.test.ts.

import { describe, expect, it } from 'vitest';
import type { ModelConfig } from '../../model/config.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { Model, type ModelOptions } from '../../model/model.ts';
import { basin, config, uniformStress } from '../support/physics-kit.ts';
import { differences, PlainNonlinear } from '../support/plain-nonlinear.ts';
import { scenarioCase, SHIPPED } from '../support/scenario-cases.ts';

const calm: () => WindStress = () => ({
  steady: true,
  fill: (_t, x, y) => {
    x.fill(0);
    y.fill(0);
  },
});

/** Largest |u| of a state: the comparison is worth something only where the flow moves. */
const speed = (m: { state: { u: ArrayLike<number> } }) => {
  let top = 0;
  for (let k = 0; k < m.state.u.length; k++) top = Math.max(top, Math.abs(m.state.u[k]));
  return top;
};

/** Plain, TypeScript and WebAssembly runs from the same start, compared after each count of steps. */
function compare(
  cfg: ModelConfig,
  wind: () => WindStress,
  initial: ModelOptions['initial'],
  counts: number[],
): { plain: PlainNonlinear; wasm: Model } {
  const plain = new PlainNonlinear(cfg, wind(), initial);
  const ts = new Model(cfg, { wind: wind(), kernel: 'ts', ...(initial ? { initial } : {}) });
  const wasm = new Model(cfg, { wind: wind(), kernel: 'wasm', ...(initial ? { initial } : {}) });
  expect(wasm.kernel).toBe('wasm');
  for (const n of counts) {
    plain.advance(n);
    ts.advance(n);
    wasm.advance(n);
    expect(differences(plain.state, ts.state), `TypeScript rows after ${plain.state.steps} steps`).toEqual([]);
    expect(differences(plain.state, wasm.state), `WebAssembly rows after ${plain.state.steps} steps`).toEqual([]);
  }
  return { plain, wasm };
}

describe('nonlinear step: TypeScript and WebAssembly rows against the plain step', () => {
  for (const file of SHIPPED) {
    it(`${file}, switched to nonlinear`, () => {
      const sc = scenarioCase(file, ['physics.dynamics=nonlinear']);
      // A scenario whose wind starts later is compared from the first state that moves (a
      // restart of a state some model has run, history and clock included).
      let initial: ModelOptions['initial'] = sc.initial;
      const probe = new Model(sc.cfg, { wind: sc.wind(), initial: sc.initial });
      probe.advance(300);
      while (speed(probe) === 0 && probe.day < 60) probe.advance(200);
      if (probe.state.steps > 300) initial = probe.state.clone();
      const { wasm } = compare(sc.cfg, sc.wind, initial, [1, 2, 97, 200]);
      expect(speed(wasm)).toBeGreaterThan(1e-3);
    });
  }
});

describe('nonlinear step on the set-ups of the physics tests', () => {
  // conservation.test.ts: a closed basin with an island and a coast polygon, a bump, viscosity
  const land = [
    { kind: 'rectangle' as const, lonWest: 150, lonEast: 153, latSouth: -1, latNorth: 2 },
    {
      kind: 'polygon' as const,
      points: [
        [170, -10],
        [175, -10],
        [175, 0],
        [172, 4],
      ] as Array<[number, number]>,
    },
  ];
  const closed = basin(140, 180, -10, 10, 0.5, land);
  const bump = { kind: 'bump' as const, lon: 160, lat: 3, radiusDeg: 3, amplitude: 20 };
  for (const slip of ['free', 'no'] as const) {
    it(`conservation: closed basin with land, ${slip} slip`, () => {
      const cfg = config(closed, {
        mode: 'nonlinear',
        viscosity: 500,
        slip,
        entrainment: { minThickness: 0, time: 86400 },
      });
      const { wasm } = compare(cfg, calm, bump, [1, 1, 1, 300]);
      expect(speed(wasm)).toBeGreaterThan(1e-3);
    });
  }

  it('entrainment: strong upwelling under a thin layer (the entrainment branch taken)', () => {
    const cfg = config(basin(140, 170, -10.25, 10.25, 0.5), {
      mode: 'nonlinear',
      layerThickness: 60,
      viscosity: 2000,
      entrainment: { minThickness: 40, time: 0.5 * 86400 },
    });
    const { wasm } = compare(cfg, calm, { kind: 'bump', lon: 155, lat: 0, radiusDeg: 4, amplitude: -30 }, [1, 2, 200]);
    const thinnest = wasm.integrals().minThickness;
    expect(thinnest).toBeLessThan(60);
    expect(wasm.integrals().entrainedVolume).toBeGreaterThan(0);
  });

  it('Kelvin wave, 1 m amplitude, 0.25 degree cells', () => {
    const cfg = config(basin(140, 270, -15.125, 15.125, 0.25), {
      mode: 'nonlinear',
      reducedGravity: 0.03,
      layerThickness: 150,
    });
    const { wasm } = compare(cfg, calm, { kind: 'kelvin', lon: 160, amplitude: 1, zonalWidthDeg: 5 }, [1, 1, 150]);
    expect(speed(wasm)).toBeGreaterThan(1e-3);
  });

  for (const conserveVolume of [false, true]) {
    it(`sponge bands (${conserveVolume ? 'volume-keeping' : 'relaxation to rest'}): the budget's sponge volume the same bits`, () => {
      const sponge = { widthDeg: 4, rateAtWall: 1 / (2 * 86400), conserveVolume };
      const cfg = config(basin(0, 40, -15, 15, 0.5), {
        reducedGravity: 0.03,
        layerThickness: 150,
        viscosity: 2000,
        sponge,
        mode: 'nonlinear',
      });
      const { plain } = compare(cfg, calm, { kind: 'bump', lon: 20, lat: 0, amplitude: 10, radiusDeg: 3 }, [1, 1, 400]);
      expect(plain.state.volumeBudget!.spongeMeasured).not.toBe(0);
    });
  }

  it('sponge with entrainment under easterlies (sponge and entrainment budget)', () => {
    const cfg = config(basin(0, 30, -10, 10, 1), {
      reducedGravity: 0.03,
      layerThickness: 80,
      viscosity: 30_000,
      mode: 'nonlinear',
      sponge: { widthDeg: 3, rateAtWall: 1 / (2 * 86400), conserveVolume: false },
      entrainment: { minThickness: 60, time: 86400 },
    });
    const { wasm } = compare(cfg, () => uniformStress(cfg, -0.05), undefined, [1, 2, 300]);
    expect(speed(wasm)).toBeGreaterThan(1e-3);
  });

  it('a restart state (history and clock of another run) continues bit for bit on every path', () => {
    const cfg = config(closed, { mode: 'nonlinear', viscosity: 500 });
    const first = new Model(cfg, { initial: bump, kernel: 'wasm' });
    first.advance(37);
    expect(first.state.historyCount).toBe(2);
    compare(cfg, calm, first.state.clone(), [1, 50]);
  });

  it('the comparison sees a change of one bit of physics', () => {
    const cfg = config(closed, { mode: 'nonlinear', viscosity: 500 });
    const a = new Model(cfg, { initial: bump, kernel: 'wasm' });
    const b = new Model(
      { ...cfg, physics: { ...cfg.physics, viscosity: 500 * (1 + 2 ** -52) } },
      { initial: bump, kernel: 'wasm' },
    );
    a.advance(20);
    b.advance(20);
    expect(differences(a.state, b.state)).toContain('u');
  });
});
