// The answering wind's atmosphere alone against Gill's (1980) analytical solution.
//
// Source: Gill, A. E. (1980), Some simple solutions for heat-induced tropical circulation, Q. J. R.
// Meteorol. Soc. 106, 447-462, section 3: the symmetric heating Q = F(x) exp(-y^2/4) (his units),
// F = cos(kx) for |x| < L, 0 outside, k = pi/(2L); steady, damped (Rayleigh friction and Newtonian
// cooling both eps), long-wave (the paper's scaling and section as recalled: from memory). Written here in Matsuno's units (y scaled by sqrt(c/beta), so the
// heating is F(x) exp(-y^2/2) = F(x) phi_0(y)); the closed forms below integrate the paper's mode
// equations q_0' + eps q_0 = -F (Kelvin, eastward) and r_0' - 3 eps r_0 = 2F (Rossby n = 1, westward):
//   u = q_0/2 e^{-y^2/2} + r_0/4 (2y^2 - 3) e^{-y^2/2},  p = q_0/2 e^{-y^2/2} + r_0/4 (2y^2 + 1) e^{-y^2/2},
//   v = (eps r_0 + F/2) 2y e^{-y^2/2}.
// Its features: east of the heating the Kelvin response decays over c_a/eps; west of it the Rossby
// response decays over c_a/(3 eps), with a pair of cyclones (low p) centred where
// (2y^2 + 1) e^{-y^2/2} peaks, y = sqrt(3/2) L_a.

import { describe, expect, it } from 'vitest';
import { GillAtmosphere } from '../../model/coupling/gill-atmosphere.ts';
import { EARTH } from '../../model/config.ts';
import { Grid } from '../../model/grid.ts';
import { basin, linearFit, record } from '../support/physics-kit.ts';

const SOURCE = 'Gill 1980, QJRMS 106, 447, section 3: symmetric heating, long-wave solution';
const C_A = 30;
const DAMPING_DAYS = 2;
const BETA = (2 * EARTH.omega) / EARTH.radius;
const LA = Math.sqrt(C_A / BETA);
const EPS = 1 / (DAMPING_DAYS * 86400) / Math.sqrt(BETA * C_A);
/** Half-width of the heating in units of L_a (Gill's L = 2), centred at 200E. */
const HALF = 2;
const CENTRE_LON = 200;

function gill(x: number, y: number): { u: number; v: number; p: number } {
  const k = Math.PI / (2 * HALF);
  const e = EPS;
  const b = 3 * EPS;
  const F = Math.abs(x) <= HALF ? Math.cos(k * x) : 0;
  let q0: number;
  if (x < -HALF) q0 = 0;
  else if (x <= HALF)
    q0 = -(e * Math.cos(k * x) + k * Math.sin(k * x) + k * Math.exp(-e * (x + HALF))) / (e * e + k * k);
  else q0 = ((-k * (1 + Math.exp(-2 * e * HALF))) / (e * e + k * k)) * Math.exp(-e * (x - HALF));
  let r0: number;
  if (x > HALF) r0 = 0;
  else if (x >= -HALF)
    r0 = (-2 * (b * Math.cos(k * x) - k * Math.sin(k * x) + k * Math.exp(-b * (HALF - x)))) / (b * b + k * k);
  else r0 = ((-2 * k * (1 + Math.exp(-2 * b * HALF))) / (b * b + k * k)) * Math.exp(b * (x + HALF));
  const g = Math.exp(-0.5 * y * y);
  return {
    u: 0.5 * q0 * g + 0.25 * r0 * (2 * y * y - 3) * g,
    p: 0.5 * q0 * g + 0.25 * r0 * (2 * y * y + 1) * g,
    v: (e * r0 + 0.5 * F) * 2 * y * g,
  };
}

/** A wide atmosphere-only grid: 100E-300E, 40S-40N (about +-3.9 L_a), 0.5 degree. */
function solved(heatingModes = 1) {
  const grid = new Grid(basin(100, 300, -40, 40, 0.5), EARTH.radius);
  const atm = new GillAtmosphere(grid, { speed: C_A, damping: 1 / (DAMPING_DAYS * 86400), heatingModes, beta: BETA });
  const mPerDeg = grid.dx / grid.dLon;
  const xOf = (lon: number) => ((lon - CENTRE_LON) * mPerDeg) / LA;
  const heating = grid.field();
  for (let j = 0; j < grid.ny; j++) {
    const y = grid.yCentre[j] / LA;
    for (let i = 0; i < grid.nx; i++) {
      const x = xOf(grid.lonCentre[i]);
      heating[grid.idx(i, j)] = Math.abs(x) <= HALF ? Math.cos((Math.PI / (2 * HALF)) * x) * Math.exp(-0.5 * y * y) : 0;
    }
  }
  atm.solve(heating);
  return { grid, atm, xOf, fields: atm.centreFields() };
}

