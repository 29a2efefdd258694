// exp, expm1, log, log10 from IEEE + - * / and bit access only, so every host gives the same bits.
// Method: fdlibm's (Sun Microsystems, 1993; as documented in its e_exp.c, s_expm1.c, e_log.c and
// FreeBSD's e_log10.c/k_log.h): Cody-Waite reduction by ln 2 with a two-part ln 2, then a Remez
// minimax polynomial (the published coefficients below) on the reduced interval. Written anew here.
// Errors measured against Node's Math in test/model/portable-math.test.ts: under 1 ulp.

import * as bits from './bits.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { clearLowWord, highWord, pow2, scalePow2 } = bits;

export const LN2_HI = 6.9314718036912381649e-1; // 32 significant bits: k * LN2_HI is exact
export const LN2_LO = 1.90821492927058770002e-10;
const INV_LN2 = 1.442695040888963387;
/** Above this exp overflows; below EXP_UNDERFLOW it is 0 (ln of the largest double, of 2^-1075). */
export const EXP_OVERFLOW = 7.09782712893383973096e2;
export const EXP_UNDERFLOW = -7.4513321910194110842e2;

// Remez coefficients of R(r^2) ~ r (e^r + 1)/(e^r - 1) on [0, 0.347^2] (fdlibm e_exp.c).
const P1 = 1.66666666666666019037e-1;
const P2 = -2.77777777770155933842e-3;
const P3 = 6.61375632143793436117e-5;
const P4 = -1.6533902205465251539e-6;
const P5 = 4.13813679705723846039e-8;

/** Nearest integer to x / ln 2, halves away from zero (symmetric in x). */
function nearestMultipleOfLn2(x: number): number {
  return x < 0 ? Math.ceil(INV_LN2 * x - 0.5) : Math.floor(INV_LN2 * x + 0.5);
}

/** e^(hi + lo) - the core of exp and of pow, which passes the low part of its y log x. */
export function expWithTail(xh: number, xl: number): number {
  if (xh !== xh) return xh;
  if (xh > EXP_OVERFLOW + 1) return Infinity;
  if (xh < EXP_UNDERFLOW - 1) return 0;
  const ax = Math.abs(xh);
  if (ax < 3.725290298461914e-9 && xl === 0) return 1 + xh; // |x| < 2^-28
  let k = 0;
  let hi = xh;
  let lo = -xl;
  if (ax > 0.34657359027997264) {
    k = nearestMultipleOfLn2(xh);
    hi = xh - k * LN2_HI;
    lo = k * LN2_LO - xl;
  }
  const r = hi - lo;
  const t = r * r;
  const c = r - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  const y = 1 - (lo - (r * c) / (2 - c) - hi);
  return k === 0 ? y : scalePow2(y, k);
}

export function exp(x: number): number {
  if (x > EXP_OVERFLOW) return Infinity;
  if (x < EXP_UNDERFLOW) return 0;
  return expWithTail(x, 0);
}

// Remez coefficients for expm1's rational form (fdlibm s_expm1.c).
const Q1 = -3.33333333333331316428e-2;
const Q2 = 1.58730158725481460165e-3;
const Q3 = -7.93650757867487942473e-5;
const Q4 = 4.00821782732936239552e-6;
const Q5 = -2.01099218183624371326e-7;

/** e^x - 1, accurate near 0 where exp(x) - 1 would cancel. */
export function expm1(x: number): number {
  if (x !== x) return x;
  if (x > EXP_OVERFLOW) return Infinity;
  if (x < -38.816242111356935) return -1; // e^x < 2^-56: -1 after rounding
  const ax = Math.abs(x);
  let k = 0;
  let c = 0;
  if (ax > 0.34657359027997264) {
    k = nearestMultipleOfLn2(x);
    const hi = x - k * LN2_HI;
    const lo = k * LN2_LO;
    x = hi - lo;
    c = hi - x - lo;
  } else if (ax < 5.551115123125783e-17) {
    return x; // |x| < 2^-54
  }
  const hfx = 0.5 * x;
  const hxs = x * hfx;
  const r1 = 1 + hxs * (Q1 + hxs * (Q2 + hxs * (Q3 + hxs * (Q4 + hxs * Q5))));
  const t = 3 - r1 * hfx;
  let e = hxs * ((r1 - t) / (6 - x * t));
  if (k === 0) return x - (x * e - hxs);
  e = x * (e - c) - c;
  e -= hxs;
  if (k === -1) return 0.5 * (x - e) - 0.5;
  if (k === 1) return x < -0.25 ? -2 * (e - (x + 0.5)) : 1 + 2 * (x - e);
  if (k <= -2 || k > 56) return scalePow2(1 - (e - x), k) - 1;
  if (k < 20) return scalePow2(1 - scalePow2(1, -k) - (e - x), k); // 1 - 2^-k is exact here
  return scalePow2(x - (e + scalePow2(1, -k)) + 1, k);
}

