// configs/counter-current.json: trades with a weak-wind band at 7N; after spin-up an eastward
// counter current flows in the band between westward flows.
// References: Sverdrup balance beta V = curl(tau)/rho0 (standard; check-values §4, from memory)
// and the NECC mechanism, a dynamic-height ridge south and trough north of the weak-wind band from
// Ekman convergence and divergence (AMS Glossary, "North Equatorial Countercurrent"; Kessler,
// Johnson & Moore 2003, JPO 33, 994; check-values §4). With V from Sverdrup and U = 0 at the east
// coast, continuity gives U(x) = (x_east - x) dV/dy, so U has the sign of d(curl)/dy.

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import type { Model } from '../../model/model.ts';
import { boxMean, build } from '../support/shipped-scenarios.ts';

/** Zonal means over a longitude band, for every row: [lat, value]. */
function profile(m: Model, name: 'u' | 'h_anom' | 'taux', lon: [number, number]): Array<[number, number]> {
  const f = m.field(name);
  return Array.from(m.grid.latCentre, (lat) => [lat, boxMean(f, m, lon, [lat - 1e-6, lat + 1e-6])] as [number, number]);
}

/** Latitudes (linear interpolation) where the values change sign, between lat0 and lat1. */
function signChanges(p: Array<[number, number]>, lat0: number, lat1: number): number[] {
  const out: number[] = [];
  for (let k = 1; k < p.length; k++) {
    const [y0, v0] = p[k - 1];
    const [y1, v1] = p[k];
    if (y0 < lat0 || y1 > lat1) continue;
    if (v0 === 0 || v0 * v1 < 0) out.push(y0 + (v0 / (v0 - v1)) * (y1 - y0));
  }
  return out;
}

describe('counter current scenario', () => {
  it('after three years an eastward current flows in the weak-wind band between westward flows, where Sverdrup puts it', () => {
    const { model: m, r } = build('counter-current.json');
    m.advance(m.stepsUntil(r.runSeconds));
    const part = r.wind.parts[0];
    if (
      part.kind !== 'fixed' ||
      part.source.kind !== 'shaped' ||
      part.source.shape.kind !== 'band' ||
      part.source.shape.profile.kind !== 'gap'
    ) {
      throw new Error('counter-current.json should hold trades with a gap profile');
    }
    const gap = part.source.shape.profile;
    // East of mid-basin, where the long Rossby waves from the east coast have set up Sverdrup flow.
    const band: [number, number] = [60, 80];
    const u = profile(m, 'u', band);
    const uAt = (lat: number) => boxMean(m.field('u'), m, band, [lat - 0.3, lat + 0.3]);

    // Eastward in the band, westward on either side (at the flanks of the curl pattern, 2 widths out).
    const inBand = uAt(gap.centre);
    const south = uAt(gap.centre - 2 * gap.width);
    const north = uAt(gap.centre + 2 * gap.width);
    record('counter current: u in the weak-wind band at 60-80E', inBand, NaN, 'm/s', {
      source: 'NECC 0.1-0.6 m/s observed (AMS Glossary), order of magnitude',
      tolerance: '0.05-1.5 m/s',
    });
    expect(inBand).toBeGreaterThan(0.05);
    expect(south).toBeLessThan(-0.02);
    expect(north).toBeLessThan(-0.02);
    // Of the observed size, order of magnitude only: NECC 0.1-0.6 m/s (AMS Glossary, check-values §4).
    expect(inBand).toBeLessThan(1.5);

    // d(curl)/dy from the model's own stress (zonally uniform here, so the zonal integral has the
    // same shape): curl = -dtaux/dy, d(curl)/dy = -d2taux/dy2, by centred differences on the rows.
    const tx = profile(m, 'taux', band);
    const dcurl: Array<[number, number]> = [];
    for (let k = 1; k + 1 < tx.length; k++) dcurl.push([tx[k][0], -(tx[k + 1][1] - 2 * tx[k][1] + tx[k - 1][1])]);
    const lo = gap.centre - 4 * gap.width;
    const hi = gap.centre + 4 * gap.width;
    // The eastward maximum sits where d(curl)/dy is largest (within 1 degree).
    const inRange = (p: Array<[number, number]>) =>
      p.filter(([y]) => y > gap.centre - 2 * gap.width && y < gap.centre + 2 * gap.width);
    const uMax = inRange(u).reduce((a, b) => (b[1] > a[1] ? b : a));
    const dMax = inRange(dcurl).reduce((a, b) => (b[1] > a[1] ? b : a));
    record('counter current: latitude of the eastward maximum (deg N)', uMax[0], dMax[0], 'deg', {
      source: 'Sverdrup balance: where d(curl)/dy peaks (Sverdrup 1947)',
      tolerance: '1 degree',
    });
    expect(Math.abs(uMax[0] - dMax[0])).toBeLessThanOrEqual(1);
    // The current changes sign where d(curl)/dy does, on both edges of the band (within 1 degree).
    const uEdges = signChanges(u, gap.centre - 1.6 * gap.width, gap.centre + 1.6 * gap.width);
    const dEdges = signChanges(dcurl, lo, hi).filter((y) => Math.abs(y - gap.centre) < 1.6 * gap.width);
    expect(dEdges.length).toBe(2);
    expect(uEdges.length).toBe(2);
    for (let k = 0; k < 2; k++) {
      record(`counter current: edge ${k} of the eastward flow (deg N)`, uEdges[k], dEdges[k], 'deg', {
        source: 'Sverdrup balance: where d(curl)/dy changes sign',
        tolerance: '1 degree',
      });
      expect(Math.abs(uEdges[k] - dEdges[k])).toBeLessThanOrEqual(1);
    }

    // Ridge south and trough north of the band in h' (positive down: ridge of sea level = deeper
    // thermocline): h' falls northward across the band, which is what makes u geostrophically eastward.
    const h = profile(m, 'h_anom', band);
    const hAt = (lat: number) => h.reduce((a, b) => (Math.abs(b[0] - lat) < Math.abs(a[0] - lat) ? b : a))[1];
    const ridge = Math.max(...h.filter(([y]) => y > gap.centre - 2 * gap.width && y < gap.centre).map(([, v]) => v));
    const trough = Math.min(...h.filter(([y]) => y > gap.centre && y < gap.centre + 2 * gap.width).map(([, v]) => v));
    expect(ridge).toBeGreaterThan(hAt(gap.centre));
    expect(trough).toBeLessThan(hAt(gap.centre));
    // The ridge is a local maximum: higher than the equator's h' too.
    expect(ridge).toBeGreaterThan(hAt(0));
  });
});
