// x^y from IEEE arithmetic only, accurate for large results too. Method (ours, from textbook parts):
// ln x in double-double (about 2^-66 relative), y ln x as an exact product plus tail, then e^(head +
// tail) by the exp of exp-log.ts, which carries the tail through its reduction. ln x = k ln 2 +
// 2 atanh(s), s = f/(2+f) with 1+f in [sqrt(2)/2, sqrt(2)) (|s| < 0.1716): s in double-double,
// 2s + (2/3)s^3 in double-double, the rest of the atanh Taylor series (to s^27) in plain doubles,
// which it may be since it is under 2^-12 of the whole. So the error of pow is that of exp (under 1
// ulp) plus at most ~0.01 ulp, for every result size up to overflow. Special cases: ECMAScript's
// Number::exponentiate (which differs from IEEE 754 pow for (+-1)^(+-Infinity) and 1^NaN: NaN).

import * as bits from './bits.ts';
import * as expLog from './exp-log.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { low, highWord, pow2, twoProd, twoSum } = bits;
const { expWithTail } = expLog;

const LN2_HI = 6.93147180559945286227e-1; // ln 2 = LN2_HI + LN2_LO to ~107 bits
const LN2_LO = 2.319046813846299558e-17;
const TWO_THIRDS_HI = 2 / 3;
const TWO_THIRDS_LO = (2 - twoProd(3, TWO_THIRDS_HI) - low[0]) / 3; // 2/3 - TWO_THIRDS_HI
// 2/(2n+1) for n = 2 .. 13: the atanh series beyond its s^3 term (IEEE divisions, the same everywhere).
const A5 = 2 / 5,
  A7 = 2 / 7,
  A9 = 2 / 9,
  A11 = 2 / 11,
  A13 = 2 / 13,
  A15 = 2 / 15;
const A17 = 2 / 17,
  A19 = 2 / 19,
  A21 = 2 / 21,
  A23 = 2 / 23,
  A25 = 2 / 25,
  A27 = 2 / 27;

let lnHi = 0;
let lnLo = 0;

/** ln x = lnHi + lnLo for positive finite x. */
function lnDoubleDouble(x: number): void {
  let k = 0;
  if (x < 2.2250738585072014e-308) {
    x *= 18014398509481984; // 2^54: subnormal to normal
    k = -54;
  }
  let hx = highWord(x);
  const e = (hx >> 20) - 1023;
  hx &= 0x000fffff;
  const i = (hx + 0x95f64) & 0x100000;
  const shift = e + (i >> 20);
  const m = x * pow2(-shift); // exact: a power of two, result normal
  k += shift;
  const f = m - 1; // exact
  // s = f / (2 + f) = sh + sl
  const den = 2 + f;
  const denLow = f - (den - 2); // exact rounding error of 2 + f
  const sh = f / den;
  const p = twoProd(sh, den);
  const sl = (f - p - low[0] - sh * denLow) / den;
  // s^2 and s^3 in double-double
  const z = twoProd(sh, sh);
  const zl = low[0] + 2 * sh * sl;
  const c = twoProd(sh, z);
  const cl = low[0] + (sh * zl + sl * z);
  // (2/3) s^3
  const d = twoProd(c, TWO_THIRDS_HI);
  const dl = low[0] + (cl * TWO_THIRDS_HI + c * TWO_THIRDS_LO);
  // s^5 (2/5 + 2 s^2/7 + ...)
  const q =
    A5 +
    z *
      (A7 +
        z *
          (A9 +
            z * (A11 + z * (A13 + z * (A15 + z * (A17 + z * (A19 + z * (A21 + z * (A23 + z * (A25 + z * A27))))))))));
  const tail = c * z * q;
  const a = twoSum(2 * sh, d);
  const al = low[0] + (dl + tail + 2 * sl);
  const lh = a + al;
  const ll = al - (lh - a);
  // + k ln 2
  const kh = twoProd(k, LN2_HI);
  const kl = low[0] + k * LN2_LO;
  const t = twoSum(kh, lh);
  const tl = low[0] + (ll + kl);
  lnHi = t + tl;
  lnLo = tl - (lnHi - t);
}

function isOddInteger(y: number): boolean {
  return Math.abs(y) < 9007199254740992 && Math.floor(y) === y && y % 2 !== 0;
}

export function pow(x: number, y: number): number {
  if (y !== y) return NaN;
  if (y === 0) return 1;
  if (x !== x) return NaN;
  if (y === Infinity || y === -Infinity) {
    const ax = Math.abs(x);
    if (ax === 1) return NaN;
    return ax > 1 === y > 0 ? Infinity : 0;
  }
  if (x === Infinity) return y > 0 ? Infinity : 0;
  if (x === -Infinity) {
    if (y > 0) return isOddInteger(y) ? -Infinity : Infinity;
    return isOddInteger(y) ? -0 : 0;
  }
  if (x === 0) {
    const odd = Object.is(x, -0) && isOddInteger(y);
    if (y > 0) return odd ? -0 : 0;
    return odd ? -Infinity : Infinity;
  }
  let negate = false;
  if (x < 0) {
    if (Math.floor(y) !== y) return NaN;
    negate = isOddInteger(y);
    x = -x;
  }
  if (x === 1) return negate ? -1 : 1;
  if (y === 1) return negate ? -x : x;
  lnDoubleDouble(x);
  const ph = twoProd(y, lnHi);
  const pl = low[0] + y * lnLo;
  let r: number;
  if (ph !== ph || ph > 1000)
    r = Infinity; // also y ln x overflowing as a product
  else if (ph < -1000) r = 0;
  else {
    const zh = ph + pl;
    r = expWithTail(zh, pl - (zh - ph));
  }
  return negate ? -r : r;
}