describe("Gill's (1980) atmosphere, symmetric heating patch", () => {
  const { grid, atm, xOf, fields } = solved();

  it('matches the analytical u, v and p everywhere within 5 % of their peaks', () => {
    for (const c of ['u', 'v', 'p'] as const) {
      let peak = 0;
      let worst = 0;
      for (let j = 0; j < grid.ny; j++) {
        for (let i = 0; i < grid.nx; i++) {
          const exact = gill(xOf(grid.lonCentre[i]), grid.yCentre[j] / LA)[c];
          peak = Math.max(peak, Math.abs(exact));
          worst = Math.max(worst, Math.abs(fields[c][grid.idx(i, j)] - exact));
        }
      }
      record(`Gill atmosphere, symmetric heating: largest error of ${c} (share of its peak)`, worst / peak, 0, '', {
        source: SOURCE,
        tolerance: '5 %',
      });
      expect(worst / peak).toBeLessThan(0.05);
      expect(peak).toBeGreaterThan(0.1);
    }
  });

  it('the Kelvin response decays east of the heating over c_a/eps, the Rossby response west over c_a/(3 eps)', () => {
    const j0 = grid.nearestRow(0.25); // the row just north of the equator (y = 0.25 deg)
    const mPerDeg = grid.dx / grid.dLon;
    const eastLon: number[] = [];
    const eastLog: number[] = [];
    const westLon: number[] = [];
    const westLog: number[] = [];
    for (let i = 0; i < grid.nx; i++) {
      const x = xOf(grid.lonCentre[i]);
      const u = fields.u[grid.idx(i, j0)];
      if (x > HALF + 0.5 && x < HALF + 4) {
        eastLon.push(grid.lonCentre[i] * mPerDeg);
        eastLog.push(Math.log(Math.abs(u)));
      }
      if (x < -HALF - 0.5 && x > -HALF - 3) {
        westLon.push(grid.lonCentre[i] * mPerDeg);
        westLog.push(Math.log(Math.abs(u)));
      }
    }
    const kelvin = -1 / linearFit(eastLon, eastLog).slope / 1000;
    const rossby = 1 / linearFit(westLon, westLog).slope / 1000;
    const eps = 1 / (DAMPING_DAYS * 86400);
    record(
      'Gill atmosphere: e-folding length of the Kelvin response east of the heating',
      kelvin,
      C_A / eps / 1000,
      'km',
      { source: `${SOURCE}: c_a/eps`, tolerance: '5 %' },
    );
    record(
      'Gill atmosphere: e-folding length of the Rossby response west of the heating',
      rossby,
      C_A / (3 * eps) / 1000,
      'km',
      { source: `${SOURCE}: c_a/(3 eps)`, tolerance: '5 %' },
    );
    expect(Math.abs(kelvin / (C_A / eps / 1000) - 1)).toBeLessThan(0.05);
    expect(Math.abs(rossby / (C_A / (3 * eps) / 1000) - 1)).toBeLessThan(0.05);
    // East of the heating: easterlies flowing into it; west of it: westerlies.
    expect(fields.u[grid.idx(grid.cellAt(CENTRE_LON + 35, 0)!.i, j0)]).toBeLessThan(0);
    expect(fields.u[grid.idx(grid.cellAt(CENTRE_LON - 30, 0)!.i, j0)]).toBeGreaterThan(0);
    expect(atm.radius).toBeCloseTo(LA, 6);
  });

  it('two cyclones straddle the equator west of the heating, at y = sqrt(3/2) L_a', () => {
    // At the western edge of the heating, where the Kelvin part is zero.
    const i = grid.cellAt(CENTRE_LON - (HALF * LA) / (grid.dx / grid.dLon) - 0.01, 0)!.i;
    for (const hemisphere of [1, -1]) {
      let best = -1;
      for (let j = 0; j < grid.ny; j++) {
        if (Math.sign(grid.latCentre[j]) !== hemisphere) continue;
        if (best < 0 || fields.p[grid.idx(i, j)] < fields.p[grid.idx(i, best)]) best = j;
      }
      const [a, b, c] = [best - 1, best, best + 1].map((j) => fields.p[grid.idx(i, j)]);
      const shift = (0.5 * (a - c)) / (a - 2 * b + c);
      const y = (grid.yCentre[best] + shift * grid.dy) / LA;
      record(
        `Gill atmosphere: Rossby cyclone centre, ${hemisphere > 0 ? 'north' : 'south'} (units of L_a)`,
        Math.abs(y),
        Math.sqrt(1.5),
        'L_a',
        { source: `${SOURCE}: (2y^2 + 1) exp(-y^2/2) peaks at sqrt(3/2)`, tolerance: '5 %' },
      );
      expect(Math.abs(Math.abs(y) / Math.sqrt(1.5) - 1)).toBeLessThan(0.05);
      expect(b).toBeLessThan(0); // low pressure: cyclones
    }
  });

  it('more heating modes change nothing for a heating that is phi_0 alone', () => {
    const more = solved(4).fields;
    let worst = 0;
    let peak = 0;
    for (let k = 0; k < more.u.length; k++) {
      worst = Math.max(worst, Math.abs(more.u[k] - fields.u[k]));
      peak = Math.max(peak, Math.abs(fields.u[k]));
    }
    // The projection of phi_0 onto phi_1..phi_3 is zero up to the quadrature (trapezoidal rule on a Gaussian).
    expect(worst / peak).toBeLessThan(1e-6);
  });
});

