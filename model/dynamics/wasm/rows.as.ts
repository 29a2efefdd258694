// The row functions of the WebAssembly linear step and the run's scalars and tables (AssemblyScript):
// the module's entry. The step schedule (model/dynamics/step-schedule.ts) calls these rows from
// TypeScript, for one thread and for each latitude strip alike; the module is built twice, on a
// memory of its own and on a shared imported memory for the strips (wasm/build.ts). The same
// arithmetic as model/dynamics/linear.ts, operation for operation, so the result is bit-identical:
// IEEE double in every lane, no fused multiply-add, no reordering (test/kernels/linear-rows.test.ts
// compares every row function on random fields). The interior rows take two columns at a time in
// f64x2 lanes; edges, odd tails and coast terms go through the scalar path or a per-lane fix-up.
//
// All arrays live in the module's (imported) memory at byte addresses given by the host; index
// k of an array at p is at p + 8 k. Per-row tables: fS, fN (ny), fV, spongeV (ny + 1), spongeH (ny).
// The nonlinear step's rows are in nonlinear.as.ts, exported from here (nl...).

export * from './nonlinear.as';

@inline function ld(p: usize, k: i32): f64 {
  return load<f64>(p + (<usize>k << 3));
}
@inline function st(p: usize, k: i32, x: f64): void {
  store<f64>(p + (<usize>k << 3), x);
}
@inline function ldv(p: usize, k: i32): v128 {
  return v128.load(p + (<usize>k << 3));
}
@inline function stv(p: usize, k: i32, x: v128): void {
  v128.store(p + (<usize>k << 3), x);
}
@inline function ldi(p: usize, n: i32): i32 {
  return load<i32>(p + (<usize>n << 2));
}

export function heapBase(): usize {
  return __heap_base;
}

// Scalars of a run, set once.
let nx: i32 = 0;
let ny: i32 = 0;
let W: i32 = 0;
let dt: f64 = 0;
let gpdx: f64 = 0;
let gpdy: f64 = 0;
let idx2: f64 = 0;
let idy2: f64 = 0;
let dtHdx: f64 = 0;
let dtHdy: f64 = 0;
let r: f64 = 0;
let A: f64 = 0;
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

