// The working precision of a run's state and step: 'float64' (the default) or 'float32'. A float32
// run keeps u, v, h and the multistep history in Float32Array and rounds every operation of the
// step to float32, the same on every path (TypeScript with Math.fround after each operation,
// WebAssembly in f32x4 lanes). Its constants are the double ones rounded once to float32. What
// stays double is listed in docs/physics.md ("Precision"): the wind stress and the coefficients as
// they are computed, the clock, every diagnostic and sum (the volume and energy in compensated
// float64 sums), the sponge volume of the budget, and the output.

export type Precision = 'float64' | 'float32';

/** A field of the state: double, or float32 for a run in that precision. */
export type FieldArray = Float64Array | Float32Array;

export const PRECISIONS: readonly Precision[] = ['float64', 'float32'];

/** A zeroed field array of a precision. */
export function fieldOf(precision: Precision, length: number): FieldArray {
  return precision === 'float32' ? new Float32Array(length) : new Float64Array(length);
}

/** Bytes of one value. */
export function bytesOf(precision: Precision): 4 | 8 {
  return precision === 'float32' ? 4 : 8;
}

/** A number as the precision holds it (float32: rounded to nearest). */
export function roundTo(precision: Precision): (x: number) => number {
  return precision === 'float32' ? Math.fround : (x: number) => x;
}

/** A table of numbers as the precision holds them, kept in a Float64Array (float32 values are exact in double). */
export function roundTable(precision: Precision, a: Float64Array): Float64Array {
  return precision === 'float32' ? a.map(Math.fround) : a;
}

/** A field read as double, for code that only steps double states (the plain reference steps). */
export function doubleField(a: FieldArray, what: string): Float64Array {
  if (!(a instanceof Float64Array))
    throw new TypeError(`${what} must be a double field (the plain step is written for float64 runs)`);
  return a;
}
