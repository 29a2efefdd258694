// Bit-for-bit comparison of fields: the paths of a step must agree in every bit (signed zeros and
// NaN payloads included), not only to a tolerance. Fields of different precisions never agree.

export function sameBits(a: Float64Array | Float32Array, b: Float64Array | Float32Array): boolean {
  if (a.length !== b.length || a.BYTES_PER_ELEMENT !== b.BYTES_PER_ELEMENT) return false;
  if (a instanceof Float64Array) {
    const x = new BigUint64Array(a.buffer, a.byteOffset, a.length);
    const y = new BigUint64Array(b.buffer, b.byteOffset, b.length);
    for (let k = 0; k < x.length; k++) if (x[k] !== y[k]) return false;
    return true;
  }
  const x = new Uint32Array(a.buffer, a.byteOffset, a.length);
  const y = new Uint32Array(b.buffer, b.byteOffset, b.length);
  for (let k = 0; k < x.length; k++) if (x[k] !== y[k]) return false;
  return true;
}