export function setScalars(dt_: f64, gpdx_: f64, gpdy_: f64, idx2_: f64, idy2_: f64, dtHdx_: f64, dtHdy_: f64, r_: f64, A_: f64): void {
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
    const lap = (ld(u, k + 1) + ld(u, k - 1) - 2 * uc) * idx2 + (ld(u, k + W) + ld(u, k - W) - 2 * uc) * idy2;
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
    const ubar = 0.25 * (ld(un, k - W) + ld(un, k + 1 - W) + ld(un, k) + ld(un, k + 1));
    const vc = ld(v, k);
    const lap = (ld(v, k + 1) + ld(v, k - 1) - 2 * vc) * idx2 + (ld(v, k + W) + ld(v, k - W) - 2 * vc) * idy2;
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

/** u row j, v row j, h row j - 1 in one sweep (see fusedRow in linear.ts), two columns per pass. */
export function fusedRow(u: usize, v: usize, h: usize, un: usize, vn: usize, j: i32): void {
  const fSs = ld(pFS, j);
  const fNs = ld(pFN, j);
  const nfs = -ld(pFV, j);
  const ss = ld(pSH, j - 1);
  const Adt = A * dt;
  const fS = f64x2.splat(fSs);
  const fN = f64x2.splat(fNs);
  const nf = f64x2.splat(nfs);
  const s = f64x2.splat(ss);
  const vdt = f64x2.splat(dt);
  const vgpdx = f64x2.splat(gpdx);
  const vgpdy = f64x2.splat(gpdy);
  const vidx2 = f64x2.splat(idx2);
  const vidy2 = f64x2.splat(idy2);
  const vdtHdx = f64x2.splat(dtHdx);
  const vdtHdy = f64x2.splat(dtHdy);
  const vr = f64x2.splat(r);
  const vA = f64x2.splat(A);
  const two = f64x2.splat(2);
  const quarter = f64x2.splat(0.25);

  let nu = ldi(cuStart, j);
  const nuEnd = ldi(cuStart, j + 1);
  let ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
  let nv = ldi(cvStart, j);
  const nvEnd = ldi(cvStart, j + 1);
  let kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;

  const row = (j + 1) * W + 1;
  const end = row + nx;
  let k = row;
  // The row's first u face, scalar.
  {
    const uc = ld(u, k);
    const fvbar = fSs * (ld(v, k - 1) + ld(v, k)) + fNs * (ld(v, k - 1 + W) + ld(v, k + W));
    const lap = (ld(u, k + 1) + ld(u, k - 1) - 2 * uc) * idx2 + (ld(u, k + W) + ld(u, k - W) - 2 * uc) * idy2;
    const tend = fvbar - gpdx * (ld(h, k) - ld(h, k - 1)) + ld(pAX, k) - r * uc + A * lap;
    let x = ld(pMU, k) * (uc + dt * tend);
    if (k == ku) {
      x += Adt * ld(cuCoef, nu) * uc;
      nu++;
      ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
    }
    st(un, k, x);
  }
  let prevUn = f64x2.splat(ld(un, k));
  for (; k + 1 < end; k += 2) {
    const k1 = k + 1;
    // u at k1, k1 + 1
    const vC = ldv(v, k);
    const vE = ldv(v, k1);
    const vN = ldv(v, k + W);
    const vNE = ldv(v, k1 + W);
    const uW = ldv(u, k);
    const uC = ldv(u, k1);
    const uE = ldv(u, k1 + 1);
    const hC = ldv(h, k);
    const hE = ldv(h, k1);
    const fvbar = f64x2.add(f64x2.mul(fS, f64x2.add(vC, vE)), f64x2.mul(fN, f64x2.add(vN, vNE)));
    const twoU = f64x2.mul(two, uC);
    const lapU = f64x2.add(
      f64x2.mul(f64x2.sub(f64x2.add(uE, uW), twoU), vidx2),
      f64x2.mul(f64x2.sub(f64x2.add(ldv(u, k1 + W), ldv(u, k1 - W)), twoU), vidy2),
    );
    const tendU = f64x2.add(
      f64x2.sub(f64x2.add(f64x2.sub(fvbar, f64x2.mul(vgpdx, f64x2.sub(hE, hC))), ldv(pAX, k1)), f64x2.mul(vr, uC)),
      f64x2.mul(vA, lapU),
    );
    let unE = f64x2.mul(ldv(pMU, k1), f64x2.add(uC, f64x2.mul(vdt, tendU)));
    if (ku == k1) {
      unE = f64x2.replace_lane(unE, 0, f64x2.extract_lane(unE, 0) + Adt * ld(cuCoef, nu) * ld(u, k1));
      nu++;
      ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
    }
    if (ku == k1 + 1) {
      unE = f64x2.replace_lane(unE, 1, f64x2.extract_lane(unE, 1) + Adt * ld(cuCoef, nu) * ld(u, k1 + 1));
      nu++;
      ku = nu < nuEnd ? ldi(cuIndex, nu) : -1;
    }
    stv(un, k1, unE);
    // v at k, k + 1
    const unC = v128.shuffle<f64>(prevUn, unE, 1, 2);
    const unS = ldv(un, k - W);
    const unSE = ldv(un, k1 - W);
    const hS = ldv(h, k - W);
    const ubar = f64x2.mul(quarter, f64x2.add(f64x2.add(f64x2.add(unS, unSE), unC), unE));
    const twoV = f64x2.mul(two, vC);
    const lapV = f64x2.add(
      f64x2.mul(f64x2.sub(f64x2.add(vE, ldv(v, k - 1)), twoV), vidx2),
      f64x2.mul(f64x2.sub(f64x2.add(vN, ldv(v, k - W)), twoV), vidy2),
    );
    const tendV = f64x2.add(
      f64x2.sub(f64x2.add(f64x2.sub(f64x2.mul(nf, ubar), f64x2.mul(vgpdy, f64x2.sub(hC, hS))), ldv(pAY, k)), f64x2.mul(vr, vC)),
      f64x2.mul(vA, lapV),
    );
    let vnC = f64x2.mul(ldv(pMV, k), f64x2.add(vC, f64x2.mul(vdt, tendV)));
    if (kv == k) {
      vnC = f64x2.replace_lane(vnC, 0, f64x2.extract_lane(vnC, 0) + Adt * ld(cvCoef, nv) * ld(v, k));
      nv++;
      kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;
    }
    if (kv == k1) {
      vnC = f64x2.replace_lane(vnC, 1, f64x2.extract_lane(vnC, 1) + Adt * ld(cvCoef, nv) * ld(v, k1));
      nv++;
      kv = nv < nvEnd ? ldi(cvIndex, nv) : -1;
    }
    stv(vn, k, vnC);
    // h at k - W, k + 1 - W
    const div = f64x2.add(f64x2.mul(vdtHdx, f64x2.sub(unSE, unS)), f64x2.mul(vdtHdy, f64x2.sub(vnC, ldv(vn, k - W))));
    stv(h, k - W, f64x2.mul(f64x2.sub(hS, div), s));
    prevUn = unE;
  }
  // An odd column left over: the same three updates, scalar.
  if (k < end) {
    const k1 = k + 1;
    const uc = ld(u, k1);
    const fvbar = fSs * (ld(v, k1 - 1) + ld(v, k1)) + fNs * (ld(v, k1 - 1 + W) + ld(v, k1 + W));
    const lap = (ld(u, k1 + 1) + ld(u, k1 - 1) - 2 * uc) * idx2 + (ld(u, k1 + W) + ld(u, k1 - W) - 2 * uc) * idy2;
    const tend = fvbar - gpdx * (ld(h, k1) - ld(h, k1 - 1)) + ld(pAX, k1) - r * uc + A * lap;
    let x = ld(pMU, k1) * (uc + dt * tend);
    if (k1 == ku) {
      x += Adt * ld(cuCoef, nu) * uc;
    }
    st(un, k1, x);
    const ubar = 0.25 * (ld(un, k - W) + ld(un, k1 - W) + ld(un, k) + ld(un, k1));
    const vc = ld(v, k);
    const lapV = (ld(v, k1) + ld(v, k - 1) - 2 * vc) * idx2 + (ld(v, k + W) + ld(v, k - W) - 2 * vc) * idy2;
    const tendV = nfs * ubar - gpdy * (ld(h, k) - ld(h, k - W)) + ld(pAY, k) - r * vc + A * lapV;
    let y = ld(pMV, k) * (vc + dt * tendV);
    if (k == kv) {
      y += Adt * ld(cvCoef, nv) * vc;
    }
    st(vn, k, y);
    const div = dtHdx * (ld(un, k1 - W) - ld(un, k - W)) + dtHdy * (y - ld(vn, k - W));
    st(h, k - W, (ld(h, k - W) - div) * ss);
  }
}
