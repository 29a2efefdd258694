// Colour-bar ranges: fixed by the user, or automatic from the data. Diverging maps stay centred on
// zero (so white always means "no anomaly"); sequential maps span the data.

import type { ColourKind } from './display-fields.ts';

export interface Range {
  min: number;
  max: number;
}

/** Smallest and largest finite value, or null when there is none. */
export function finiteExtent(values: ArrayLike<number>): Range | null {
  let min = Infinity;
  let max = -Infinity;
  for (let k = 0; k < values.length; k++) {
    const v = values[k];
    if (v < min) min = v;
    if (v > max) max = v;
  }
  // NaN fails both comparisons above, so land never enters the extent.
  return min <= max ? { min, max } : null;
}

/** Round up to 1, 2 or 5 times a power of ten, so the colour bar reads in plain numbers. */
export function niceCeil(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  const p = 10 ** Math.floor(Math.log10(x));
  const m = x / p;
  const step = m <= 1 + 1e-9 ? 1 : m <= 2 + 1e-9 ? 2 : m <= 5 + 1e-9 ? 5 : 10;
  return step * p;
}

/** The automatic range of a field for a colour map kind. */
export function autoRange(values: ArrayLike<number>, kind: ColourKind): Range {
  const e = finiteExtent(values);
  if (!e) return kind === 'diverging' ? { min: -1, max: 1 } : { min: 0, max: 1 };
  if (kind === 'diverging') {
    const a = niceCeil(Math.max(Math.abs(e.min), Math.abs(e.max)));
    // A field at rest is all zeros: show a span of one unit, so the map stays white and the
    // colour bar reads in plain numbers until something moves.
    const s = a > 0 ? a : 1;
    return { min: -s, max: s };
  }
  if (e.max - e.min <= 0) return { min: e.min, max: e.min + Math.max(1e-6, Math.abs(e.min) * 1e-3) };
  return { min: e.min, max: e.max };
}

/**
 * Keep an automatic range steady while a run goes on: widen at once when the data outgrow it,
 * but shrink only when the data fall below a quarter of it (so the map does not flicker).
 */
export function steadyRange(previous: Range | null, next: Range, kind: ColourKind): Range {
  if (!previous) return next;
  if (kind === 'diverging') {
    const p = previous.max;
    const n = next.max;
    if (n > p || n < p / 4) return next;
    return previous;
  }
  const span = previous.max - previous.min;
  if (next.min < previous.min || next.max > previous.max) {
    return { min: Math.min(next.min, previous.min), max: Math.max(next.max, previous.max) };
  }
  return next.max - next.min < span / 4 ? next : previous;
}

/** Check a user's fixed range; returns a message or null. */
export function checkFixedRange(min: number, max: number): string | null {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return 'give two numbers';
  if (!(max > min)) return 'the upper end must be above the lower end';
  return null;
}

/** Position 0..1 of a value in a range, clamped. */
export function rangePosition(v: number, r: Range): number {
  const t = (v - r.min) / (r.max - r.min);
  return t < 0 ? 0 : Math.min(t, 1);
}
