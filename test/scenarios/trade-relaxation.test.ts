// configs/trade-spinup.json and configs/trade-relaxation.json: trades spin up a steady tilt, then
// the western trades switch off for two months. The spin-up is run here with buildModel and its end
// state handed in as the start (the engine resolves initial 'spinup' itself).
//
// The relaxation's effect is isolated by a control run from the same start with the relaxation part
// disabled; the model is linear, so the difference is the response to the relaxation alone.

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import type { Model } from '../../model/model.ts';
import { build, DAY, firstCrossing, metresPerDegree, peakIndex, startOfNewRun } from '../support/shipped-scenarios.ts';

/** Equatorial row values of a centred field between two longitudes (centres). */
function equatorRow(m: Model, name: 'h_anom' | 'taux', lonA: number, lonB: number): { lon: number[]; v: number[] } {
  const f = m.field(name);
  const j = m.grid.nearestRow(0);
  const lon: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < m.grid.nx; i++) {
    const x = m.grid.lonCentre[i];
    if (x >= lonA && x <= lonB) {
      lon.push(x);
      v.push(f[j * m.grid.nx + i]);
    }
  }
  return { lon, v };
}

describe('trade relaxation scenario (after the trade spin-up)', () => {
  it('spins up the steady tilt, then the eastern thermocline deepens on Kelvin time and the signal reflects west', () => {
    // --- Spin-up: three years of trades.
    const sp = build('trade-spinup.json');
    const spin = sp.model;
    spin.advance(spin.stepsUntil(sp.r.runSeconds));
    const p = spin.physics;
    const c = Math.sqrt(p.reducedGravity * p.layerThickness);
    const mPerDeg = metresPerDegree(spin);

    // Steady zonal balance on the equator, g'H dh/dx = taux/rho0 (DESIGN §7; McPhaden & Taft 1988
    // quoting Sverdrup 1947, check-values §4): fit the slope over the interior, away from the coasts.
    const eq = equatorRow(spin, 'h_anom', 20, 120);
    const tau = equatorRow(spin, 'taux', 20, 120).v;
    const n = eq.lon.length;
    const mx = eq.lon.reduce((s, x) => s + x, 0) / n;
    const my = eq.v.reduce((s, y) => s + y, 0) / n;
    let sxy = 0;
    let sxx = 0;
    for (let k = 0; k < n; k++) {
      sxy += (eq.lon[k] - mx) * (eq.v[k] - my);
      sxx += (eq.lon[k] - mx) ** 2;
    }
    // With h = H + h': dh'/dx = taux/(rho0 g' H), negative under easterlies (shallower in the east).
    const slope = sxy / sxx / mPerDeg;
    const tauMean = tau.reduce((s, t) => s + t, 0) / tau.length;
    const expectedSlope = tauMean / (p.density * p.reducedGravity * p.layerThickness);
    record(
      'trade spin-up: equatorial thermocline slope (m per 1000 km)',
      slope * 1e6,
      expectedSlope * 1e6,
      'm/1000 km',
      { source: "g'H dh/dx = taux/rho0 (McPhaden & Taft 1988 quoting Sverdrup 1947)", tolerance: '15 %' },
    );
    expect(Math.abs(slope / expectedSlope - 1), `slope ${slope} vs ${expectedSlope}`).toBeLessThan(0.15);

    // --- Relaxation and control from the spun-up state, the clock at zero.
    const rel = build('trade-relaxation.json', { startState: startOfNewRun(spin.state) });
    const ctl = build('trade-relaxation.json', {
      startState: startOfNewRun(spin.state),
      overrides: ['wind.parts[1].enabled=false'],
    });
    const part = rel.r.wind.parts[1];
    if (part.kind !== 'fixed' || part.envelope.kind !== 'table')
      throw new Error('the relaxation part should have a table envelope');
    const table = part.envelope.points;
    const a = rel.model;
    const b = ctl.model;
    const east = rel.r.probes.find((q) => q.name === 'east')!;
    const eastCell = a.grid.cellAt(east.lon, 0)!;
    const xCoast = a.grid.lonCentre[eastCell.i];
    const offLat = 4;
    const lons = [125, 120, 115, 110, 105, 100, 95, 90, 85, 80, 75];
    const coast: number[] = [];
    const off: number[][] = lons.map(() => []);
    let relaxedFetch: { lon: number[]; v: number[] } | null = null;
    const fullOn = table.find(([, f]) => f === 1)![0];
    for (let d = 0; d <= rel.r.days; d++) {
      a.advance(a.stepsUntil(d * DAY));
      b.advance(b.stepsUntil(d * DAY));
      const ha = a.field('h_anom');
      const hb = b.field('h_anom');
      const diff = (lon: number, lat: number) => {
        const cell = a.grid.cellAt(lon, lat)!;
        const k = cell.j * a.grid.nx + cell.i;
        return ha[k] - hb[k];
      };
      coast.push(diff(xCoast, 0));
      lons.forEach((lon, k) => off[k].push(diff(lon, offLat)));
      // The stress removed along the equator, from the model's own wind, once fully off.
      if (d === fullOn + 5) {
        const ta = equatorRow(a, 'taux', 0, 140);
        const tb = equatorRow(b, 'taux', 0, 140);
        relaxedFetch = { lon: ta.lon, v: ta.v.map((t, k) => t - tb.v[k]) };
      }
    }
    if (!relaxedFetch) throw new Error('no wind sample');

    // Arrival (Kelvin prediction). For a stress switched on at t_on over a fetch, the long Kelvin
    // amplitude at the coast grows as the part of the fetch within c (t - t_on) of the coast
    // (characteristic solution of q_t + c q_x = F, Gill 1982 §11): it reaches half its full value
    // when the signal from the fetch's median longitude (half the removed stress east of it)
    // arrives. Measured: the time h' at the coast first reaches half its largest value in the run.
    const total = relaxedFetch.v.reduce((s, t) => s + t, 0);
    let acc = 0;
    let xMedian = NaN;
    for (let k = 0; k < relaxedFetch.v.length; k++) {
      acc += relaxedFetch.v[k];
      if (acc >= total / 2) {
        xMedian = relaxedFetch.lon[k];
        break;
      }
    }
    const [tOff0, tOff1] = [table[1][0], table[2][0]];
    const tOn = (tOff0 + tOff1) / 2; // middle of the ramp to full relaxation
    const predicted = tOn + ((xCoast - xMedian) * mPerDeg) / c / DAY;
    const maxRise = Math.max(...coast);
    const measured = firstCrossing(coast, maxRise / 2);
    record('trade relaxation: east-coast half-rise day', measured, predicted, 'd', {
      source: 'Kelvin time from the fetch (Matsuno 1966)',
      tolerance: '10 %',
    });
    expect(
      Math.abs(measured / predicted - 1),
      `half-rise on day ${measured.toFixed(1)}, predicted ${predicted.toFixed(1)}`,
    ).toBeLessThan(0.1);
    // Nothing reaches the coast before the signal from the east edge of the fetch could (edge = 5 % of the removed stress).
    const strong = 0.05 * Math.max(...relaxedFetch.v);
    let last = 0;
    relaxedFetch.v.forEach((t, k) => {
      if (t > strong) last = k;
    });
    const edge = relaxedFetch.lon[last];
    const earliest = tOff0 + ((xCoast - edge) * mPerDeg) / c / DAY;
    expect(Math.max(...coast.slice(0, Math.floor(earliest) - 2).map(Math.abs))).toBeLessThan(0.02 * maxRise);

    // Amount, order of magnitude only (common practice, no source): the relaxation removes the
    // tilt over the fetch, taux W_relaxed / (rho0 g' H), which is the size of the expected rise.
    const dxm = (relaxedFetch.lon[1] - relaxedFetch.lon[0]) * mPerDeg;
    const removedTilt = (total * dxm) / (p.density * p.reducedGravity * p.layerThickness);
    record('trade relaxation: east-coast rise vs removed tilt (m)', maxRise, removedTilt, 'm', {
      source: "tilt taux W / (rho0 g' H) (Sverdrup 1947)",
      tolerance: 'factor 2',
    });
    expect(maxRise).toBeGreaterThan(0.5 * removedTilt);
    expect(maxRise).toBeLessThan(2 * removedTilt);

    // Reflection: after the arrival, off the equator (4N, near the n = 1 Rossby maximum of h' at
    // 1.22 L) the peak of the anomaly moves west from the coast. Long Rossby speed c/3 (Matsuno 1966;
    // Gill 1982 §11.6). Generous tolerance, 30 %: the off-equatorial signal mixes the n = 1, 2, 3
    // modes (c/3, c/5, c/7) and is only approximately long, both of which make it slower.
    const tArrival = measured;
    const peaks = off.map((s) => peakIndex(s, Math.floor(tArrival)));
    for (let k = 1; k < peaks.length; k++)
      expect(peaks[k], `peak at ${lons[k]}E after the one at ${lons[k - 1]}E`).toBeGreaterThan(peaks[k - 1]);
    const xs = lons.map((l) => l * mPerDeg);
    const ts = peaks.map((t) => t * DAY);
    const mt = ts.reduce((s, t) => s + t, 0) / ts.length;
    const mxs = xs.reduce((s, x) => s + x, 0) / xs.length;
    let sxt = 0;
    let stt = 0;
    for (let k = 0; k < xs.length; k++) {
      sxt += (ts[k] - mt) * (xs[k] - mxs);
      stt += (ts[k] - mt) ** 2;
    }
    const speed = sxt / stt; // m s-1, negative = westward
    record('trade relaxation: reflected Rossby speed at 4N (m/s, westward)', -speed, c / 3, 'm/s', {
      source: 'long Rossby c/3 (Matsuno 1966)',
      tolerance: '30 %',
    });
    expect(speed).toBeLessThan(0);
    expect(
      Math.abs(-speed / (c / 3) - 1),
      `reflected signal moves west at ${(-speed).toFixed(2)} m/s; c/3 = ${(c / 3).toFixed(2)}`,
    ).toBeLessThan(0.3);
  });
});
