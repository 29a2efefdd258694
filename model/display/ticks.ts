// Tick values for colour bars and axes: round steps (1, 2, 2.5 or 5 times a power of ten), every
// label of one bar written with the same number of decimals, and as many ticks as fit without
// two labels touching. Very large or very small numbers are written as a multiple of a power of
// ten, said once beside the units ("×10⁻⁴"), so no label needs an exponent of its own.

import * as pm from '../portable-math.ts';

export interface Range {
  min: number;
  max: number;
}

export interface TickSet {
  values: number[];
  labels: string[];
  /** Labels are the values divided by 10^exponent (0: plain). */
  exponent: number;
  /** Decimals every label is written with. */
  decimals: number;
}

const MANTISSAS = [1, 2, 2.5, 5, 10];

/** floor(log10(x)) for x > 0, exact at powers of ten (a logarithm may land a hair below). */
export function decade(x: number): number {
  let p = Math.floor(pm.log10(x));
  while (pm.pow(10, p) > x) p--;
  while (pm.pow(10, p + 1) <= x) p++;
  return p;
}

/** The round step that gives about `count` intervals over `span`, and the decimals it needs. */
export function niceStep(span: number, count: number): { step: number; decimals: number } {
  const raw = span / Math.max(1, count);
  const p = decade(raw);
  const base = pm.pow(10, p);
  let m = MANTISSAS.find((k) => k * base >= raw * (1 - 1e-9)) ?? 10;
  const step = m * base;
  // 2.5 x 10^p needs one decimal more than 10^p.
  if (m === 10) m = 1;
  const decimals = Math.max(0, -p + (m === 2.5 ? 1 : 0) - (m === 10 ? 1 : 0));
  return { step, decimals };
}

/** Multiples of `step` inside the range, with exact zeros. */
export function stepValues(r: Range, step: number): number[] {
  const out: number[] = [];
  const first = Math.ceil(r.min / step - 1e-9);
  const last = Math.floor(r.max / step + 1e-9);
  for (let k = first; k <= last; k++) out.push(k === 0 ? 0 : Number((k * step).toPrecision(12)));
  return out;
}

/** The power of ten labels are scaled by: 0 for numbers a person reads plainly (1e-3 to 1e5). */
export function labelExponent(r: Range, step: number): number {
  const big = Math.max(Math.abs(r.min), Math.abs(r.max));
  if (!(big > 0)) return 0;
  const e = decade(big);
  if (e >= 5 || decade(step) < -3) return e;
  return 0;
}

/** One label: the value over 10^exponent with a fixed number of decimals; minus as U+2212. */
export function tickLabel(v: number, exponent: number, decimals: number): string {
  const s = (v / pm.pow(10, exponent)).toFixed(Math.max(0, decimals));
  const t = /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
  return t.replace(/^-/, '\u2212');
}

/** "×10⁻⁴" for the units beside a scaled bar, '' for a plain one. */
export function exponentText(exponent: number): string {
  if (exponent === 0) return '';
  const sup: Record<string, string> = {
    '-': '\u207b',
    '0': '\u2070',
    '1': '\u00b9',
    '2': '\u00b2',
    '3': '\u00b3',
    '4': '\u2074',
    '5': '\u2075',
    '6': '\u2076',
    '7': '\u2077',
    '8': '\u2078',
    '9': '\u2079',
  };
  return `\u00d710${String(exponent)
    .split('')
    .map((c) => sup[c])
    .join('')}`;
}

/** Ticks of a given count's step, labelled. */
export function ticksFor(r: Range, count: number): TickSet {
  const span = r.max - r.min;
  if (!(span > 0) || !Number.isFinite(span))
    return { values: [r.min], labels: [tickLabel(r.min, 0, 2)], exponent: 0, decimals: 2 };
  const { step, decimals } = niceStep(span, count);
  const exponent = labelExponent(r, step);
  const values = stepValues(r, step);
  const d = Math.max(0, decimals + exponent);
  return { values, labels: values.map((v) => tickLabel(v, exponent, d)), exponent, decimals: d };
}

/**
 * The most ticks (up to `most`) whose labels fit along `length` pixels without touching:
 * `measure` gives a label's width in pixels, `gap` the least space between two labels. Labels
 * are centred on their ticks and kept inside the bar. At least the two ends' ticks, or one.
 */
export function fittingTicks(
  r: Range,
  length: number,
  measure: (label: string) => number,
  options: { most?: number; gap?: number } = {},
): TickSet {
  const most = options.most ?? 8;
  const gap = options.gap ?? 8;
  for (let count = most; count >= 1; count--) {
    const t = ticksFor(r, count);
    if (t.values.length <= 1 || fits(t, r, length, measure, gap)) return t;
  }
  return ticksFor(r, 1);
}

/** Left and right edge (pixels) of each label as the bar draws it. */
export function labelBoxes(
  t: TickSet,
  r: Range,
  length: number,
  measure: (label: string) => number,
): Array<[number, number]> {
  const span = r.max - r.min;
  return t.values.map((v, k) => {
    const w = measure(t.labels[k]);
    const x = span > 0 ? ((v - r.min) / span) * length : 0;
    const left = Math.min(Math.max(x - w / 2, 0), Math.max(0, length - w));
    return [left, left + w];
  });
}

function fits(t: TickSet, r: Range, length: number, measure: (label: string) => number, gap: number): boolean {
  const boxes = labelBoxes(t, r, length, measure);
  for (let k = 1; k < boxes.length; k++) if (boxes[k][0] - boxes[k - 1][1] < gap) return false;
  return true;
}
