// Each kind of bad input gets its own clear message that names the value, the limit and where.

import { describe, expect, it } from 'vitest';
import { BlowUpError, InputError } from '../../model/errors.ts';
import { Model } from '../../model/model.ts';
import { State } from '../../model/state.ts';
import { Grid } from '../../model/grid.ts';
import { basin, config, uniformStress } from '../support/physics-kit.ts';
import { EARTH } from '../../model/config.ts';

const b = basin(140, 180, -10, 10, 0.5);

function errorOf(fn: () => unknown): Error {
  try {
    fn();
  } catch (e) {
    return e as Error;
  }
  throw new Error('expected an error');
}

describe('refused input', () => {
  it('a dt above the CFL limit names the limit and the criterion', () => {
    const auto = new Model(config(b));
    const limit = auto.limit.dtMax;
    const e = errorOf(() => new Model(config(b, {}, limit * 1.1)));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toContain(`exceeds the stability limit ${Math.floor(limit)} s`);
    expect(e.message).toContain('set by gravity waves: c dt sqrt(1/dx^2 + 1/dy^2) <= 1');
    // Exactly at the limit is allowed.
    expect(new Model(config(b, {}, limit)).dt).toBe(limit);
  });

  it('a zero or negative dt', () => {
    expect(errorOf(() => new Model(config(b, {}, 0))).message).toMatch(/time step must be a positive number/);
    expect(errorOf(() => new Model(config(b, {}, -5))).message).toMatch(/time step must be a positive number/);
  });

  it("negative or zero g'", () => {
    for (const gp of [0, -0.02]) {
      const e = errorOf(() => new Model(config(b, { reducedGravity: gp })));
      expect(e).toBeInstanceOf(InputError);
      expect(e.message).toBe(`physics.reducedGravity: reduced gravity g' must be > 0 m s-2 (got ${gp})`);
    }
  });

  it('negative or zero H', () => {
    for (const H of [0, -100]) {
      expect(errorOf(() => new Model(config(b, { layerThickness: H }))).message).toBe(
        `physics.layerThickness: layer thickness H must be > 0 m (got ${H})`,
      );
    }
  });

  it('a basin smaller than its sponges', () => {
    const e = errorOf(
      () => new Model(config(b, { sponge: { widthDeg: 10, rateAtWall: 1e-5, conserveVolume: false } })),
    );
    expect(e.message).toBe(
      'basin.sponge.widthDeg: the two sponge bands (10° each) leave no interior in a basin 20° tall; make the bands narrower than 10° or the basin taller',
    );
  });

  it('a NaN in the initial state', () => {
    const grid = new Grid(b, config(b).physics.earthRadius);
    const s = new State(grid);
    s.h[grid.idx(5, 7)] = NaN;
    const e = errorOf(() => new Model(config(b), { initial: s }));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toBe(
      "initial: the initial state has h' = NaN at cell (5, 7) at 142.75°E, 6.25°S: a start must be finite",
    );
  });

  it('a restart state on another grid', () => {
    const other = new Grid(basin(140, 170, -10, 10, 0.5), EARTH.radius);
    expect(errorOf(() => new Model(config(b), { initial: new State(other) })).message).toMatch(
      /restart state is on a 60 x 40 grid, the scenario on 80 x 40/,
    );
  });

  it('a basin that is not a whole number of cells', () => {
    expect(errorOf(() => new Model(config(basin(140, 180.3, -10, 10, 0.5)))).message).toMatch(
      /not a whole number of 0.5 x 0.5 degree cells/,
    );
  });

  it('a surface layer deeper than the active layer', () => {
    expect(errorOf(() => new Model(config(b, { surfaceLayer: { depth: 200, damping: 1e-5 } }))).message).toMatch(
      /surface layer depth must lie between 0 and the layer thickness 150 m \(got 200\)/,
    );
  });
});

describe('blow-up detection', () => {
  it('an initial state deeper than the layer is refused before the first step', () => {
    const e = errorOf(
      () => new Model(config(b), { initial: { kind: 'bump', lon: 165, lat: 2, radiusDeg: 2, amplitude: -400 } }),
    );
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(
      /^initial: the initial state leaves no upper layer \(thickness -\d+\.\d m\) at cell \(\d+, \d+\) at 16\d\.\d+°E, \d\.\d+°N; h' must stay above -H = -150 m$/,
    );
  });

  it('a vanished layer stops the run with the day, the place and a hint', () => {
    // A gale of easterlies piles the layer up in the west and lifts the thermocline to the surface in the east.
    const m = new Model(config(b), { wind: uniformStress(config(b), -2) });
    const e = errorOf(() => m.advance(m.stepsUntil(60 * 86400)));
    expect(e).toBeInstanceOf(BlowUpError);
    const bu = e as BlowUpError;
    expect(bu.reason).toBe('layer-vanished');
    expect(bu.lon).toBeGreaterThan(160);
    expect(bu.day).toBeGreaterThan(0);
    expect(bu.message).toMatch(
      /^the run blew up on day \d+\.\d\d at 1\d\d\.\d\d°E, \d\.\d\d°[NS]: the upper layer vanished/,
    );
    expect(bu.message).toMatch(/nonlinear mode with entrainment/);
  });

  it('a dt that the gravity-wave limit allows but the viscous limit does not is refused', () => {
    const e = errorOf(() => new Model(config(b, { viscosity: 1e6 }, 20000)));
    expect(e.message).toMatch(/set by viscosity: A dt \(4\/dx\^2 \+ 4\/dy\^2\) <= 1/);
  });

  it('an unstable explicit Laplacian (viscosity raised after the time step was chosen) stops the run with a hint', () => {
    const m = new Model(config(b, { viscosity: 1e6 }), {
      initial: { kind: 'bump', lon: 160, lat: 0, radiusDeg: 1, amplitude: 1 },
    });
    // Force instability: quadruple the coefficient the time step was chosen for.
    (m.physics as { viscosity: number }).viscosity = 4e6;
    const e = errorOf(() => m.advance(5000));
    expect(e).toBeInstanceOf(BlowUpError);
    expect((e as BlowUpError).message).toMatch(/the run blew up on day/);
    expect((e as BlowUpError).message).toMatch(/time step is \d+ s/);
  });
});