// Remez coefficients of log(1+f) = f - f^2/2 + s(f^2/2 + R(s^2)), s = f/(2+f) (fdlibm e_log.c).
const LG1 = 6.66666666666673513e-1;
const LG2 = 3.999999999940941908e-1;
const LG3 = 2.857142874366239149e-1;
const LG4 = 2.222219843214978396e-1;
const LG5 = 1.818357216161805012e-1;
const LG6 = 1.531383769920937332e-1;
const LG7 = 1.479819860511658591e-1;
const TWO54 = 18014398509481984;

/** Set by splitLog: x = 2^splitK (1 + splitF), 1 + splitF in [sqrt(2)/2, sqrt(2)). */
let splitK = 0;
let splitF = 0;
let splitHighMantissa = 0;

/** For positive finite x. */
function splitLog(x: number): void {
  let k = 0;
  if (x < 2.2250738585072014e-308) {
    x *= TWO54; // subnormal: make it normal first
    k = -54;
  }
  let hx = highWord(x);
  const e = (hx >> 20) - 1023;
  hx &= 0x000fffff;
  const i = (hx + 0x95f64) & 0x100000; // is the mantissa above sqrt(2)? then halve it
  const shift = e + (i >> 20);
  // the mantissa by an exact multiplication (writing the exponent bits into the double would stall the CPU's store forwarding)
  const m = x * pow2(-shift);
  splitK = k + shift;
  splitF = m - 1; // exact
  splitHighMantissa = hx;
}

/** s (f^2/2 + R(s^2)) with s = f/(2+f): the small remainder of log(1+f). */
function logRemainder(f: number): number {
  const s = f / (2 + f);
  const z = s * s;
  const w = z * z;
  const t1 = w * (LG2 + w * (LG4 + w * LG6));
  const t2 = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7)));
  return s * (0.5 * f * f + (t2 + t1));
}

export function log(x: number): number {
  if (x !== x || x < 0) return NaN;
  if (x === 0) return -Infinity;
  if (x === Infinity) return x;
  splitLog(x);
  const k = splitK;
  const f = splitF;
  const hx = splitHighMantissa;
  if ((0x000fffff & (2 + hx)) < 3) {
    // -2^-20 <= f < 2^-20: a short series
    if (f === 0) return k === 0 ? 0 : k * LN2_HI + k * LN2_LO;
    const R = f * f * (0.5 - 0.33333333333333333 * f);
    return k === 0 ? f - R : k * LN2_HI - (R - k * LN2_LO - f);
  }
  const s = f / (2 + f);
  const z = s * s;
  const w = z * z;
  const t1 = w * (LG2 + w * (LG4 + w * LG6));
  const t2 = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7)));
  const R = t2 + t1;
  if (((hx - 0x6147a) | (0x6b851 - hx)) > 0) {
    const hfsq = 0.5 * f * f;
    if (k === 0) return f - (hfsq - s * (hfsq + R));
    return k * LN2_HI - (hfsq - (s * (hfsq + R) + k * LN2_LO) - f);
  }
  if (k === 0) return f - s * (f - R);
  return k * LN2_HI - (s * (f - R) - k * LN2_LO - f);
}

// log10 as FreeBSD's e_log10.c: log(1+f) split into a short head and a tail so the products by the
// two-part 1/ln 10 and log10(2) stay accurate (log10 of exact powers of ten comes out exact).
const IVLN10_HI = 4.34294481878168880939e-1;
const IVLN10_LO = 2.50829467116452752298e-11;
const LOG10_2HI = 3.01029995663611771306e-1;
const LOG10_2LO = 3.69423907715893078616e-13;

export function log10(x: number): number {
  if (x !== x || x < 0) return NaN;
  if (x === 0) return -Infinity;
  if (x === Infinity) return x;
  if (x === 1) return 0;
  splitLog(x);
  const y = splitK;
  const f = splitF;
  const hfsq = 0.5 * f * f;
  const r = logRemainder(f);
  const hi = clearLowWord(f - hfsq);
  const lo = f - hi - hfsq + r;
  let valHi = hi * IVLN10_HI;
  const y2 = y * LOG10_2HI;
  let valLo = y * LOG10_2LO + (lo + hi) * IVLN10_LO + lo * IVLN10_HI;
  const w = y2 + valHi;
  valLo += y2 - w + valHi;
  valHi = w;
  return valLo + valHi;
}
