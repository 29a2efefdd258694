// The rows of the nonlinear step (AssemblyScript, imported by the module's entry rows.as.ts): the
// same arithmetic as TsNonlinearRows in model/dynamics/nonlinear-rows.ts, operation for operation,
// so the result is bit-identical: IEEE double in every lane, no fused multiply-add, no
// reordering; a branch of the TypeScript (a land face, a dry corner, entrainment) is a lane select
// of the same two values here. Two columns at a time in f64x2 lanes, an odd last column scalar.
//
// All arrays live in the module's memory at byte addresses set by the host (nlSetFields, ...);
// index k of an array at p is at p + 8 k. The ring of diagnosed rows (U, V, q, B: three rows of W
// each) belongs to this instance: on a shared memory each thread has its own. Land is one array
// of 64-bit masks per cell (all bits set over ocean, none on land): a face mask is the AND of its
// two cells' masks, and ANDed with 1.0 a mask is the 0/1 double the TypeScript multiplies by.
//
// Written for V8's code generator: base pointers are copied from globals into locals (a global is
// reloaded at every use inside a loop), ring rows get their own bases, and the common case of a
// corner with four ocean cells skips the division by their count (x / 4 is x * 0.25 exactly).

import { real, LANES, SHIFT, ld, st, ldv, stv, ldb, asOne, splat, add, sub, mul, div, neg, lt, maxv, maxs, pick, keep, allSet, maskSplat } from './real.as';

/** The base that makes index k of the ring row starting at ring + 8 (o + row) read as ring row column k - row. */
@inline function rowBase(ring: usize, o: i32): usize {
  return ring + (<usize>o << SHIFT);
}

// Grid and scalars of a run, set once.
let nx: i32 = 0;
let ny: i32 = 0;
let W: i32 = 0;
let dt: real = 0;
let H: real = 0;
let gp: real = 0;
let rho0: real = 0;
let hMin: real = 0;
let entrainRate: real = 0;
let freeSlip: bool = false;
let idx: real = 0;
let idy: real = 0;
let idx2: real = 0;
let idy2: real = 0;
// Per step.
let r: real = 0;
let A: real = 0;
let a0: real = 1;
let a1: real = 0;
let a2: real = 0;
// Row tables (fCorner ny + 1, spongeH ny, spongeV ny + 1), the ocean masks and the coast terms.
let pFC: usize = 0;
let pSH: usize = 0;
let pSV: usize = 0;
let pOB: usize = 0;
let pCU: usize = 0;
let pCV: usize = 0;
// The ring of this instance.
let pRU: usize = 0;
let pRV: usize = 0;
let pRQ: usize = 0;
let pRB: usize = 0;
// The double-buffered fields: [0] and [1] of u, v, h and of the history du, dv, dh; the stress; the sponge sums.
let pU0: usize = 0;
let pU1: usize = 0;
let pV0: usize = 0;
let pV1: usize = 0;
let pH0: usize = 0;
let pH1: usize = 0;
let pDU0: usize = 0;
let pDU1: usize = 0;
let pDV0: usize = 0;
let pDV1: usize = 0;
let pDH0: usize = 0;
let pDH1: usize = 0;
let pTX: usize = 0;
let pTY: usize = 0;
let pSS0: usize = 0;
let pSS1: usize = 0;

export function nlSetGrid(nx_: i32, ny_: i32, W_: i32): void {
  nx = nx_;
  ny = ny_;
  W = W_;
}

export function nlSetScalars(dt_: real, H_: real, gp_: real, rho0_: real, hMin_: real, entrainRate_: real, freeSlip_: i32, idx_: real, idy_: real, idx2_: real, idy2_: real): void {
  dt = dt_;
  H = H_;
  gp = gp_;
  rho0 = rho0_;
  hMin = hMin_;
  entrainRate = entrainRate_;
  freeSlip = freeSlip_ != 0;
  idx = idx_;
  idy = idy_;
  idx2 = idx2_;
  idy2 = idy2_;
}

export function nlSetTables(fCorner: usize, spongeH: usize, spongeV: usize, oceanBits: usize, coastU: usize, coastV: usize): void {
  pFC = fCorner;
  pSH = spongeH;
  pSV = spongeV;
  pOB = oceanBits;
  pCU = coastU;
  pCV = coastV;
}

export function nlSetRing(U: usize, V: usize, q: usize, B: usize): void {
  pRU = U;
  pRV = V;
  pRQ = q;
  pRB = B;
}

