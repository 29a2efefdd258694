// A downwelling equatorial Kelvin wave reaching an eastern coast: part of its signal turns
// poleward along the coast as coastal Kelvin waves (north and south, symmetric), and the rest
// reflects as westward long Rossby waves with h' maxima off the equator (Gill 1982, §11.11;
// Moore 1968 as cited there, from memory). A qualitative check with numbers: the coastal
// signal at 8 degrees from the equator and the energy found west of the coast after reflection.

import { describe, expect, it } from 'vitest';
import { Model } from '../../model/model.ts';
import { basin, config, DAY, record } from '../support/physics-kit.ts';

describe('Kelvin wave reflection at an eastern coast (linear, 0.25 degree grid)', () => {
  const b = basin(130, 200, -20.125, 20.125, 0.25);
  const m = new Model(
    config(b, {
      reducedGravity: 0.03,
      layerThickness: 150,
      sponge: { widthDeg: 4, rateAtWall: 1 / (2 * DAY), conserveVolume: false },
    }),
    { initial: { kind: 'kelvin', lon: 160, amplitude: 10, zonalWidthDeg: 4 } },
  );
  const g = m.grid;
  const e0 = m.integrals().energy;
  const coastH = (lat: number) => m.field('h_anom')[g.nearestRow(lat) * g.nx + g.nx - 1];
  /** Energy (J) of the cells west of a longitude, from cell-centred fields. */
  const energyWestOf = (lonMax: number) => {
    const h = m.field('h_anom');
    const u = m.field('u');
    const v = m.field('v');
    let s = 0;
    for (let j = 0; j < g.ny; j++) {
      for (let i = 0; i < g.nx; i++) {
        if (g.lonCentre[i] >= lonMax) continue;
        const o = j * g.nx + i;
        if (Number.isNaN(h[o])) continue;
        s += m.physics.layerThickness * (u[o] ** 2 + v[o] ** 2) + m.physics.reducedGravity * h[o] ** 2;
      }
    }
    return 0.5 * m.physics.density * g.dx * g.dy * s;
  };

  it('before arrival the coast is quiet', () => {
    m.advance(m.stepsUntil(10 * DAY));
    expect(Math.abs(coastH(8))).toBeLessThan(0.01);
    expect(Math.abs(coastH(-8))).toBeLessThan(0.01);
  });

  it('after arrival the signal runs poleward along the coast, north and south alike', () => {
    m.advance(m.stepsUntil(30 * DAY));
    const north = coastH(8);
    const south = coastH(-8);
    record("coastal h' at 8N on the eastern coast, day 30 (incident 10 m)", north, NaN, 'm', {
      source: 'Gill 1982 §11.11 (from memory)',
      tolerance: '> 3 m, N = S',
    });
    expect(north).toBeGreaterThan(3);
    expect(Math.abs(north - south)).toBeLessThan(1e-6 * Math.abs(north));
  });

  it('reflected Rossby waves carry energy back west', () => {
    m.advance(m.stepsUntil(60 * DAY));
    const west = energyWestOf(195) / e0;
    record('energy west of 195E at day 60 / initial energy', west, NaN, '', {
      source: 'Gill 1982 §11.11 (from memory): reflected long Rossby waves',
      tolerance: '> 10 %',
    });
    // The incident wave left this region entirely by day 30 (1.8 % left, measured), so what is
    // here now came back from the coast.
    expect(west).toBeGreaterThan(0.1);
    // The reflection is downwelling off the equator: h' > 0 at 15 degrees west of the coast, 3.4 N.
    const h = m.field('h_anom');
    const cell = g.cellAt(185, 3.4)!;
    expect(h[cell.j * g.nx + cell.i]).toBeGreaterThan(0.5);
  });
});
