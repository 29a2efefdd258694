// Long equatorial Rossby wave, first meridional mode: westward at c/(2n+1) = c/3
// (Matsuno 1966; Gill 1982, ch. 11; check-values "Long RW speed", from a Wikipedia copy).
//
// Measuring it: in equatorial units the fields split into q = h'/H + u/c and r = h'/H - u/c.
// A Kelvin wave has r = 0, and the n-th Rossby mode has r proportional to the (n-1)-th Hermite
// function, so projecting r onto exp(-y^2/(2 L^2)) keeps the n = 1 Rossby wave alone (Gill 1982,
// §11.6; the algebra is in model/initial.ts). Its zonal centroid gives the speed. The initial
// state is the long-wave n = 1 shape with a zonal e-folding width of 15 degrees (about 5.5 L).

import { describe, expect, it } from 'vitest';
import { equatorialScales } from '../../model/initial.ts';
import { Model } from '../../model/model.ts';
import { basin, config, DAY, record } from '../support/physics-kit.ts';

describe('long first-mode Rossby wave (linear mode, 0.5 degree grid)', () => {
  it('travels west at c/3 within 5 %', () => {
    const b = basin(40, 300, -20.25, 20.25, 0.5);
    const m = new Model(config(b, { reducedGravity: 0.03, layerThickness: 150 }), {
      initial: { kind: 'rossby', lon: 260, amplitude: 5, zonalWidthDeg: 15 },
    });
    const { c, L } = equatorialScales(m.physics);
    const H = m.physics.layerThickness;
    const g = m.grid;
    const centroid = () => {
      const h = m.field('h_anom');
      const u = m.field('u');
      let sx = 0;
      let s = 0;
      for (let i = 0; i < g.nx; i++) {
        let R = 0;
        for (let j = 0; j < g.ny; j++) {
          const Y = g.yCentre[j] / L;
          const o = j * g.nx + i;
          R += (h[o] / H - u[o] / c) * Math.exp(-0.5 * Y * Y);
        }
        sx += g.lonCentre[i] * R;
        s += R;
      }
      return sx / s;
    };
    m.advance(m.stepsUntil(10 * DAY));
    const [d0, x0] = [m.day, centroid()];
    m.advance(m.stepsUntil(70 * DAY));
    const [d1, x1] = [m.day, centroid()];
    const speed = ((x0 - x1) * (g.dx / g.dLon)) / ((d1 - d0) * DAY);
    record('long Rossby n=1 westward speed', speed, c / 3, 'm/s', {
      source: 'Matsuno 1966; Gill 1982 ch. 11: c/3',
      tolerance: '5 %',
    });
    expect(Math.abs(speed / (c / 3) - 1)).toBeLessThan(0.05);
  });
});