export function nlSetFields(
  u0: usize, u1: usize, v0: usize, v1: usize, h0: usize, h1: usize,
  du0: usize, du1: usize, dv0: usize, dv1: usize, dh0: usize, dh1: usize,
  taux: usize, tauy: usize, sums0: usize, sums1: usize,
): void {
  pU0 = u0;
  pU1 = u1;
  pV0 = v0;
  pV1 = v1;
  pH0 = h0;
  pH1 = h1;
  pDU0 = du0;
  pDU1 = du1;
  pDV0 = dv0;
  pDV1 = dv1;
  pDH0 = dh0;
  pDH1 = dh1;
  pTX = taux;
  pTY = tauy;
  pSS0 = sums0;
  pSS1 = sums1;
}

export function nlParams(r_: real, A_: real, a0_: real, a1_: real, a2_: real): void {
  r = r_;
  A = A_;
  a0 = a0_;
  a1 = a1_;
  a2 = a2_;
}

@inline function slot(j: i32): i32 {
  return (j + 3) % 3;
}

// ---- pre: the diagnosed rows of row j into the ring -------------------------------------------

export function nlPre(cur: i32, j: i32): void {
  const u = cur ? pU1 : pU0;
  const v = cur ? pV1 : pV0;
  const h = cur ? pH1 : pH0;
  const row = (j + 1) * W;
  const o = slot(j) * W - row;
  if (j < ny) {
    preAll(u, v, h, row, rowBase(pRU, o), rowBase(pRV, o), rowBase(pRQ, o), rowBase(pRB, o), ld(pFC, j));
    return;
  }
  preV(v, h, row, rowBase(pRV, o));
  preQ(u, v, h, row, rowBase(pRQ, o), ld(pFC, j));
}

/**
 * U, V, q and B of a row below the north wall in one sweep (each value as preU, preV, preQ and
 * preB compute it; the sweep shares their loads): LANES columns at a time over the row's nx cells,
 * then the last face (U and q only) and the leftover columns through the single-row functions.
 */
function preAll(u: usize, v: usize, h: usize, row: i32, oU: usize, oV: usize, oQ: usize, oB: usize, f: real): void {
  const ob = pOB;
  const w = W;
  const twoH = splat(2 * H);
  const half = splat(0.5);
  const one = splat(1);
  const zero = splat(0);
  const quarter = splat(0.25);
  const vgp = splat(gp);
  const vH = splat(H);
  const vf = splat(f);
  const vidx = splat(idx);
  const vidy = splat(idy);
  const slipAll = maskSplat(freeSlip);
  const end = row + nx + 1;
  let k = row + 1;
  for (; k + LANES - 1 < end; k += LANES) {
    const bC = ldv(ob, k);
    const bW = ldv(ob, k - 1);
    const bS = ldv(ob, k - w);
    const bSW = ldv(ob, k - w - 1);
    const hC = ldv(h, k);
    const hW = ldv(h, k - 1);
    const hS = ldv(h, k - w);
    const hSW = ldv(h, k - w - 1);
    const uC = ldv(u, k);
    const vC = ldv(v, k);
    // U on the west faces, V on the south faces
    stv(oU, k, mul(mul(mul(v128.and(v128.and(bW, bC), one), half), add(add(twoH, hW), hC)), uC));
    stv(oV, k, mul(mul(mul(v128.and(v128.and(bS, bC), one), half), add(add(twoH, hS), hC)), vC));
    // B at the centres
    const uE = ldv(u, k + 1);
    const vN = ldv(v, k + w);
    const ke = mul(quarter, add(add(add(mul(uC, uC), mul(uE, uE)), mul(vC, vC)), mul(vN, vN)));
    stv(oB, k, keep(add(mul(vgp, hC), ke), bC));
    // q at the south-west corners
    const all = v128.and(v128.and(v128.and(bC, bW), bS), bSW);
    const shear = sub(mul(sub(vC, ldv(v, k - 1)), vidx), mul(sub(uC, ldv(u, k - w)), vidy));
    if (allSet(all)) {
      const hq = add(mul(add(add(add(hC, hW), hS), hSW), quarter), vH);
      stv(oQ, k, div(add(vf, shear), maxv(hq, one)));
    } else {
      const oC = v128.and(bC, one);
      const oW = v128.and(bW, one);
      const oS = v128.and(bS, one);
      const oSW = v128.and(bSW, one);
      const wet = add(add(add(oC, oW), oS), oSW);
      const zeta = pick(zero, shear, v128.andnot(slipAll, all));
      const hsum = add(add(add(mul(oC, hC), mul(oW, hW)), mul(oS, hS)), mul(oSW, hSW));
      const q = div(add(vf, zeta), maxv(add(div(hsum, wet), vH), one));
      stv(oQ, k, keep(q, v128.or(v128.or(v128.or(bC, bW), bS), bSW)));
    }
  }
  // the columns left over and the row's last face, one value at a time
  preUFrom(u, h, k, row + nx + 2, oU);
  preVFrom(v, h, k, end, oV);
  preBFrom(u, v, h, k, end, oB);
  preQFrom(u, v, h, k, row + nx + 2, oQ, f);
}

