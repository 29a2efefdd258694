// The output fields' surface-layer split agrees with the point balance of model/surface-layer.ts,
// and that balance solves r_s us - f vs = X, r_s vs + f us = Y exactly (the design's equations).

import { describe, expect, it } from 'vitest';
import { Model } from '../../model/model.ts';
import { surfaceShear } from '../../model/surface-layer.ts';
import { basin, config, windOn } from '../support/physics-kit.ts';

describe('surface layer', () => {
  it('the point balance solves its two equations', () => {
    const rho0 = 1025;
    const H1 = 50;
    const rs = 1 / (2 * 86400);
    for (const [tx, ty, f] of [
      [-0.05, 0.01, 0],
      [0.1, -0.02, 3e-5],
      [0, 0.05, -5e-5],
    ]) {
      const { us, vs } = surfaceShear(tx, ty, f, rho0, H1, rs);
      expect(rs * us - f * vs).toBeCloseTo(tx / (rho0 * H1), 15);
      expect(rs * vs + f * us).toBeCloseTo(ty / (rho0 * H1), 15);
    }
  });

  it('u_surf, v_surf, u_below, v_below follow from the layer mean and the shear', () => {
    const cfg = config(basin(140, 160, -10, 10, 1));
    const wind = windOn(cfg, [
      {
        kind: 'fixed',
        quantity: 'stress',
        source: { kind: 'shaped', shape: { kind: 'uniform' }, x: -0.06, y: 0.02 },
        envelope: { kind: 'constant' },
      },
    ]);
    const m = new Model(cfg, { wind });
    m.advance(30);
    const p = m.physics;
    const H = p.layerThickness;
    const H1 = p.surfaceLayer.depth;
    const [u, v, us, vs, ub, vb, tx, ty] = (
      ['u', 'v', 'u_surf', 'v_surf', 'u_below', 'v_below', 'taux', 'tauy'] as const
    ).map((n) => m.field(n));
    for (const o of [0, 57, 211, 399]) {
      const j = Math.floor(o / m.grid.nx);
      const s = surfaceShear(tx[o], ty[o], m.fCentre[j], p.density, H1, p.surfaceLayer.damping);
      expect(us[o]).toBeCloseTo(u[o] + ((H - H1) / H) * s.us, 12);
      expect(vs[o]).toBeCloseTo(v[o] + ((H - H1) / H) * s.vs, 12);
      expect(ub[o]).toBeCloseTo(u[o] - (H1 / H) * s.us, 12);
      expect(vb[o]).toBeCloseTo(v[o] - (H1 / H) * s.vs, 12);
    }
  });
});
