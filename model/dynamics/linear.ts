// One forward-backward step of the linear reduced-gravity equations on the C grid:
//   du/dt - f v = -g' dh'/dx + taux/(rho0 H) - r u + A lap(u)
//   dv/dt + f u = -g' dh'/dy + tauy/(rho0 H) - r v + A lap(v)
//   dh'/dt + H div(u) = 0
// Momentum uses the old h'; continuity uses the new velocities. Coriolis goes u first (with the
// old v), then v with the new u, which keeps the scheme neutral for f dt < 2. f lives on v rows
// and the u equation averages f v (not f times the average of v), so the Coriolis operator is
// exactly antisymmetric and exchanges no energy (see coefficients.ts).

import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import { relaxRows } from './sponge.ts';

export interface LinearWork {
  /** New-velocity buffers, swapped with the state's after each step. */
  uNew: Float64Array;
  vNew: Float64Array;
}

export function linearWork(grid: Grid): LinearWork {
  return { uNew: grid.field(), vNew: grid.field() };
}

/**
 * Advance the state one step in place. accelX / accelY are taux/(rho0 H) on u faces and
 * tauy/(rho0 H) on v faces. friction = r (s-1), viscosity = A (m2 s-1).
 */
export function linearStep(
  grid: Grid,
  c: StepCoefficients,
  friction: number,
  viscosity: number,
  accelX: Float64Array,
  accelY: Float64Array,
  state: State,
  work: LinearWork,
): void {
  const { nx, ny, W, maskU, maskV } = grid;
  const { dt, gpdx, gpdy, idx2, idy2, dtHdx, dtHdy, fV, coriolisSouth, coriolisNorth, coastU, coastV, spongeH, spongeV } = c;
  const r = friction;
  const A = viscosity;
  const u = state.u;
  const v = state.v;
  const h = state.h;
  const un = work.uNew;
  const vn = work.vNew;

  // 1. u on west faces, with the old v.
  for (let j = 0; j < ny; j++) {
    const fS = coriolisSouth[j];
    const fN = coriolisNorth[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k <= row + nx; k++) {
      const fvbar = fS * (v[k - 1] + v[k]) + fN * (v[k - 1 + W] + v[k + W]);
      const uc = u[k];
      const lap = (u[k + 1] + u[k - 1] - 2 * uc) * idx2 + (u[k + W] + u[k - W] - 2 * uc) * idy2 + coastU[k] * uc;
      const tend = fvbar - gpdx * (h[k] - h[k - 1]) + accelX[k] - r * uc + A * lap;
      un[k] = maskU[k] * (uc + dt * tend);
    }
  }
  // 2. v on south faces, with the new u.
  for (let j = 0; j <= ny; j++) {
    const f = fV[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) {
      const ubar = 0.25 * (un[k - W] + un[k + 1 - W] + un[k] + un[k + 1]);
      const vc = v[k];
      const lap = (v[k + 1] + v[k - 1] - 2 * vc) * idx2 + (v[k + W] + v[k - W] - 2 * vc) * idy2 + coastV[k] * vc;
      const tend = -f * ubar - gpdy * (h[k] - h[k - W]) + accelY[k] - r * vc + A * lap;
      vn[k] = maskV[k] * (vc + dt * tend);
    }
  }
  // 3. h' from the new velocities, times the sponge factor of the row (1 outside the bands).
  for (let j = 0; j < ny; j++) {
    const s = spongeH[j];
    const row = (j + 1) * W + 1;
    for (let k = row; k < row + nx; k++) {
      const div = dtHdx * (un[k + 1] - un[k]) + dtHdy * (vn[k + W] - vn[k]);
      h[k] = (h[k] - div) * s; // land cells have no open face, so they stay at 0
    }
  }
  // 4. v sponge, after continuity so that continuity saw the unrelaxed flux.
  relaxRows(c.spongeRowsV, spongeV, vn, nx, W);

  state.u = un;
  state.v = vn;
  work.uNew = u;
  work.vNew = v;
  state.steps++;
  state.time += dt;
}