/** Mass flux on the u faces k0 .. end - 1: maskU 0.5 (2H + h[k-1] + h[k]) u. */
function preUFrom(u: usize, h: usize, k0: i32, end: i32, out: usize): void {
  const ob = pOB;
  const twoH = splat(2 * H);
  const half = splat(0.5);
  const one = splat(1);
  let k = k0;
  for (; k + LANES - 1 < end; k += LANES) {
    const mU = v128.and(v128.and(ldv(ob, k - 1), ldv(ob, k)), one);
    stv(out, k, mul(mul(mul(mU, half), add(add(twoH, ldv(h, k - 1)), ldv(h, k))), ldv(u, k)));
  }
  for (; k < end; k++) st(out, k, asOne(ldb(ob, k - 1) & ldb(ob, k)) * <real>0.5 * (<real>2 * H + ld(h, k - 1) + ld(h, k)) * ld(u, k));
}

/** Mass flux on the v faces of the row. */
function preV(v: usize, h: usize, row: i32, out: usize): void {
  preVFrom(v, h, row + 1, row + nx + 1, out);
}
function preVFrom(v: usize, h: usize, k0: i32, end: i32, out: usize): void {
  const ob = pOB;
  const w = W;
  const twoH = splat(2 * H);
  const half = splat(0.5);
  const one = splat(1);
  let k = k0;
  for (; k + LANES - 1 < end; k += LANES) {
    const mV = v128.and(v128.and(ldv(ob, k - w), ldv(ob, k)), one);
    stv(out, k, mul(mul(mul(mV, half), add(add(twoH, ldv(h, k - w)), ldv(h, k))), ldv(v, k)));
  }
  for (; k < end; k++) st(out, k, asOne(ldb(ob, k - w) & ldb(ob, k)) * <real>0.5 * (<real>2 * H + ld(h, k - w) + ld(h, k)) * ld(v, k));
}

/** Bernoulli function at the centres of the row: g' h' + |u|^2 / 2 over ocean, 0 on land. */
function preBFrom(u: usize, v: usize, h: usize, k0: i32, end: i32, out: usize): void {
  const ob = pOB;
  const w = W;
  const vgp = splat(gp);
  const quarter = splat(0.25);
  let k = k0;
  for (; k + LANES - 1 < end; k += LANES) {
    const uC = ldv(u, k);
    const uE = ldv(u, k + 1);
    const vC = ldv(v, k);
    const vN = ldv(v, k + w);
    const ke = mul(quarter, add(add(add(mul(uC, uC), mul(uE, uE)), mul(vC, vC)), mul(vN, vN)));
    stv(out, k, keep(add(mul(vgp, ldv(h, k)), ke), ldv(ob, k)));
  }
  for (; k < end; k++) {
    let b: real = 0;
    if (ldb(ob, k) != 0) {
      const ke = <real>0.25 * (ld(u, k) * ld(u, k) + ld(u, k + 1) * ld(u, k + 1) + ld(v, k) * ld(v, k) + ld(v, k + w) * ld(v, k + w));
      b = gp * ld(h, k) + ke;
    }
    st(out, k, b);
  }
}

