// Reduction of a trig argument: x = n pi/2 + (y0 + y1), |y0 + y1| <= pi/4 (about), y1 the low part.
// |x| < 2^20 pi/2 (~1.6e6): Cody and Waite's method with pi/2 in three parts of 33 bits each plus a
// tail (the constants of fdlibm's e_rem_pio2.c), the second and third parts used only when the
// first subtraction cancels many bits. Exact products since n < 2^20; error far below 1 ulp of y.
// Beyond: Payne and Hanek's method, x times 2/pi to 1280 bits in exact integer arithmetic (BigInt),
// the bits of 2/pi computed once from Machin's formula for pi. So every finite x is reduced to
// ~100 correct bits: sin(1e22) is as good as sin(1).

import * as bits from './bits.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { highWord, scalePow2, twoProd, low, lowWord } = bits;

const INV_PIO2 = 6.36619772367581382433e-1;
const PIO2_1 = 1.57079632673412561417; // first 33 bits of pi/2
const PIO2_1T = 6.07710050650619224932e-11; // pi/2 - PIO2_1
const PIO2_2 = 6.0771005063039659766e-11; // next 33 bits
const PIO2_2T = 2.02226624879595063154e-21;
const PIO2_3 = 2.0222662487111664558e-21; // next 33 bits
const PIO2_3T = 8.47842766036889956997e-32;
export const PIO2_HI = 1.5707963267948966; // pi/2 = PIO2_HI + PIO2_LO to ~107 bits
export const PIO2_LO = 6.123233995736766e-17;

/** High [0] and low [1] parts of the last reduction (a typed array: see low in bits.ts). */
export const reduced = new Float64Array(2);

/** Reduces |x| (finite, > pi/4); returns n mod 4 for |x| and leaves y in reduced. The caller applies x's sign. */
export function reduceHalfPi(ax: number): number {
  if (ax < 1647099.3291652855) return codyWaite(ax);
  return payneHanek(ax);
}

function exponentOf(x: number): number {
  return (highWord(x) >> 20) & 0x7ff;
}

function codyWaite(ax: number): number {
  const fn = Math.floor(ax * INV_PIO2 + 0.5);
  let r = ax - fn * PIO2_1;
  let w = fn * PIO2_1T;
  const j = exponentOf(ax);
  let y0 = r - w;
  if (j - exponentOf(y0) > 16) {
    // cancellation: x is near a multiple of pi/2, take the next 33 bits
    let t = r;
    w = fn * PIO2_2;
    r = t - w;
    w = fn * PIO2_2T - (t - r - w);
    y0 = r - w;
    if (j - exponentOf(y0) > 49) {
      t = r;
      w = fn * PIO2_3;
      r = t - w;
      w = fn * PIO2_3T - (t - r - w);
      y0 = r - w;
    }
  }
  reduced[0] = y0;
  reduced[1] = r - y0 - w;
  return fn & 3; // fn < 2^20: an exact int32
}

/** floor(2/pi * 2^TWO_OVER_PI_BITS), computed on first need. */
const TWO_OVER_PI_BITS = 1280;
let twoOverPi: bigint | null = null;

/** atan(1/q) * 2^bits by its Taylor series in integer arithmetic (truncation errors: a few units). */
function arctanInverse(q: bigint, bits: bigint): bigint {
  let term = (1n << bits) / q;
  let sum = term;
  const q2 = q * q;
  for (let k = 1n; term !== 0n; k++) {
    term /= q2;
    const part = term / (2n * k + 1n);
    sum = k % 2n === 1n ? sum - part : sum + part;
  }
  return sum;
}

/** 2/pi to TWO_OVER_PI_BITS bits; pi from Machin's formula pi/4 = 4 atan(1/5) - atan(1/239). */
export function twoOverPiBits(): bigint {
  if (twoOverPi === null) {
    const guard = 64n;
    const bits = BigInt(TWO_OVER_PI_BITS) + guard;
    const piScaled = 16n * arctanInverse(5n, bits) - 4n * arctanInverse(239n, bits); // pi * 2^bits
    twoOverPi = (1n << (bits + BigInt(TWO_OVER_PI_BITS) + 1n)) / piScaled;
  }
  return twoOverPi;
}

function bitLength(v: bigint): number {
  return v.toString(2).length;
}

function payneHanek(ax: number): number {
  // ax = m 2^e exactly, m an integer below 2^53
  const hx = highWord(ax);
  const e = ((hx >> 20) & 0x7ff) - 1075;
  const m = BigInt((hx & 0xfffff) | 0x100000) * 4294967296n + BigInt(lowWord(ax));
  const fracBits = BigInt(TWO_OVER_PI_BITS - e); // ax * 2/pi = product / 2^fracBits
  const product = m * twoOverPiBits();
  let n = Number((product >> fracBits) & 3n);
  const one = 1n << fracBits;
  let frac = product & (one - 1n);
  if (frac >= one >> 1n) {
    frac -= one; // round to the nearest multiple: frac in [-1/2, 1/2)
    n = (n + 1) % 4;
  }
  const negative = frac < 0n;
  if (negative) frac = -frac;
  // top 106 bits of frac as a double-double head + tail
  const shift = bitLength(frac) - 106;
  const top = shift > 0 ? frac >> BigInt(shift) : frac << BigInt(-shift);
  const scale = shift - Number(fracBits);
  let fh = scalePow2(Number(top >> 53n), scale + 53);
  let fl = scalePow2(Number(top & ((1n << 53n) - 1n)), scale);
  const s = fh + fl;
  fl -= s - fh;
  fh = s;
  // times pi/2 in double-double
  const p = twoProd(fh, PIO2_HI);
  const pe = low[0] + (fh * PIO2_LO + fl * PIO2_HI);
  const y0 = p + pe;
  reduced[0] = negative ? -y0 : y0;
  reduced[1] = negative ? -(pe - (y0 - p)) : pe - (y0 - p);
  return n;
}
