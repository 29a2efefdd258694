// sin, cos, tan from IEEE arithmetic only. Method: fdlibm's (k_sin.c, k_cos.c as revised in FreeBSD,
// k_tan.c): reduce to [-pi/4, pi/4] (trig-reduction.ts), then Remez minimax polynomials on that
// interval with the published coefficients, the low part of the reduced argument carried through.
// Under 1 ulp for sin and cos, about 1 ulp for tan (test/model/portable-math.test.ts).

import * as bits from './bits.ts';
import * as reduction from './trig-reduction.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { clearLowWord, highWord } = bits;
const { reduceHalfPi, reduced } = reduction;

const S1 = -1.66666666666666324348e-1;
const S2 = 8.33333333332248946124e-3;
const S3 = -1.98412698298579493134e-4;
const S4 = 2.75573137070700676789e-6;
const S5 = -2.50507602534068634195e-8;
const S6 = 1.58969099521155010221e-10;

/** sin(x + y) for |x| <= pi/4, y the low part of x (or 0). */
function sinKernel(x: number, y: number): number {
  const z = x * x;
  const v = z * x;
  const r = S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)));
  if (y === 0) return x + v * (S1 + z * r);
  return x - (z * (0.5 * y - v * r) - y - v * S1);
}

const C1 = 4.16666666666666019037e-2;
const C2 = -1.38888888888741095749e-3;
const C3 = 2.48015872894767294178e-5;
const C4 = -2.75573143513906633035e-7;
const C5 = 2.0875723212981748279e-9;
const C6 = -1.13596475577881948265e-11;

/** cos(x + y) for |x| <= pi/4. */
function cosKernel(x: number, y: number): number {
  const z = x * x;
  let w = z * z;
  const r = z * (C1 + z * (C2 + z * C3)) + w * w * (C4 + z * (C5 + z * C6));
  const hz = 0.5 * z;
  w = 1 - hz;
  return w + (1 - w - hz + (z * r - x * y));
}

const T = [
  3.33333333333334091986e-1, 1.33333333333201242699e-1, 5.39682539762260521377e-2, 2.18694882948595424599e-2,
  8.86323982359930005737e-3, 3.59207910759131235356e-3, 1.45620945432529025516e-3, 5.88041240820264096874e-4,
  2.46463134818469906812e-4, 7.817944429395570923e-5, 7.14072491382608190305e-5, -1.85586374855275456654e-5,
  2.59073051863633712884e-5,
];
const PIO4 = 7.85398163397448278999e-1;
const PIO4_LO = 3.06161699786838301793e-17;

/** tan(x + y) (odd = 1) or -1/tan(x + y) (odd = -1) for |x| <= pi/4. */
function tanKernel(x: number, y: number, odd: 1 | -1): number {
  const hx = highWord(x);
  const big = (hx & 0x7fffffff) >= 0x3fe59428; // |x| >= 0.6744: use tan(pi/4 - x)
  if (big) {
    if (hx < 0) {
      x = -x;
      y = -y;
    }
    x = PIO4 - x + (PIO4_LO - y);
    y = 0;
  }
  const z = x * x;
  let w = z * z;
  let r = T[1] + w * (T[3] + w * (T[5] + w * (T[7] + w * (T[9] + w * T[11]))));
  let v = z * (T[2] + w * (T[4] + w * (T[6] + w * (T[8] + w * (T[10] + w * T[12])))));
  let s = z * x;
  r = y + z * (s * (r + v) + y);
  r += T[0] * s;
  w = x + r;
  if (big) {
    v = odd;
    return (hx < 0 ? -1 : 1) * (v - 2 * (x - ((w * w) / (w + v) - r)));
  }
  if (odd === 1) return w;
  // -1/(x + r) without losing the low part
  const zh = clearLowWord(w);
  v = r - (zh - x);
  const a = -1 / w;
  const th = clearLowWord(a);
  s = 1 + th * zh;
  return th + a * (s + th * v);
}

const PIO4_BOUND = 0.7853981633974483; // |x| up to here needs no reduction

export function sin(x: number): number {
  const ax = Math.abs(x);
  if (ax <= PIO4_BOUND) return ax < 7.450580596923828e-9 ? x : sinKernel(x, 0); // |x| < 2^-27: sin x = x
  if (ax === Infinity || x !== x) return NaN;
  const n = reduceHalfPi(ax);
  const s = x < 0 ? -1 : 1;
  const y0 = reduced[0];
  const y1 = reduced[1];
  if (n === 0) return s * sinKernel(y0, y1);
  if (n === 1) return s * cosKernel(y0, y1);
  if (n === 2) return -s * sinKernel(y0, y1);
  return -s * cosKernel(y0, y1);
}

export function cos(x: number): number {
  const ax = Math.abs(x);
  if (ax <= PIO4_BOUND) return ax < 7.450580596923828e-9 ? 1 : cosKernel(ax, 0);
  if (ax === Infinity || x !== x) return NaN;
  const n = reduceHalfPi(ax);
  const y0 = reduced[0];
  const y1 = reduced[1];
  if (n === 0) return cosKernel(y0, y1);
  if (n === 1) return -sinKernel(y0, y1);
  if (n === 2) return -cosKernel(y0, y1);
  return sinKernel(y0, y1);
}

export function tan(x: number): number {
  const ax = Math.abs(x);
  if (ax <= PIO4_BOUND) return ax < 7.450580596923828e-9 ? x : tanKernel(x, 0, 1);
  if (ax === Infinity || x !== x) return NaN;
  const n = reduceHalfPi(ax);
  const t = tanKernel(reduced[0], reduced[1], (n & 1) === 0 ? 1 : -1);
  return x < 0 ? -t : t;
}
