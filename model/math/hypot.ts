// sqrt(x^2 + y^2) without overflow or underflow on the way and within about half an ulp: scale by a
// power of two, take the square root, then one Newton correction with the squares computed exactly
// (Dekker's product). Specials as ECMAScript's Math.hypot: an infinity wins over NaN.

import * as bits from './bits.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { low, twoProd, twoSum } = bits;

const BIG = 3.273390607896142e150; // 2^500
const SMALL = 3.054936363499605e-151; // 2^-500
const UP = 4.149515568880993e180; // 2^600
const DOWN = 2.409919865102884e-181; // 2^-600

export function hypot(x: number, y: number): number {
  if (x === Infinity || x === -Infinity || y === Infinity || y === -Infinity) return Infinity;
  if (x !== x || y !== y) return NaN;
  let a = Math.abs(x);
  let b = Math.abs(y);
  if (a < b) {
    const t = a;
    a = b;
    b = t;
  }
  if (b === 0) return a;
  let scale = 1;
  if (a > BIG) {
    a *= DOWN;
    b *= DOWN;
    scale = UP;
  } else if (a < SMALL) {
    a *= UP;
    b *= UP;
    scale = DOWN;
  }
  let h = Math.sqrt(a * a + b * b);
  // h^2 - (a^2 + b^2) from exact pieces, then h -= residual / 2h
  const aa = twoProd(a, a);
  const aaLow = low[0];
  const bb = twoProd(b, b);
  const bbLow = low[0];
  const s = twoSum(aa, bb);
  const sLow = low[0] + aaLow + bbLow;
  const hh = twoProd(h, h);
  const hhLow = low[0];
  const residual = hh - s + (hhLow - sLow);
  h -= residual / (2 * h);
  return h * scale;
}
