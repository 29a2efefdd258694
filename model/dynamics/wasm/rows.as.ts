// The row functions of the WebAssembly linear step and the run's scalars and tables (AssemblyScript):
// the module's entry. The step schedule (model/dynamics/step-schedule.ts) calls these rows from
// TypeScript, for one thread and for each latitude strip alike. The module is built four times
// (wasm/build.ts): in double and in float32 (real.as.ts), each on a memory of its own and on a
// shared imported memory for the strips. The same arithmetic as model/dynamics/linear.ts (double)
// and linear-rows32.ts (float32), operation for operation, so the result is bit-identical: IEEE
// arithmetic in every lane, no fused multiply-add, no reordering (test/kernels/linear-rows.test.ts
// compares every row function on random fields). The interior rows take LANES columns at a time;
// edges, tails and coast terms go through the scalar path (a coast face is fixed in memory after
// its lanes are stored, and the lanes reloaded).
//
// All arrays live in the module's (imported) memory at byte addresses given by the host; index
// k of an array at p is at p + k * sizeof<real>() (index lists: 4 bytes). Per-row tables: fS, fN
// (ny), fV, spongeV (ny + 1), spongeH (ny). The nonlinear step's rows are in nonlinear.as.ts,
// exported from here (nl...).

import { real, LANES, ld, st, ldv, stv, ldi, splat, add, sub, mul, shiftIn } from './real.as';

export * from './nonlinear.as';

export function heapBase(): usize {
  return __heap_base;
}

// Scalars of a run, set once.
let nx: i32 = 0;
let ny: i32 = 0;
let W: i32 = 0;
let dt: real = 0;
let gpdx: real = 0;
let gpdy: real = 0;
let idx2: real = 0;
let idy2: real = 0;
let dtHdx: real = 0;
let dtHdy: real = 0;
let r: real = 0;
let A: real = 0;
// Tables and fixed arrays.
let pFS: usize = 0;
let pFN: usize = 0;
let pFV: usize = 0;
let pSH: usize = 0;
let pSV: usize = 0;
let pAX: usize = 0;
let pAY: usize = 0;
let pMU: usize = 0;
let pMV: usize = 0;
let cuStart: usize = 0;
let cuIndex: usize = 0;
let cuCoef: usize = 0;
let cvStart: usize = 0;
let cvIndex: usize = 0;
let cvCoef: usize = 0;

export function setGrid(nx_: i32, ny_: i32, W_: i32): void {
  nx = nx_;
  ny = ny_;
  W = W_;
}

export function setScalars(dt_: real, gpdx_: real, gpdy_: real, idx2_: real, idy2_: real, dtHdx_: real, dtHdy_: real, r_: real, A_: real): void {
  dt = dt_;
  gpdx = gpdx_;
  gpdy = gpdy_;
  idx2 = idx2_;
  idy2 = idy2_;
  dtHdx = dtHdx_;
  dtHdy = dtHdy_;
  r = r_;
  A = A_;
}

export function setTables(fS: usize, fN: usize, fV: usize, sH: usize, sV: usize, ax: usize, ay: usize, mu: usize, mv: usize): void {
  pFS = fS;
  pFN = fN;
  pFV = fV;
  pSH = sH;
  pSV = sV;
  pAX = ax;
  pAY = ay;
  pMU = mu;
  pMV = mv;
}

export function setCoast(uStart: usize, uIndex: usize, uCoef: usize, vStart: usize, vIndex: usize, vCoef: usize): void {
  cuStart = uStart;
  cuIndex = uIndex;
  cuCoef = uCoef;
  cvStart = vStart;
  cvIndex = vIndex;
  cvCoef = vCoef;
}

export function uRow(u: usize, v: usize, h: usize, un: usize, j: i32): void {
  const fS = ld(pFS, j);
  const fN = ld(pFN, j);
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k <= end; k++) {
    const fvbar = fS * (ld(v, k - 1) + ld(v, k)) + fN * (ld(v, k - 1 + W) + ld(v, k + W));
    const uc = ld(u, k);
    const lap = (ld(u, k + 1) + ld(u, k - 1) - <real>2 * uc) * idx2 + (ld(u, k + W) + ld(u, k - W) - <real>2 * uc) * idy2;
    const tend = fvbar - gpdx * (ld(h, k) - ld(h, k - 1)) + ld(pAX, k) - r * uc + A * lap;
    st(un, k, ld(pMU, k) * (uc + dt * tend));
  }
  coastTerms(cuStart, cuIndex, cuCoef, j, u, un);
}

