// Bit-for-bit comparison of Float64Arrays: the paths of a step must agree in every bit (signed
// zeros and NaN payloads included), not only to a tolerance.

export function sameBits(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  const x = new BigUint64Array(a.buffer, a.byteOffset, a.length);
  const y = new BigUint64Array(b.buffer, b.byteOffset, b.length);
  for (let k = 0; k < x.length; k++) if (x[k] !== y[k]) return false;
  return true;
}