/** Potential vorticity (f + zeta) / h at the south-west corners of the row's cells. */
function preQ(u: usize, v: usize, h: usize, row: i32, out: usize, f: real): void {
  preQFrom(u, v, h, row + 1, row + nx + 2, out, f);
}
function preQFrom(u: usize, v: usize, h: usize, k0: i32, end: i32, out: usize, f: real): void {
  const ob = pOB;
  const w = W;
  const zero = splat(0);
  const quarter = splat(0.25);
  const vH = splat(H);
  const one = splat(1);
  const vf = splat(f);
  const vidx = splat(idx);
  const vidy = splat(idy);
  // free slip: no shear where a corner touches land
  const slipAll = maskSplat(freeSlip);
  let k = k0;
  for (; k + LANES - 1 < end; k += LANES) {
    const bC = ldv(ob, k);
    const bW = ldv(ob, k - 1);
    const bS = ldv(ob, k - w);
    const bSW = ldv(ob, k - w - 1);
    const all = v128.and(v128.and(v128.and(bC, bW), bS), bSW);
    const hC = ldv(h, k);
    const hW = ldv(h, k - 1);
    const hS = ldv(h, k - w);
    const hSW = ldv(h, k - w - 1);
    const shear = sub(mul(sub(ldv(v, k), ldv(v, k - 1)), vidx), mul(sub(ldv(u, k), ldv(u, k - w)), vidy));
    if (allSet(all)) {
      // four ocean cells: the weights are 1 and their count 4
      const hq = add(mul(add(add(add(hC, hW), hS), hSW), quarter), vH);
      stv(out, k, div(add(vf, shear), maxv(hq, one)));
    } else {
      const oC = v128.and(bC, one);
      const oW = v128.and(bW, one);
      const oS = v128.and(bS, one);
      const oSW = v128.and(bSW, one);
      const wet = add(add(add(oC, oW), oS), oSW);
      const zeta = pick(zero, shear, v128.andnot(slipAll, all));
      const hsum = add(add(add(mul(oC, hC), mul(oW, hW)), mul(oS, hS)), mul(oSW, hSW));
      const hq = add(div(hsum, wet), vH);
      const q = div(add(vf, zeta), maxv(hq, one));
      stv(out, k, keep(q, v128.or(v128.or(v128.or(bC, bW), bS), bSW)));
    }
  }
  for (; k < end; k++) {
    const oC = asOne(ldb(ob, k));
    const oW = asOne(ldb(ob, k - 1));
    const oS = asOne(ldb(ob, k - w));
    const oSW = asOne(ldb(ob, k - w - 1));
    const wet = oC + oW + oS + oSW;
    let q: real = 0;
    if (wet != 0) {
      const zeta: real = freeSlip && wet < <real>4 ? <real>0 : (ld(v, k) - ld(v, k - 1)) * idx - (ld(u, k) - ld(u, k - w)) * idy;
      const hq = (oC * ld(h, k) + oW * ld(h, k - 1) + oS * ld(h, k - w) + oSW * ld(h, k - w - 1)) / wet + H;
      q = (f + zeta) / maxs(hq, <real>1);
    }
    st(out, k, q);
  }
}

// ---- out: the new u, v, h of row j ------------------------------------------------------------

export function nlOut(cur: i32, j: i32): void {
  const row = (j + 1) * W;
  const oS = slot(j - 1) * W - row;
  const oC = slot(j) * W - row;
  const oN = slot(j + 1) * W - row;
  const u = cur ? pU1 : pU0;
  const v = cur ? pV1 : pV0;
  const h = cur ? pH1 : pH0;
  if (j < ny) outU(u, h, cur ? pU0 : pU1, cur ? pDU1 : pDU0, cur ? pDU0 : pDU1, row, rowBase(pRQ, oC), rowBase(pRQ, oN), rowBase(pRV, oC), rowBase(pRV, oN), rowBase(pRB, oC));
  outV(v, h, cur ? pV0 : pV1, cur ? pDV1 : pDV0, cur ? pDV0 : pDV1, row, rowBase(pRQ, oC), rowBase(pRU, oS), rowBase(pRU, oC), rowBase(pRB, oS), rowBase(pRB, oC), ld(pSV, j));
  if (j < ny) outH(h, cur ? pH0 : pH1, cur ? pDH1 : pDH0, cur ? pDH0 : pDH1, cur ? pSS0 : pSS1, row, rowBase(pRU, oC), rowBase(pRV, oC), rowBase(pRV, oN), j);
}

