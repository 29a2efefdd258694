// A free equatorial Kelvin wave: eastward at c = sqrt(g' H), meridionally Gaussian with
// e-folding scale L = sqrt(c / beta), nondispersive (Matsuno 1966, J. Meteor. Soc. Japan 44;
// Gill 1982, Atmosphere-Ocean Dynamics, ch. 11; AMS Glossary "Equatorial Kelvin wave").
// On the C grid an exact v = 0 Kelvin solution keeps the continuum speed (Ng & Hsieh 1994, JGR 99).

import { describe, expect, it } from 'vitest';
import { equatorialScales } from '../../model/initial.ts';
import { Model } from '../../model/model.ts';
import { basin, config, DAY, linearFit, peak, record, row } from '../support/physics-kit.ts';

// 0.25 degree cells, no friction, no viscosity, closed walls far from the wave.
const RES = 0.25;
const b = basin(140, 270, -15.125, 15.125, RES);

function track(
  physics: { reducedGravity: number; layerThickness: number; mode?: 'linear' | 'nonlinear' },
  amplitude = 10,
) {
  const m = new Model(config(b, { ...physics, mode: physics.mode ?? 'linear' }), {
    initial: { kind: 'kelvin', lon: 160, amplitude, zonalWidthDeg: 5 },
  });
  const j0 = m.grid.nearestRow(0);
  const lons = Array.from(m.grid.lonCentre);
  const at = (day: number) => {
    m.advance(m.stepsUntil(day * DAY));
    const h = m.field('h_anom');
    const p = peak(lons, row(h, m.grid, j0));
    // Meridional profile through the peak: ln(h/h0) = -y^2 / (2 L^2) over |y| < 2 L.
    const i = Math.round((p.x - b.lonWest) / RES - 0.5);
    const { L } = equatorialScales(m.physics);
    const ys: number[] = [];
    const logs: number[] = [];
    for (let j = 0; j < m.grid.ny; j++) {
      const y = m.grid.yCentre[j];
      if (Math.abs(y) < 2 * L) {
        ys.push(y * y);
        logs.push(Math.log(h[j * m.grid.nx + i] / h[j0 * m.grid.nx + i]));
      }
    }
    const fitL = Math.sqrt(-1 / (2 * linearFit(ys, logs).slope));
    return { day: m.day, lon: p.x, amp: p.y, fitL };
  };
  return { m, at };
}

describe('free equatorial Kelvin wave (linear mode, 0.25 degree grid)', () => {
  for (const [gp, H] of [
    [0.02, 150],
    [0.04, 200],
  ]) {
    it(`g' = ${gp}, H = ${H}: speed sqrt(g'H) within 2 %, width sqrt(c/beta) within 5 %, amplitude kept within 5 % over 30 days`, () => {
      const { m, at } = track({ reducedGravity: gp, layerThickness: H });
      const { c, L } = equatorialScales(m.physics);
      const a = at(5);
      const z = at(30);
      const degToM = m.grid.dx / m.grid.dLon;
      const speed = ((z.lon - a.lon) * degToM) / ((z.day - a.day) * DAY);
      record(`Kelvin speed, g'=${gp}, H=${H}`, speed, c, 'm/s', {
        source: "Matsuno 1966; Gill 1982 ch. 11: c = sqrt(g' H)",
        tolerance: '2 %',
      });
      record(`Kelvin meridional scale, g'=${gp}, H=${H}`, z.fitL / 1000, L / 1000, 'km', {
        source: 'L = sqrt(c / beta); AMS Glossary',
        tolerance: '5 %',
      });
      record(`Kelvin amplitude after 30 days, g'=${gp}, H=${H}`, z.amp, 10, 'm', {
        source: 'nondispersive; exact on the C grid (Ng & Hsieh 1994)',
        tolerance: '5 %',
      });
      expect(Math.abs(speed / c - 1)).toBeLessThan(0.02);
      expect(Math.abs(z.fitL / L - 1)).toBeLessThan(0.05);
      expect(Math.abs(z.amp / 10 - 1)).toBeLessThan(0.05);
      // Nothing leaks west: the wave is one-signed and eastward only.
      const h = m.field('h_anom');
      const west = row(h, m.grid, m.grid.nearestRow(0)).slice(0, Math.round((a.lon - 140) / RES));
      expect(Math.max(...west.map(Math.abs))).toBeLessThan(0.05 * 10);
    });
  }

  it('nonlinear mode, small amplitude: the same speed within 2 %', () => {
    const { m, at } = track({ reducedGravity: 0.03, layerThickness: 150, mode: 'nonlinear' }, 1);
    const { c } = equatorialScales(m.physics);
    const a = at(5);
    const z = at(25);
    const speed = ((z.lon - a.lon) * (m.grid.dx / m.grid.dLon)) / ((z.day - a.day) * DAY);
    record('Kelvin speed, nonlinear mode, 1 m amplitude', speed, c, 'm/s', {
      source: 'Matsuno 1966; Gill 1982 (finite amplitude speeds it up slightly)',
      tolerance: '2 %',
    });
    expect(Math.abs(speed / c - 1)).toBeLessThan(0.02);
    expect(Math.abs(z.amp - 1)).toBeLessThan(0.05);
  });
});