export function vRow(v: usize, h: usize, un: usize, vn: usize, j: i32): void {
  const f = ld(pFV, j);
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k < end; k++) {
    const ubar = <real>0.25 * (ld(un, k - W) + ld(un, k + 1 - W) + ld(un, k) + ld(un, k + 1));
    const vc = ld(v, k);
    const lap = (ld(v, k + 1) + ld(v, k - 1) - <real>2 * vc) * idx2 + (ld(v, k + W) + ld(v, k - W) - <real>2 * vc) * idy2;
    const tend = -f * ubar - gpdy * (ld(h, k) - ld(h, k - W)) + ld(pAY, k) - r * vc + A * lap;
    st(vn, k, ld(pMV, k) * (vc + dt * tend));
  }
  coastTerms(cvStart, cvIndex, cvCoef, j, v, vn);
}

export function hRow(h: usize, un: usize, vn: usize, j: i32): void {
  const s = ld(pSH, j);
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k < end; k++) {
    const div = dtHdx * (ld(un, k + 1) - ld(un, k)) + dtHdy * (ld(vn, k + W) - ld(vn, k));
    st(h, k, (ld(h, k) - div) * s);
  }
}

export function spongeRow(vn: usize, j: i32): void {
  const s = ld(pSV, j);
  if (s == 1) return;
  const row = (j + 1) * W + 1;
  const end = row + nx;
  for (let k = row; k < end; k++) st(vn, k, ld(vn, k) * s);
}

function coastTerms(start: usize, index: usize, coef: usize, j: i32, x: usize, xn: usize): void {
  const Adt = A * dt;
  const n1 = ldi(start, j + 1);
  for (let n = ldi(start, j); n < n1; n++) {
    const k = ldi(index, n);
    st(xn, k, ld(xn, k) + Adt * ld(coef, n) * ld(x, k));
  }
}


