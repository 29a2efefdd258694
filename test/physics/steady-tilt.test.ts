// Steady zonal balance on the equator under the trades: g' dh'/dx = taux / (rho0 H), so across
// a basin of width W the thermocline tilts by taux W / (rho0 g' H) and the sea surface by
// taux W / (rho0 g H) (Sverdrup 1947 as quoted by McPhaden & Taft 1988: dP/dx = taux on the
// equator). With typical trades of 0.05 N m-2 over about 15,000 km the sea surface stands
// about half a metre higher in the west (fact of the trade, common practice; the observed
// 0.4-0.6 m is in check-values §4, UCSD Earthguide / UIUC WW2010).
// The same spun-up state checks the surface layer: under easterlies the surface flow on the
// equator is westward and the flow beneath the surface layer eastward.

import { describe, expect, it } from 'vitest';
import { Model } from '../../model/model.ts';
import { basin, config, DAY, linearFit, record, row, uniformStress } from '../support/physics-kit.ts';

const TAU = -0.05;

/** Spin a closed basin up under uniform easterlies; fit h' along the equator over its middle 60 %. */
function spinUp(width: number, res: number, gp: number, H: number, years: number) {
  const edge = 20 + res / 2; // an odd number of rows puts one row on the equator
  const b = basin(100, 100 + width, -edge, edge, res);
  const m = new Model(
    config(b, {
      reducedGravity: gp,
      layerThickness: H,
      friction: 1 / (365 * DAY),
      sponge: { widthDeg: 5, rateAtWall: 1 / (5 * DAY), conserveVolume: false },
    }),
    { wind: uniformStress(config(b), TAU) },
  );
  m.advance(m.stepsUntil(years * 365 * DAY));
  const j0 = m.grid.nearestRow(0);
  const h = row(m.field('h_anom'), m.grid, j0);
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < m.grid.nx; i++) {
    const f = (m.grid.lonCentre[i] - b.lonWest) / width;
    if (f > 0.2 && f < 0.8) {
      xs.push(m.grid.lonCentre[i] * (m.grid.dx / m.grid.dLon));
      ys.push(h[i]);
    }
  }
  return { m, j0, slope: linearFit(xs, ys).slope, widthMetres: width * (m.grid.dx / m.grid.dLon) };
}

describe('steady tilt under uniform trades (linear mode, closed basin, r = 1/year)', () => {
  const run = spinUp(60, 0.5, 0.03, 150, 4);

  it("equatorial slope of h' is taux / (rho0 g' H) within 5 %", () => {
    const theory = TAU / (1025 * 0.03 * 150);
    record('equatorial thermocline slope, 60 deg basin, 4 years', run.slope, theory, 'm/m', {
      source: "g'H dh/dx = taux/rho0 (McPhaden & Taft 1988 quoting Sverdrup 1947)",
      tolerance: '5 %',
    });
    expect(Math.abs(run.slope / theory - 1)).toBeLessThan(0.05);
    // Deeper thermocline in the west (h' positive down): the slope is negative west to east.
    expect(run.slope).toBeLessThan(0);
  });

  it('surface flow westward and flow beneath the surface layer eastward on the equator', () => {
    const { m, j0 } = run;
    const mid = Math.round(m.grid.nx / 2);
    const uSurf = row(m.field('u_surf'), m.grid, j0)[mid];
    const uBelow = row(m.field('u_below'), m.grid, j0)[mid];
    const uMean = row(m.field('u'), m.grid, j0)[mid];
    record('surface u on the equator under easterlies', uSurf, NaN, 'm/s', {
      source: 'design of the surface layer (westward surface flow under easterlies)',
      tolerance: '< -0.05 m/s',
    });
    record('u beneath the surface layer on the equator', uBelow, NaN, 'm/s', {
      source: 'design of the surface layer (eastward flow beneath)',
      tolerance: '> 0.02 m/s',
    });
    expect(uSurf).toBeLessThan(-0.05);
    expect(uBelow).toBeGreaterThan(0.02);
    // The split leaves the layer mean as it was: H1 u_surf + (H - H1) u_below = H u.
    const { depth: H1 } = m.physics.surfaceLayer;
    const H = m.physics.layerThickness;
    expect(H1 * uSurf + (H - H1) * uBelow).toBeCloseTo(H * uMean, 10);
  });

  it('a 135 degree (15,000 km) basin under 0.05 N m-2 trades: about half a metre of sea level, west high', () => {
    const wide = spinUp(135, 1, 0.05, 150, 5);
    const rise = (-wide.slope * wide.widthMetres * wide.m.physics.reducedGravity) / wide.m.physics.gravity;
    const theory = (-TAU * wide.widthMetres) / (1025 * wide.m.physics.gravity * 150);
    record('west-minus-east sea level, 15,000 km basin', rise, theory, 'm', {
      source: 'fact of the trade; 0.4-0.6 m observed (check-values §4)',
      tolerance: '0.4-0.6 m and 5 %',
    });
    expect(rise).toBeGreaterThan(0.4);
    expect(rise).toBeLessThan(0.6);
    expect(Math.abs(rise / theory - 1)).toBeLessThan(0.05);
  });
});
