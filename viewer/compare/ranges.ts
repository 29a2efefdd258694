// Colour ranges for a comparison: A and B share one range (so equal colours mean equal values),
// the difference gets its own, symmetric about zero (white: no difference).

import { finiteExtent, niceCeil, type Range } from '../state/colour-range.ts';

/** Symmetric range over both fields (the fields compared are signed: diverging colours). */
export function sharedRange(a: ArrayLike<number>, b: ArrayLike<number>): Range {
  const m = Math.max(maxAbs(a), maxAbs(b));
  const s = niceCeil(m) || 1;
  return { min: -s, max: s };
}

/** Symmetric range of a difference; a difference of exactly zero everywhere shows white on ±1. */
export function differenceRange(d: ArrayLike<number>): Range {
  const s = niceCeil(maxAbs(d)) || 1;
  return { min: -s, max: s };
}

export function maxAbs(v: ArrayLike<number>): number {
  const e = finiteExtent(v);
  return e ? Math.max(Math.abs(e.min), Math.abs(e.max)) : 0;
}