describe('the long-wave mode algebra for any heating (derived from the equations, common practice)', () => {
  it('an off-equatorial heating projected onto 8 Hermite functions satisfies the long-wave equations', () => {
    // Residuals of eps u - y v + p_x = 0, y u + p_y = 0 and eps p + u_x + v_y + Q = 0 by centred
    // differences on a fine grid, with Q the heating as projected (what the solver answers).
    const grid = new Grid(basin(100, 220, -40, 40, 0.25), EARTH.radius);
    const K = 8;
    const atm = new GillAtmosphere(grid, {
      speed: C_A,
      damping: 1 / (DAMPING_DAYS * 86400),
      heatingModes: K,
      beta: BETA,
    });
    const mPerDeg = grid.dx / grid.dLon;
    const heating = grid.field();
    const y0 = 0.6;
    for (let j = 0; j < grid.ny; j++) {
      const y = grid.yCentre[j] / LA;
      for (let i = 0; i < grid.nx; i++) {
        const x = ((grid.lonCentre[i] - 160) * mPerDeg) / LA;
        heating[grid.idx(i, j)] = Math.exp(-(x * x) / 2 - ((y - y0) * (y - y0)) / 0.5);
      }
    }
    atm.solve(heating);
    const f = atm.centreFields();
    // The projected heating: sum Q_n phi_n, Q_n = int Q phi_n / (sqrt(pi) 2^n n!).
    const dyN = grid.dy / LA;
    const hermite = (n: number, y: number) => {
      let a = 1;
      let b = 2 * y;
      if (n === 0) return 1;
      for (let m = 1; m < n; m++) [a, b] = [b, 2 * y * b - 2 * m * a];
      return b;
    };
    const projected = grid.field();
    for (let i = 0; i < grid.nx; i++) {
      let norm = Math.sqrt(Math.PI);
      for (let n = 0; n < K; n++) {
        if (n > 0) norm *= 2 * n;
        let qn = 0;
        for (let j = 0; j < grid.ny; j++) {
          const y = grid.yCentre[j] / LA;
          qn += heating[grid.idx(i, j)] * hermite(n, y) * Math.exp(-0.5 * y * y) * dyN;
        }
        qn /= norm;
        for (let j = 0; j < grid.ny; j++) {
          const y = grid.yCentre[j] / LA;
          projected[grid.idx(i, j)] += qn * hermite(n, y) * Math.exp(-0.5 * y * y);
        }
      }
    }
    const dxN = grid.dx / LA;
    let scale = 0;
    const worst = [0, 0, 0];
    for (let j = 1; j < grid.ny - 1; j++) {
      const y = grid.yCentre[j] / LA;
      for (let i = 1; i < grid.nx - 1; i++) {
        const k = grid.idx(i, j);
        const dx = (a: Float64Array) => (a[k + 1] - a[k - 1]) / (2 * dxN);
        const dy = (a: Float64Array) => (a[k + grid.W] - a[k - grid.W]) / (2 * dyN);
        scale = Math.max(scale, Math.abs(projected[k]));
        worst[0] = Math.max(worst[0], Math.abs(EPS * f.u[k] - y * f.v[k] + dx(f.p)));
        worst[1] = Math.max(worst[1], Math.abs(y * f.u[k] + dy(f.p)));
        worst[2] = Math.max(worst[2], Math.abs(EPS * f.p[k] + dx(f.u) + dy(f.v) + projected[k]));
      }
    }
    // Centred differences of smooth fields at dx = 0.024 L_a leave residuals well under 1 % of the heating.
    for (const w of worst) expect(w / scale).toBeLessThan(0.01);
    expect(scale).toBeGreaterThan(0.5);
  });
});
