// Bit access to doubles and exact helpers shared by the portable functions.
// One Float64Array/Uint32Array pair views the same 8 bytes. Which 32-bit half holds the sign and
// exponent depends on the host's byte order: we check it once, here, instead of assuming it.

const f64 = new Float64Array(1);
const u32 = new Uint32Array(f64.buffer);
f64[0] = 1; // 0x3FF00000 00000000
const LITTLE = u32[1] === 0x3ff00000 && u32[0] === 0;
if (!LITTLE && !(u32[0] === 0x3ff00000 && u32[1] === 0)) {
  throw new Error('portable math: this host stores doubles in an unknown byte layout');
}
const HI = LITTLE ? 1 : 0;
const LO = LITTLE ? 0 : 1;

/** The host's byte order, as found above (little on all our hosts so far). */
export const littleEndian = LITTLE;

/** Sign, exponent and top 20 mantissa bits, as a signed 32-bit integer (as fdlibm's GET_HIGH_WORD). */
export function highWord(x: number): number {
  f64[0] = x;
  return u32[HI] | 0;
}

/** The low 32 mantissa bits, unsigned. */
export function lowWord(x: number): number {
  f64[0] = x;
  return u32[LO];
}

/** x with its low 32 mantissa bits cleared: a short head whose products stay exact. */
export function clearLowWord(x: number): number {
  f64[0] = x;
  u32[LO] = 0;
  return f64[0];
}

/** 2^k for k in [-1074, 1023], filled by exact doubling from the smallest subnormal. */
const POW2 = new Float64Array(1074 + 1024);
POW2[0] = Number.MIN_VALUE;
for (let i = 1; i < POW2.length; i++) POW2[i] = POW2[i - 1] * 2;

/** 2^k for k in [-1074, 1023]. */
export function pow2(k: number): number {
  return POW2[k + 1074];
}

/** y * 2^k with one rounding (the multiplication by the power of two) wherever that is possible. */
export function scalePow2(y: number, k: number): number {
  if (k > 1023) return y * POW2[1023 + 1074] * POW2[k - 1023 + 1074];
  while (k < -1074) {
    y *= 0.5; // exact while y is normal, which it is for the callers' y near 1
    k++;
  }
  return y * POW2[k + 1074];
}

// Error-free transformations (Dekker 1971, Knuth TAOCP vol. 2 4.2.2): results in module variables
// so that hot paths allocate nothing. Veltkamp's split because JavaScript has no fused multiply-add.
const SPLIT = 134217729; // 2^27 + 1

/** low[0]: the low part of the last twoProd / twoSum. A typed array, not an exported let: a live
 * binding compiles to a getter call under some loaders (tsx), which made pow 5 times slower. */
export const low = new Float64Array(1);

/** a * b = result + low[0] exactly (no overflow for |a|, |b| < 2^995). */
export function twoProd(a: number, b: number): number {
  const p = a * b;
  let t = SPLIT * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLIT * b;
  const bh = t - (t - b);
  const bl = b - bh;
  low[0] = al * bl - (p - ah * bh - al * bh - ah * bl);
  return p;
}

/** a + b = result + low[0] exactly (Knuth's two-sum, any order of magnitudes). */
export function twoSum(a: number, b: number): number {
  const s = a + b;
  const bb = s - a;
  low[0] = a - (s - bb) + (b - bb);
  return s;
}