/** Momentum on the u faces of the row, its AB3 advance, and its tendency into slot t2. */
function outU(u: usize, h: usize, un: usize, t1: usize, t2: usize, row: i32, qC: usize, qN: usize, VC: usize, VN: usize, BC: usize): void {
  const ob = pOB;
  const cu = pCU;
  const tx = pTX;
  const w = W;
  const quarter = splat(0.25);
  const half = splat(0.5);
  const two = splat(2);
  const one = splat(1);
  const vH = splat(H);
  const vrho = splat(rho0);
  const vidx = splat(idx);
  const vidx2 = splat(idx2);
  const vidy2 = splat(idy2);
  const vr = splat(r);
  const vA = splat(A);
  const vdt = splat(dt);
  const va0 = splat(a0);
  const va1 = splat(a1);
  const va2 = splat(a2);
  const end = row + nx + 2;
  let k = row + 1;
  for (; k + LANES - 1 < end; k += LANES) {
    const uc = ldv(u, k);
    const pv = mul(quarter, add(mul(ldv(qN, k), add(ldv(VN, k - 1), ldv(VN, k))), mul(ldv(qC, k), add(ldv(VC, k - 1), ldv(VC, k)))));
    const hu = maxv(add(vH, mul(half, add(ldv(h, k - 1), ldv(h, k)))), one);
    const twoU = mul(two, uc);
    const lap = add(add(mul(sub(add(ldv(u, k + 1), ldv(u, k - 1)), twoU), vidx2), mul(sub(add(ldv(u, k + w), ldv(u, k - w)), twoU), vidy2)), mul(ldv(cu, k), uc));
    const tend = add(sub(add(sub(pv, mul(sub(ldv(BC, k), ldv(BC, k - 1)), vidx)), div(ldv(tx, k), mul(vrho, hu))), mul(vr, uc)), mul(vA, lap));
    const du = keep(tend, v128.and(ldv(ob, k - 1), ldv(ob, k)));
    stv(un, k, add(uc, mul(vdt, add(add(mul(va0, du), mul(va1, ldv(t1, k))), mul(va2, ldv(t2, k))))));
    stv(t2, k, du);
  }
  for (; k < end; k++) {
    let du: real = 0;
    const uc = ld(u, k);
    if ((ldb(ob, k - 1) & ldb(ob, k)) != 0) {
      const pv = <real>0.25 * (ld(qN, k) * (ld(VN, k - 1) + ld(VN, k)) + ld(qC, k) * (ld(VC, k - 1) + ld(VC, k)));
      const hu = maxs(H + <real>0.5 * (ld(h, k - 1) + ld(h, k)), <real>1);
      const lap = (ld(u, k + 1) + ld(u, k - 1) - <real>2 * uc) * idx2 + (ld(u, k + w) + ld(u, k - w) - <real>2 * uc) * idy2 + ld(cu, k) * uc;
      du = pv - (ld(BC, k) - ld(BC, k - 1)) * idx + ld(tx, k) / (rho0 * hu) - r * uc + A * lap;
    }
    st(un, k, uc + dt * (a0 * du + a1 * ld(t1, k) + a2 * ld(t2, k)));
    st(t2, k, du);
  }
}

