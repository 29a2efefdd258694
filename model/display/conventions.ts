// Conventions every view keeps (the page, a saved run, the comparison and the report), so a
// picture reads the same wherever it is drawn:
// - theory lines on a Hovmoller diagram: the Kelvin wave (east at c) solid, the long Rossby wave
//   (west at c/3) dashed, both black, 1.5 px;
// - the colour range of a Hovmoller diagram (and of any signed map of a saved run): symmetric
//   about zero, at the 99.5th percentile of |value| over what the diagram shows, rounded up to a
//   round number (1, 2, 2.5 or 5 times a power of ten), so one extreme cell does not wash the
//   picture out and the colour bar reads in plain numbers.

import * as pm from '../portable-math.ts';
import { decade } from './ticks.ts';

export interface LineStyle {
  label: string;
  /** Dash pattern in pixels (canvas setLineDash, SVG stroke-dasharray); empty: solid. */
  dash: number[];
  width: number;
  colour: string;
}

export const THEORY_LINES: Record<'kelvin' | 'rossby', LineStyle> = {
  kelvin: { label: 'Kelvin wave, east at c', dash: [], width: 1.5, colour: '#000' },
  rossby: { label: 'long Rossby wave, west at c/3', dash: [6, 4], width: 1.5, colour: '#000' },
};

/** "6 4", or "none" for a solid line, for SVG. */
export function svgDash(style: LineStyle): string {
  return style.dash.length ? style.dash.join(' ') : 'none';
}

/** Round up to 1, 2, 2.5 or 5 times a power of ten; 0 for 0 (and for anything not positive). */
export function roundUp(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  const p = pm.pow(10, decade(x));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= x * (1 - 1e-12)) return m * p;
  return 10 * p;
}

export const RANGE_PERCENTILE = 0.995;

/**
 * The symmetric colour range (its upper end) of signed values spread over one or more arrays:
 * roundUp of the 99.5th percentile of |value|, NaN left out; 1 when everything is zero.
 */
export function symmetricRange(arrays: ReadonlyArray<ArrayLike<number>>): number {
  let n = 0;
  for (const a of arrays) n += a.length;
  const abs = new Float64Array(n);
  let m = 0;
  for (const a of arrays) {
    for (let k = 0; k < a.length; k++) {
      const v = a[k];
      if (Number.isFinite(v)) abs[m++] = Math.abs(v);
    }
  }
  if (m === 0) return 1;
  const used = abs.subarray(0, m).sort();
  const q = used[Math.min(m - 1, Math.floor(RANGE_PERCENTILE * m))];
  return roundUp(q > 0 ? q : used[m - 1]) || 1;
}
