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
import { doubleField } from '../precision.ts';
import type { CoastTerms, StepCoefficients } from './coefficients.ts';

/** What the row functions read of the grid and the coefficients (a strip worker holds only these). */
export type RowGrid = Pick<Grid, 'nx' | 'ny' | 'W' | 'maskU' | 'maskV'>;
export type RowCoefficients = Pick<
  StepCoefficients,
  | 'dt'
  | 'gpdx'
  | 'gpdy'
  | 'idx2'
  | 'idy2'
  | 'dtHdx'
  | 'dtHdy'
  | 'coriolisSouth'
  | 'coriolisNorth'
  | 'fV'
  | 'spongeH'
  | 'spongeV'
  | 'coastU'
  | 'coastV'
>;

export interface LinearWork {
  /** New-velocity buffers, swapped with the state's after each step. */
  uNew: Float64Array;
  vNew: Float64Array;
}

export function linearWork(grid: Grid): LinearWork {
  return { uNew: grid.field(), vNew: grid.field() };
}

/**
 * The step as three plain row loops per row (u row j, v row j, h row j-1, sponge), without the
 * fused sweep or the step schedule: the readable statement of the arithmetic that every path the
 * model runs (step-schedule.ts over the TypeScript or WebAssembly rows, on one thread or in strips)
 * must reproduce bit for bit. Tests step it beside them; it leaves the step count and the clock to its caller.
 */
export function linearStepPlain(
  grid: Grid,
  c: StepCoefficients,
  friction: number,
  viscosity: number,
  accelX: Float64Array,
  accelY: Float64Array,
  state: State,
  work: LinearWork,
): void {
  const { ny } = grid;
  const u = doubleField(state.u, 'state.u');
  const v = doubleField(state.v, 'state.v');
  const h = doubleField(state.h, 'state.h');
  const un = work.uNew;
  const vn = work.vNew;
  for (let j = 0; j <= ny; j++) {
    if (j < ny) uRow(grid, c, friction, viscosity, accelX, u, v, h, un, j);
    vRow(grid, c, friction, viscosity, accelY, v, h, un, vn, j);
    if (j > 0) {
      hRow(grid, c, h, un, vn, j - 1);
      spongeRow(grid, c, vn, j - 1);
    }
  }
  spongeRow(grid, c, vn, ny);
  state.u = un;
  state.v = vn;
  work.uNew = u;
  work.vNew = v;
}

/**
 * u row j, v row j and h row j-1 in one sweep along the row, skewed by one face: at column i it
 * updates u(i+1, j), then v(i, j) (which needs new u at i and i+1 of rows j-1 and j), then
 * h(i, j-1) (new u at i and i+1 of row j-1, new v of rows j-1 and j at i). Neighbours are carried
 * in locals from one column to the next, so each array element is loaded once per sweep. Every
 * value is computed with exactly the operations, in the order, of uRow / vRow / hRow, so the
 * result is bit-identical to the three separate row loops. Coast terms are applied as soon as
 * their face is computed (before the face is used), walking the sparse lists alongside.
 */
export function fusedRow(
  grid: RowGrid,
  c: RowCoefficients,
  r: number,
  A: number,
  accelX: Float64Array,
  accelY: Float64Array,
  u: Float64Array,
  v: Float64Array,
  h: Float64Array,
  un: Float64Array,
  vn: Float64Array,
  j: number,
): void {
  const { nx, W, maskU, maskV } = grid;
  const { dt, gpdx, gpdy, idx2, idy2, dtHdx, dtHdy } = c;
  const fS = c.coriolisSouth[j];
  const fN = c.coriolisNorth[j];
  const nf = -c.fV[j];
  const s = c.spongeH[j - 1];
  const Adt = A * dt;
  const cu = c.coastU;
  const cv = c.coastV;
  let nu = cu.rowStart[j];
  const nuEnd = cu.rowStart[j + 1];
  let ku = nu < nuEnd ? cu.index[nu] : -1;
  let nv = cv.rowStart[j];
  const nvEnd = cv.rowStart[j + 1];
  let kv = nv < nvEnd ? cv.index[nv] : -1;

  const row = (j + 1) * W + 1;
  const end = row + nx;
  let k = row;
  // u at the row's first face (the western wall, or open water).
  let uW = u[k - 1];
  let uC = u[k];
  let vW = v[k - 1];
  let vC = v[k];
  const vNW = v[k - 1 + W];
  let vN = v[k + W];
  const hW = h[k - 1];
  let hC = h[k];
  {
    const fvbar = fS * (vW + vC) + fN * (vNW + vN);
    const lap = (u[k + 1] + uW - 2 * uC) * idx2 + (u[k + W] + u[k - W] - 2 * uC) * idy2;
    const tend = fvbar - gpdx * (hC - hW) + accelX[k] - r * uC + A * lap;
    let x = maskU[k] * (uC + dt * tend);
    if (k === ku) {
      x += Adt * cu.coef[nu] * uC;
      nu++;
      ku = nu < nuEnd ? cu.index[nu] : -1;
    }
    un[k] = x;
  }
  // Carried: new u at k (this row) and k - W (row below), old u at k and k + 1, old v at k - 1
  // and k (this row and the one above), old h at k.
  let unC = un[k];
  let unS = un[k - W];
  uW = uC;
  uC = u[k + 1];
  for (; k < end; k++) {
    const k1 = k + 1;
    // u(i + 1, j)
    const vE = v[k1];
    const vNE = v[k1 + W];
    const hE = h[k1];
    const uE = u[k1 + 1];
    const fvbar = fS * (vC + vE) + fN * (vN + vNE);
    const lapU = (uE + uW - 2 * uC) * idx2 + (u[k1 + W] + u[k1 - W] - 2 * uC) * idy2;
    const tendU = fvbar - gpdx * (hE - hC) + accelX[k1] - r * uC + A * lapU;
    let unE = maskU[k1] * (uC + dt * tendU);
    if (k1 === ku) {
      unE += Adt * cu.coef[nu] * uC;
      nu++;
      ku = nu < nuEnd ? cu.index[nu] : -1;
    }
    un[k1] = unE;
    // v(i, j)
    const unSE = un[k1 - W];
    const hS = h[k - W];
    const ubar = 0.25 * (unS + unSE + unC + unE);
    const lapV = (vE + vW - 2 * vC) * idx2 + (vN + v[k - W] - 2 * vC) * idy2;
    const tendV = nf * ubar - gpdy * (hC - hS) + accelY[k] - r * vC + A * lapV;
    let vnC = maskV[k] * (vC + dt * tendV);
    if (k === kv) {
      vnC += Adt * cv.coef[nv] * vC;
      nv++;
      kv = nv < nvEnd ? cv.index[nv] : -1;
    }
    vn[k] = vnC;
    // h(i, j - 1)
    const div = dtHdx * (unSE - unS) + dtHdy * (vnC - vn[k - W]);
    h[k - W] = (hS - div) * s;
    // shift one column east
    unS = unSE;
    unC = unE;
    uW = uC;
    uC = uE;
    vW = vC;
    vC = vE;
    vN = vNE;
    hC = hE;
  }
}