/** u row j, v row j, h row j - 1 in one sweep (see fusedRow in linear.ts), LANES columns per pass. */
export function fusedRow(u: usize, v: usize, h: usize, un: usize, vn: usize, j: i32): void {
  const fSs = ld(pFS, j);
  const fNs = ld(pFN, j);
  const nfs = -ld(pFV, j);
  const ss = ld(pSH, j - 1);
  const Adt = A * dt;
  const fS = splat(fSs);
  const fN = splat(fNs);
  const nf = splat(nfs);
  const s = splat(ss);
  const vdt = splat(dt);
  const vgpdx = splat(gpdx);
  const vgpdy = splat(gpdy);
  const vidx2 = splat(idx2);
  const vidy2 = splat(idy2);
  const vdtHdx = splat(dtHdx);
  const vdtHdy = splat(dtHdy);
  const vr = splat(r);
  const vA = splat(A);
  const two = splat(2);
  const quarter = splat(0.25);
  const w = W;
  const ax = pAX;
  const ay = pAY;
  const mu = pMU;
  const mv = pMV;

  let nu = ldi(cuStart, j);
  const nuEnd = ldi(cuStart, j + 1);
  let ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
  let nv = ldi(cvStart, j);
  const nvEnd = ldi(cvStart, j + 1);
  let kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;

  const row = (j + 1) * w + 1;
  const end = row + nx;
  let k = row;
  // The row's first u face, scalar.
  {
    const uc = ld(u, k);
    const fvbar = fSs * (ld(v, k - 1) + ld(v, k)) + fNs * (ld(v, k - 1 + w) + ld(v, k + w));
    const lap = (ld(u, k + 1) + ld(u, k - 1) - <real>2 * uc) * idx2 + (ld(u, k + w) + ld(u, k - w) - <real>2 * uc) * idy2;
    const tend = fvbar - gpdx * (ld(h, k) - ld(h, k - 1)) + ld(ax, k) - r * uc + A * lap;
    let x = ld(mu, k) * (uc + dt * tend);
    if (k == ku) {
      x += Adt * ld(cuCoef, nu) * uc;
      nu++;
      ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
    }
    st(un, k, x);
  }
  let prevUn = splat(ld(un, k));
  for (; k + LANES - 1 < end; k += LANES) {
    const k1 = k + 1;
    // u at k1 .. k1 + LANES - 1
    const vC = ldv(v, k);
    const vE = ldv(v, k1);
    const vN = ldv(v, k + w);
    const vNE = ldv(v, k1 + w);
    const uW = ldv(u, k);
    const uC = ldv(u, k1);
    const uE = ldv(u, k1 + 1);
    const hC = ldv(h, k);
    const hE = ldv(h, k1);
    const fvbar = add(mul(fS, add(vC, vE)), mul(fN, add(vN, vNE)));
    const twoU = mul(two, uC);
    const lapU = add(mul(sub(add(uE, uW), twoU), vidx2), mul(sub(add(ldv(u, k1 + w), ldv(u, k1 - w)), twoU), vidy2));
    const tendU = add(sub(add(sub(fvbar, mul(vgpdx, sub(hE, hC))), ldv(ax, k1)), mul(vr, uC)), mul(vA, lapU));
    let unE = mul(ldv(mu, k1), add(uC, mul(vdt, tendU)));
    stv(un, k1, unE);
    if (ku >= k1 && ku < k1 + LANES) {
      // coast faces among these lanes: the correction in memory, then the lanes again
      do {
        st(un, ku, ld(un, ku) + Adt * ld(cuCoef, nu) * ld(u, ku));
        nu++;
        ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
      } while (ku >= k1 && ku < k1 + LANES);
      unE = ldv(un, k1);
    }
    // v at k .. k + LANES - 1
    const unC = shiftIn(prevUn, unE);
    const unS = ldv(un, k - w);
    const unSE = ldv(un, k1 - w);
    const hS = ldv(h, k - w);
    const ubar = mul(quarter, add(add(add(unS, unSE), unC), unE));
    const twoV = mul(two, vC);
    const lapV = add(mul(sub(add(vE, ldv(v, k - 1)), twoV), vidx2), mul(sub(add(vN, ldv(v, k - w)), twoV), vidy2));
    const tendV = add(sub(add(sub(mul(nf, ubar), mul(vgpdy, sub(hC, hS))), ldv(ay, k)), mul(vr, vC)), mul(vA, lapV));
    let vnC = mul(ldv(mv, k), add(vC, mul(vdt, tendV)));
    stv(vn, k, vnC);
    if (kv >= k && kv < k + LANES) {
      do {
        st(vn, kv, ld(vn, kv) + Adt * ld(cvCoef, nv) * ld(v, kv));
        nv++;
        kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;
      } while (kv >= k && kv < k + LANES);
      vnC = ldv(vn, k);
    }
    // h at k - W .. k - W + LANES - 1
    const div = add(mul(vdtHdx, sub(unSE, unS)), mul(vdtHdy, sub(vnC, ldv(vn, k - w))));
    stv(h, k - w, mul(sub(hS, div), s));
    prevUn = unE;
  }
  // The columns left over: the same three updates, scalar, one column at a time.
  for (; k < end; k++) {
    const k1 = k + 1;
    const uc = ld(u, k1);
    const fvbar = fSs * (ld(v, k1 - 1) + ld(v, k1)) + fNs * (ld(v, k1 - 1 + w) + ld(v, k1 + w));
    const lap = (ld(u, k1 + 1) + ld(u, k1 - 1) - <real>2 * uc) * idx2 + (ld(u, k1 + w) + ld(u, k1 - w) - <real>2 * uc) * idy2;
    const tend = fvbar - gpdx * (ld(h, k1) - ld(h, k1 - 1)) + ld(ax, k1) - r * uc + A * lap;
    let x = ld(mu, k1) * (uc + dt * tend);
    if (k1 == ku) {
      x += Adt * ld(cuCoef, nu) * uc;
      nu++;
      ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
    }
    st(un, k1, x);
    const ubar = <real>0.25 * (ld(un, k - w) + ld(un, k1 - w) + ld(un, k) + x);
    const vc = ld(v, k);
    const lapV = (ld(v, k1) + ld(v, k - 1) - <real>2 * vc) * idx2 + (ld(v, k + w) + ld(v, k - w) - <real>2 * vc) * idy2;
    const tendV = nfs * ubar - gpdy * (ld(h, k) - ld(h, k - w)) + ld(ay, k) - r * vc + A * lapV;
    let y = ld(mv, k) * (vc + dt * tendV);
    if (k == kv) {
      y += Adt * ld(cvCoef, nv) * vc;
      nv++;
      kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;
    }
    st(vn, k, y);
    const div = dtHdx * (ld(un, k1 - w) - ld(un, k - w)) + dtHdy * (y - ld(vn, k - w));
    st(h, k - w, (ld(h, k - w) - div) * ss);
  }
}
