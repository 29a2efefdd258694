// sinh, cosh, tanh from exp and expm1 (expm1 near 0, where e^x - 1 cancels). Method and thresholds:
// fdlibm's e_sinh.c, e_cosh.c, s_tanh.c. A few ulp at most (test/model/portable-math.test.ts).

import * as expLog from './exp-log.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { exp, expm1 } = expLog;

const LN2_HALF = 0.34657359027997264;
const LN_MAX = 7.09782712893383973096e2; // ln of the largest double
const OVERFLOW = 7.10475860073943863426e2; // ln of the largest double + ln 2

export function sinh(x: number): number {
  if (x !== x || x === Infinity || x === -Infinity) return x;
  const h = x < 0 ? -0.5 : 0.5;
  const ax = Math.abs(x);
  if (ax < 22) {
    if (ax < 3.725290298461914e-9) return x; // 2^-28
    const t = expm1(ax);
    if (ax < 1) return h * (2 * t - (t * t) / (t + 1));
    return h * (t + t / (t + 1));
  }
  if (ax < LN_MAX) return h * exp(ax);
  if (ax <= OVERFLOW) {
    const w = exp(0.5 * ax); // e^x / 2 = (e^(x/2) / 2) e^(x/2), without overflowing on the way
    return h * w * w;
  }
  return x * Infinity;
}

export function cosh(x: number): number {
  if (x !== x) return x;
  const ax = Math.abs(x);
  if (ax === Infinity) return Infinity;
  if (ax < LN2_HALF) {
    const t = expm1(ax);
    const w = 1 + t;
    if (ax < 2.7755575615628914e-17) return w; // 2^-55
    return 1 + (t * t) / (w + w);
  }
  if (ax < 22) {
    const t = exp(ax);
    return 0.5 * t + 0.5 / t;
  }
  if (ax < LN_MAX) return 0.5 * exp(ax);
  if (ax <= OVERFLOW) {
    const w = exp(0.5 * ax);
    return 0.5 * w * w;
  }
  return Infinity;
}

export function tanh(x: number): number {
  if (x !== x) return x;
  const ax = Math.abs(x);
  let z: number;
  if (ax < 22) {
    if (ax < 2.7755575615628914e-17) return x; // 2^-55
    if (ax >= 1) {
      const t = expm1(2 * ax);
      z = 1 - 2 / (t + 2);
    } else {
      const t = expm1(-2 * ax);
      z = -t / (t + 2);
    }
  } else {
    z = 1;
  }
  return x < 0 ? -z : z;
}
