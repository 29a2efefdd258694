// One step of the nonlinear reduced-gravity equations in vector-invariant form on the C grid:
//   du/dt - q V = -d(B)/dx + taux/(rho0 h) - r u + A lap(u)
//   dv/dt + q U = -d(B)/dy + tauy/(rho0 h) - r v + A lap(v)
//   dh/dt + div(h u) = E,   E = (h_min - h)/t_e where h < h_min
// with U = h u, V = h v, potential vorticity q = (f + zeta)/h at cell corners, Bernoulli function
// B = g' h' + |u|^2/2. The PV flux is Sadourny's (1975) energy-conserving form. Time stepping is
// third-order Adams-Bashforth; the first two steps use first and second order (no history yet).
//
// This is the plain statement of the step, in whole-grid loops: the readable arithmetic that every
// path the model runs (the nonlinear rows of nonlinear-rows.ts and wasm/nonlinear.as.ts through the
// step schedule, on one thread or in strips) must reproduce bit for bit. Tests step it beside them
// (test/support/plain-nonlinear.ts); the Model steps through model/dynamics/stepper.ts.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import { doubleField } from '../precision.ts';
import { applySponge } from './sponge.ts';

export interface NonlinearWork {
  /** Tendencies of this step (swapped into the state's history afterwards). */
  du: Float64Array;
  dv: Float64Array;
  dh: Float64Array;
  /** Mass fluxes on faces, PV at corners, Bernoulli function at centres. */
  U: Float64Array;
  V: Float64Array;
  q: Float64Array;
  B: Float64Array;
}

export function nonlinearWork(grid: Grid): NonlinearWork {
  return {
    du: grid.field(),
    dv: grid.field(),
    dh: grid.field(),
    U: grid.field(),
    V: grid.field(),
    q: grid.field(),
    B: grid.field(),
  };
}

/** Thickness below which the stress is applied as if the layer were this thick (avoids 1/h blow-up). */
const STRESS_DEPTH_FLOOR = 1;

/** Adams-Bashforth weights for orders 1, 2, 3 (newest tendency first). */
const AB = [
  [1, 0, 0],
  [1.5, -0.5, 0],
  [23 / 12, -16 / 12, 5 / 12],
] as const;

export function nonlinearTendencies(
  grid: Grid,
  c: StepCoefficients,
  physics: PhysicsConfig,
  taux: Float64Array,
  tauy: Float64Array,
  state: State,
  w: NonlinearWork,
): void {
  const { nx, ny, W, maskU, maskV, ocean, dx, dy } = grid;
  const { fCorner, coastFieldU: coastU, coastFieldV: coastV, idx2, idy2 } = c;
  const H = physics.layerThickness;
  const gp = physics.reducedGravity;
  const r = physics.friction;
  const A = physics.viscosity;
  const rho0 = physics.density;
  const freeSlip = physics.slip === 'free';
  const hMin = physics.entrainment.minThickness;
  const entrainRate = physics.entrainment.time > 0 ? 1 / physics.entrainment.time : 0;
  const { u, v, h } = state;
  const { U, V, q, B, du, dv, dh } = w;
  const idx = 1 / dx;
  const idy = 1 / dy;

  // Mass fluxes on faces (land faces are masked to zero).
  for (let j = 0; j < ny; j++) {
    const row = (j + 1) * W + 1;
    for (let k = row; k <= row + nx; k++) U[k] = maskU[k] * 0.5 * (2 * H + h[k - 1] + h[k]) * u[k];
  }
  for (let j = 0; j <= ny; j++) {
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) V[k] = maskV[k] * 0.5 * (2 * H + h[k - W] + h[k]) * v[k];
  }
  // Potential vorticity at corners (i, j) = south-west corner of cell (i, j).
  for (let j = 0; j <= ny; j++) {
    const f = fCorner[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k <= row + nx; k++) {
      const wet = ocean[k] + ocean[k - 1] + ocean[k - W] + ocean[k - W - 1];
      if (wet === 0) {
        q[k] = 0;
        continue;
      }
      // Free slip: no shear at a corner that touches land. No slip: land velocities are 0.
      const zeta = freeSlip && wet < 4 ? 0 : (v[k] - v[k - 1]) * idx - (u[k] - u[k - W]) * idy;
      const hq =
        (ocean[k] * h[k] + ocean[k - 1] * h[k - 1] + ocean[k - W] * h[k - W] + ocean[k - W - 1] * h[k - W - 1]) / wet +
        H;
      q[k] = (f + zeta) / Math.max(hq, STRESS_DEPTH_FLOOR);
    }
  }
  // Bernoulli function and continuity at centres.
  for (let j = 0; j < ny; j++) {
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) {
      if (!ocean[k]) {
        B[k] = 0;
        dh[k] = 0;
        continue;
      }
      const ke = 0.25 * (u[k] * u[k] + u[k + 1] * u[k + 1] + v[k] * v[k] + v[k + W] * v[k + W]);
      B[k] = gp * h[k] + ke;
      const thick = H + h[k];
      const entrain = thick < hMin ? (hMin - thick) * entrainRate : 0;
      dh[k] = -((U[k + 1] - U[k]) * idx + (V[k + W] - V[k]) * idy) + entrain;
    }
  }
  // Momentum on u faces.
  for (let j = 0; j < ny; j++) {
    const row = (j + 1) * W + 1;
    for (let k = row; k <= row + nx; k++) {
      if (!maskU[k]) {
        du[k] = 0;
        continue;
      }
      const uc = u[k];
      const pv = 0.25 * (q[k + W] * (V[k - 1 + W] + V[k + W]) + q[k] * (V[k - 1] + V[k]));
      const hu = Math.max(H + 0.5 * (h[k - 1] + h[k]), STRESS_DEPTH_FLOOR);
      const lap = (u[k + 1] + u[k - 1] - 2 * uc) * idx2 + (u[k + W] + u[k - W] - 2 * uc) * idy2 + coastU[k] * uc;
      du[k] = pv - (B[k] - B[k - 1]) * idx + taux[k] / (rho0 * hu) - r * uc + A * lap;
    }
  }
  // Momentum on v faces.
  for (let j = 0; j <= ny; j++) {
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) {
      if (!maskV[k]) {
        dv[k] = 0;
        continue;
      }
      const vc = v[k];
      const pv = 0.25 * (q[k + 1] * (U[k + 1 - W] + U[k + 1]) + q[k] * (U[k - W] + U[k]));
      const hv = Math.max(H + 0.5 * (h[k - W] + h[k]), STRESS_DEPTH_FLOOR);
      const lap = (v[k + 1] + v[k - 1] - 2 * vc) * idx2 + (v[k + W] + v[k - W] - 2 * vc) * idy2 + coastV[k] * vc;
      dv[k] = -pv - (B[k] - B[k - W]) * idy + tauy[k] / (rho0 * hv) - r * vc + A * lap;
    }
  }
}

