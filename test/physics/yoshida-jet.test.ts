// Yoshida jet: uniform zonal stress switched on over an ocean whose zonal walls are still far
// away. On the equator f = 0 and there is no zonal pressure gradient, so u = tau t / (rho0 H)
// (Yoshida 1959; Moore & Philander 1977; check-values §5, derived). Far from the equator the
// response is Ekman-like: the time mean of v over whole inertial periods is -tau / (rho0 H f)
// (Ekman balance -f v = tau/(rho0 H); common practice, no source).

import { describe, expect, it } from 'vitest';
import { calm } from '../../model/forcing/stress.ts';
import { Model } from '../../model/model.ts';
import { basin, config, DAY, record, uniformStress } from '../support/physics-kit.ts';

const TAU = 0.05;
// 200 degrees wide: the Kelvin wave from the western wall needs about 40 days to reach mid-basin.
const b = basin(0, 200, -20.25, 20.25, 0.5);

describe('Yoshida jet under a uniform westerly stress', () => {
  it('equatorial u grows as tau t / (rho0 H) within 3 % over the first days', () => {
    const cfg = config(b, { reducedGravity: 0.03, layerThickness: 150 });
    const m = new Model(cfg, { wind: uniformStress(cfg, TAU) });
    const j0 = m.grid.nearestRow(0);
    expect(m.grid.latCentre[j0]).toBe(0);
    const iMid = Math.round(m.grid.nx / 2);
    for (const day of [1, 2, 3, 5, 8]) {
      m.advance(m.stepsUntil(day * DAY));
      const u = m.field('u')[j0 * m.grid.nx + iMid];
      const theory = (TAU * m.state.time) / (m.physics.density * m.physics.layerThickness);
      record(`Yoshida jet u on the equator, day ${day}`, u, theory, 'm/s', {
        source: 'Yoshida 1959; Moore & Philander 1977: u = tau t / (rho0 H)',
        tolerance: '3 %',
      });
      expect(Math.abs(u / theory - 1)).toBeLessThan(0.03);
    }
  });

  it('off the equator (12 N) the mean meridional flow is the Ekman drift -tau/(rho0 H f) within 5 %', () => {
    const cfg = config(b, { reducedGravity: 0.03, layerThickness: 150 });
    const m = new Model(cfg, { wind: uniformStress(cfg, TAU) });
    const j = m.grid.nearestRow(12);
    const lat = m.grid.latCentre[j];
    const f = m.coriolisAt(lat);
    const period = (2 * Math.PI) / f;
    const iMid = Math.round(m.grid.nx / 2);
    m.advance(m.stepsUntil(3 * DAY));
    const t0 = m.state.time;
    let sum = 0;
    let n = 0;
    while (m.state.time < t0 + 3 * period) {
      m.advance(1);
      sum += m.field('v')[j * m.grid.nx + iMid];
      n++;
    }
    const vMean = sum / n;
    const theory = -TAU / (m.physics.density * m.physics.layerThickness * f);
    record('Ekman drift at 12N (mean v)', vMean, theory, 'm/s', {
      source: 'v = -tau / (rho0 H f) (common practice)',
      tolerance: '5 %',
    });
    expect(Math.abs(vMean / theory - 1)).toBeLessThan(0.05);
  });

  it("without wind nothing moves (the jet is the wind's)", () => {
    const m = new Model(config(b, { reducedGravity: 0.03, layerThickness: 150 }), { wind: calm });
    m.advance(50);
    expect(m.integrals().maxSpeed).toBe(0);
  });
});
