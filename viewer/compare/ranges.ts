// Colour ranges for a comparison: A and B share one range (so equal colours mean equal values),
// the difference gets its own, symmetric about zero (the pale middle: no difference). Both follow
// the rule every view keeps (model/display/conventions.ts): the 99.5th percentile of |value|,
// rounded up to a round number.

import { symmetricRange } from '../../model/display/conventions.ts';
import { finiteExtent, type Range } from '../state/colour-range.ts';

/** Symmetric range over both fields (the fields compared are signed: the anomaly colours). */
export function sharedRange(a: ArrayLike<number>, b: ArrayLike<number>): Range {
  const s = symmetricRange([a, b]);
  return { min: -s, max: s };
}

/** Symmetric range of a difference; a difference of exactly zero everywhere shows pale on ±1. */
export function differenceRange(d: ArrayLike<number>): Range {
  const s = symmetricRange([d]);
  return { min: -s, max: s };
}

export function maxAbs(v: ArrayLike<number>): number {
  const e = finiteExtent(v);
  return e ? Math.max(Math.abs(e.min), Math.abs(e.max)) : 0;
}