/**
 * Advance the state one step in place with AB3 (lower order while history builds up); the Model
 * moves the clock. Returns the sum of h' the sponges took out in this step (m; see applySponge).
 */
export function nonlinearStep(
  grid: Grid,
  c: StepCoefficients,
  physics: PhysicsConfig,
  taux: Float64Array,
  tauy: Float64Array,
  state: State,
  w: NonlinearWork,
): number {
  nonlinearTendencies(grid, c, physics, taux, tauy, state, w);
  const order = Math.min(state.historyCount, 2);
  const [a0, a1, a2] = AB[order];
  const dt = c.dt;
  const hist = state.history as { du: Float64Array[]; dv: Float64Array[]; dh: Float64Array[] };
  for (const key of ['du', 'dv', 'dh'] as const)
    for (const n of [0, 1]) doubleField(hist[key][n], `state.history.${key}[${n}]`);
  advance(doubleField(state.u, 'state.u'), dt, a0, a1, a2, w.du, hist.du[0], hist.du[1]);
  advance(doubleField(state.v, 'state.v'), dt, a0, a1, a2, w.dv, hist.dv[0], hist.dv[1]);
  advance(doubleField(state.h, 'state.h'), dt, a0, a1, a2, w.dh, hist.dh[0], hist.dh[1]);
  const spongeTaken = applySponge(grid, c, state);

  // Rotate: this step's tendency becomes history[0]; the oldest buffer becomes next step's scratch.
  let oldest = hist.du[1];
  hist.du[1] = hist.du[0];
  hist.du[0] = w.du;
  w.du = oldest;
  oldest = hist.dv[1];
  hist.dv[1] = hist.dv[0];
  hist.dv[0] = w.dv;
  w.dv = oldest;
  oldest = hist.dh[1];
  hist.dh[1] = hist.dh[0];
  hist.dh[0] = w.dh;
  w.dh = oldest;
  state.historyCount = Math.min(state.historyCount + 1, 2);
  return spongeTaken;
}

function advance(
  x: Float64Array,
  dt: number,
  a0: number,
  a1: number,
  a2: number,
  t0: Float64Array,
  t1: Float64Array,
  t2: Float64Array,
): void {
  for (let k = 0; k < x.length; k++) x[k] += dt * (a0 * t0[k] + a1 * t1[k] + a2 * t2[k]);
}
