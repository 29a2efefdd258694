// atan, atan2, asin, acos from IEEE arithmetic only. Method: fdlibm's (s_atan.c, e_atan2.c,
// e_asin.c, e_acos.c): atan by reduction to |t| < 7/16 around the breakpoints 1/2, 1, 3/2 and
// infinity with atan of each breakpoint in two parts, then a Remez polynomial; asin and acos by a
// Remez rational approximation on |x| < 1/2 and the half-angle identity with sqrt beyond.

import * as bits from './bits.ts';
// Local copies: some loaders (tsx) turn imported bindings into getter calls, costly in these hot paths.
const { clearLowWord, highWord } = bits;

const ATAN_HI = [4.63647609000806093515e-1, 7.85398163397448278999e-1, 9.82793723247329054082e-1, 1.570796326794896558];
const ATAN_LO = [
  2.26987774529616870924e-17, 3.06161699786838301793e-17, 1.39033110312309984516e-17, 6.12323399573676603587e-17,
];
const AT = [
  3.33333333333329318027e-1, -1.99999999998764832476e-1, 1.42857142725034663711e-1, -1.1111110405462355788e-1,
  9.09088713343650656196e-2, -7.69187620504482999495e-2, 6.66107313738753120669e-2, -5.83357013379057348645e-2,
  4.97687799461593236017e-2, -3.6531572744216915527e-2, 1.62858201153657823623e-2,
];

export function atan(x: number): number {
  if (x !== x) return x;
  const ax = Math.abs(x);
  if (ax >= 7.378697629483821e19) return x > 0 ? ATAN_HI[3] + ATAN_LO[3] : -ATAN_HI[3] - ATAN_LO[3]; // 2^66
  let id = -1;
  let t = ax;
  if (ax < 0.4375) {
    if (ax < 3.725290298461914e-9) return x; // 2^-28
  } else if (ax < 0.6875) {
    id = 0;
    t = (2 * ax - 1) / (2 + ax);
  } else if (ax < 1.1875) {
    id = 1;
    t = (ax - 1) / (ax + 1);
  } else if (ax < 2.4375) {
    id = 2;
    t = (ax - 1.5) / (1 + 1.5 * ax);
  } else {
    id = 3;
    t = -1 / ax;
  }
  const z = t * t;
  const w = z * z;
  const s1 = z * (AT[0] + w * (AT[2] + w * (AT[4] + w * (AT[6] + w * (AT[8] + w * AT[10])))));
  const s2 = w * (AT[1] + w * (AT[3] + w * (AT[5] + w * (AT[7] + w * AT[9]))));
  if (id < 0) return x - x * (s1 + s2);
  const r = ATAN_HI[id] - (t * (s1 + s2) - ATAN_LO[id] - t);
  return x < 0 ? -r : r;
}

const PI = 3.141592653589793116;
const PI_LO = 1.2246467991473531772e-16; // pi - PI
const PIO2 = 1.570796326794896558;
const PIO4 = 7.85398163397448278999e-1;

/** The angle of (x, y), signs and zeros as ECMAScript's Math.atan2 (and C99's atan2). */
export function atan2(y: number, x: number): number {
  if (x !== x || y !== y) return NaN;
  const yNeg = y < 0 || Object.is(y, -0);
  const xNeg = x < 0 || Object.is(x, -0);
  const sign = (v: number) => (yNeg ? -v : v);
  if (y === 0) return xNeg ? sign(PI) : y;
  if (x === 0) return sign(PIO2);
  if (x === Infinity) return y === Infinity || y === -Infinity ? sign(PIO4) : sign(0);
  if (x === -Infinity) return y === Infinity || y === -Infinity ? sign(3 * PIO4) : sign(PI);
  if (y === Infinity || y === -Infinity) return sign(PIO2);
  const k = ((highWord(y) >> 20) & 0x7ff) - ((highWord(x) >> 20) & 0x7ff);
  if (k > 60) return sign(PIO2 + 0.5 * PI_LO); // |y/x| > 2^60: pi/2 whatever x's sign
  let z: number;
  if (xNeg && k < -60)
    z = 0; // |y/x| < 2^-60 and x < 0
  else z = atan(Math.abs(y / x));
  if (!xNeg) return sign(z);
  return sign(PI - (z - PI_LO));
}

const PIO2_HI = 1.570796326794896558;
const PIO2_LO = 6.12323399573676603587e-17;
const PIO4_HI = 7.85398163397448278999e-1;
const PS0 = 1.66666666666666657415e-1;
const PS1 = -3.25565818622400915405e-1;
const PS2 = 2.01212532134862925881e-1;
const PS3 = -4.00555345006794114027e-2;
const PS4 = 7.91534994289814532176e-4;
const PS5 = 3.4793310759602116757e-5;
const QS1 = -2.40339491173441421878;
const QS2 = 2.02094576023350569471;
const QS3 = -6.8828397160545329303e-1;
const QS4 = 7.70381505559019352791e-2;

/** R(t) = (asin(sqrt t) - sqrt t) / sqrt t ~ t P(t)/Q(t). */
function asinRatio(t: number): number {
  const p = t * (PS0 + t * (PS1 + t * (PS2 + t * (PS3 + t * (PS4 + t * PS5)))));
  const q = 1 + t * (QS1 + t * (QS2 + t * (QS3 + t * QS4)));
  return p / q;
}

export function asin(x: number): number {
  const ax = Math.abs(x);
  if (!(ax <= 1)) return NaN;
  if (ax === 1) return x * PIO2_HI + x * PIO2_LO;
  if (ax < 0.5) {
    if (ax < 1.4901161193847656e-8) return x; // 2^-26
    return x + x * asinRatio(x * x);
  }
  // asin x = pi/2 - 2 asin(sqrt((1 - x)/2))
  const t = (1 - ax) * 0.5;
  const s = Math.sqrt(t);
  const r = asinRatio(t);
  let v: number;
  if (ax >= 0.975) {
    v = PIO2_HI - (2 * (s + s * r) - PIO2_LO);
  } else {
    const w = clearLowWord(s);
    const c = (t - w * w) / (s + w);
    const p = 2 * s * r - (PIO2_LO - 2 * c);
    const q = PIO4_HI - 2 * w;
    v = PIO4_HI - (p - q);
  }
  return x < 0 ? -v : v;
}

export function acos(x: number): number {
  const ax = Math.abs(x);
  if (!(ax <= 1)) return NaN;
  if (ax === 1) return x > 0 ? 0 : PI + 2 * PIO2_LO;
  if (ax < 0.5) {
    if (ax <= 6.938893903907228e-18) return PIO2_HI + PIO2_LO; // 2^-57
    return PIO2_HI - (x - (PIO2_LO - x * asinRatio(x * x)));
  }
  if (x < 0) {
    const z = (1 + x) * 0.5;
    const s = Math.sqrt(z);
    const w = asinRatio(z) * s - PIO2_LO;
    return PI - 2 * (s + w);
  }
  const z = (1 - x) * 0.5;
  const s = Math.sqrt(z);
  const df = clearLowWord(s);
  const c = (z - df * df) / (s + df);
  const w = asinRatio(z) * s + c;
  return 2 * (df + w);
}