/** u on the west faces of row j, with the old v. */
export function uRow(
  grid: RowGrid,
  c: RowCoefficients,
  r: number,
  A: number,
  accelX: Float64Array,
  u: Float64Array,
  v: Float64Array,
  h: Float64Array,
  un: Float64Array,
  j: number,
): void {
  const { nx, W, maskU } = grid;
  const { dt, gpdx, idx2, idy2 } = c;
  const fS = c.coriolisSouth[j];
  const fN = c.coriolisNorth[j];
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k <= end; k++) {
    const fvbar = fS * (v[k - 1] + v[k]) + fN * (v[k - 1 + W] + v[k + W]);
    const uc = u[k];
    const lap = (u[k + 1] + u[k - 1] - 2 * uc) * idx2 + (u[k + W] + u[k - W] - 2 * uc) * idy2;
    const tend = fvbar - gpdx * (h[k] - h[k - 1]) + accelX[k] - r * uc + A * lap;
    un[k] = maskU[k] * (uc + dt * tend);
  }
  coastTerms(c.coastU, j, A * dt, u, un);
}

/** v on the south faces of row j, with the new u. */
export function vRow(
  grid: RowGrid,
  c: RowCoefficients,
  r: number,
  A: number,
  accelY: Float64Array,
  v: Float64Array,
  h: Float64Array,
  un: Float64Array,
  vn: Float64Array,
  j: number,
): void {
  const { nx, W, maskV } = grid;
  const { dt, gpdy, idx2, idy2 } = c;
  const f = c.fV[j];
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k < end; k++) {
    const ubar = 0.25 * (un[k - W] + un[k + 1 - W] + un[k] + un[k + 1]);
    const vc = v[k];
    const lap = (v[k + 1] + v[k - 1] - 2 * vc) * idx2 + (v[k + W] + v[k - W] - 2 * vc) * idy2;
    const tend = -f * ubar - gpdy * (h[k] - h[k - W]) + accelY[k] - r * vc + A * lap;
    vn[k] = maskV[k] * (vc + dt * tend);
  }
  coastTerms(c.coastV, j, A * dt, v, vn);
}

/** h' of row j from the new velocities, times the row's sponge factor (1 outside the bands). */
export function hRow(
  grid: RowGrid,
  c: RowCoefficients,
  h: Float64Array,
  un: Float64Array,
  vn: Float64Array,
  j: number,
): void {
  const { nx, W } = grid;
  const { dtHdx, dtHdy } = c;
  const s = c.spongeH[j];
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k < end; k++) {
    const div = dtHdx * (un[k + 1] - un[k]) + dtHdy * (vn[k + W] - vn[k]);
    h[k] = (h[k] - div) * s; // land cells have no open face, so they stay at 0
  }
}

/** v sponge of row j, after continuity so that continuity saw the unrelaxed flux. */
export function spongeRow(grid: RowGrid, c: RowCoefficients, vn: Float64Array, j: number): void {
  const s = c.spongeV[j];
  if (s === 1) return;
  const row = (j + 1) * grid.W + 1;
  const end = row + grid.nx;
  for (let k = row; k < end; k++) vn[k] *= s;
}

/** The Laplacian's coast corrections of one row (sparse: only faces next to a coast). */
function coastTerms(t: CoastTerms, j: number, Adt: number, x: Float64Array, xn: Float64Array): void {
  for (let n = t.rowStart[j]; n < t.rowStart[j + 1]; n++) {
    const k = t.index[n];
    xn[k] += Adt * t.coef[n] * x[k];
  }
}