/** Momentum on the v faces of the row, its AB3 advance, the tendency into slot t2, the row's sponge. */
function outV(v: usize, h: usize, vn: usize, t1: usize, t2: usize, row: i32, qC: usize, US: usize, UC: usize, BS: usize, BC: usize, s: real): void {
  const ob = pOB;
  const cv = pCV;
  const ty = pTY;
  const w = W;
  const quarter = splat(0.25);
  const half = splat(0.5);
  const two = splat(2);
  const one = splat(1);
  const vH = splat(H);
  const vrho = splat(rho0);
  const vidy = splat(idy);
  const vidx2 = splat(idx2);
  const vidy2 = splat(idy2);
  const vr = splat(r);
  const vA = splat(A);
  const vdt = splat(dt);
  const va0 = splat(a0);
  const va1 = splat(a1);
  const va2 = splat(a2);
  const end = row + nx + 1;
  let k = row + 1;
  for (; k + LANES - 1 < end; k += LANES) {
    const vc = ldv(v, k);
    const pv = mul(quarter, add(mul(ldv(qC, k + 1), add(ldv(US, k + 1), ldv(UC, k + 1))), mul(ldv(qC, k), add(ldv(US, k), ldv(UC, k)))));
    const hv = maxv(add(vH, mul(half, add(ldv(h, k - w), ldv(h, k)))), one);
    const twoV = mul(two, vc);
    const lap = add(add(mul(sub(add(ldv(v, k + 1), ldv(v, k - 1)), twoV), vidx2), mul(sub(add(ldv(v, k + w), ldv(v, k - w)), twoV), vidy2)), mul(ldv(cv, k), vc));
    const tend = add(sub(add(sub(neg(pv), mul(sub(ldv(BC, k), ldv(BS, k)), vidy)), div(ldv(ty, k), mul(vrho, hv))), mul(vr, vc)), mul(vA, lap));
    const dv = keep(tend, v128.and(ldv(ob, k - w), ldv(ob, k)));
    stv(vn, k, add(vc, mul(vdt, add(add(mul(va0, dv), mul(va1, ldv(t1, k))), mul(va2, ldv(t2, k))))));
    stv(t2, k, dv);
  }
  for (; k < end; k++) {
    let dv: real = 0;
    const vc = ld(v, k);
    if ((ldb(ob, k - w) & ldb(ob, k)) != 0) {
      const pv = <real>0.25 * (ld(qC, k + 1) * (ld(US, k + 1) + ld(UC, k + 1)) + ld(qC, k) * (ld(US, k) + ld(UC, k)));
      const hv = maxs(H + <real>0.5 * (ld(h, k - w) + ld(h, k)), <real>1);
      const lap = (ld(v, k + 1) + ld(v, k - 1) - <real>2 * vc) * idx2 + (ld(v, k + w) + ld(v, k - w) - <real>2 * vc) * idy2 + ld(cv, k) * vc;
      dv = -pv - (ld(BC, k) - ld(BS, k)) * idy + ld(ty, k) / (rho0 * hv) - r * vc + A * lap;
    }
    st(vn, k, vc + dt * (a0 * dv + a1 * ld(t1, k) + a2 * ld(t2, k)));
    st(t2, k, dv);
  }
  if (s != 1) {
    const vs = splat(s);
    k = row + 1;
    for (; k + LANES - 1 < end; k += LANES) stv(vn, k, mul(ldv(vn, k), vs));
    for (; k < end; k++) st(vn, k, ld(vn, k) * s);
  }
}

/** Continuity with entrainment at the centres of the row, its AB3 advance, the tendency into t2, the row's sponge and its sum. */
function outH(h: usize, hn: usize, t1: usize, t2: usize, sums: usize, row: i32, UC: usize, VC: usize, VN: usize, j: i32): void {
  const ob = pOB;
  const vH = splat(H);
  const vhMin = splat(hMin);
  const vrate = splat(entrainRate);
  const vidx = splat(idx);
  const vidy = splat(idy);
  const vdt = splat(dt);
  const va0 = splat(a0);
  const va1 = splat(a1);
  const va2 = splat(a2);
  const end = row + nx + 1;
  let k = row + 1;
  for (; k + LANES - 1 < end; k += LANES) {
    const hc = ldv(h, k);
    const thick = add(vH, hc);
    const entrain = keep(mul(sub(vhMin, thick), vrate), lt(thick, vhMin));
    const div_ = add(mul(sub(ldv(UC, k + 1), ldv(UC, k)), vidx), mul(sub(ldv(VN, k), ldv(VC, k)), vidy));
    const dh = keep(add(neg(div_), entrain), ldv(ob, k));
    stv(hn, k, add(hc, mul(vdt, add(add(mul(va0, dh), mul(va1, ldv(t1, k))), mul(va2, ldv(t2, k))))));
    stv(t2, k, dh);
  }
  for (; k < end; k++) {
    let dh: real = 0;
    const hc = ld(h, k);
    if (ldb(ob, k) != 0) {
      const thick = H + hc;
      const entrain: real = thick < hMin ? (hMin - thick) * entrainRate : <real>0;
      dh = -((ld(UC, k + 1) - ld(UC, k)) * idx + (ld(VN, k) - ld(VC, k)) * idy) + entrain;
    }
    st(hn, k, hc + dt * (a0 * dh + a1 * ld(t1, k) + a2 * ld(t2, k)));
    st(t2, k, dh);
  }
  const s = ld(pSH, j);
  if (s != 1) {
    // the sum in column order, as the TypeScript step takes it
    // (in double in both builds: the sums are the budget's, a diagnostic)
    let sum: f64 = 0;
    for (k = row + 1; k < end; k++) {
      const x = ld(hn, k);
      sum += <f64>x;
      st(hn, k, x * s);
    }
    store<f64>(sums + (<usize>j << 3), sum);
  }
}
