// The shared ways of writing places and numbers (model/display/): one coordinate formatter for the
// page, the comparison and the report; colour-bar ticks that are round, of one precision per bar
// and never overlap; the theory-line and Hovmoller-range conventions.

import { describe, expect, it } from 'vitest';
import { latLabel, lonLabel, placeLabel } from '../../model/display/coordinates.ts';
import { exponentText, fittingTicks, labelBoxes, niceStep, ticksFor, type Range } from '../../model/display/ticks.ts';
import { roundUp, symmetricRange, THEORY_LINES } from '../../model/display/conventions.ts';

describe('places are written one way', () => {
  it('latitudes N and S, the equator plain, at most two decimals', () => {
    expect([
      latLabel(4.25),
      latLabel(-4.25),
      latLabel(0),
      latLabel(-24.5),
      latLabel(0.25),
      latLabel(7.2500001),
      latLabel(-0.001),
    ]).toEqual(['4.25°N', '4.25°S', '0°', '24.5°S', '0.25°N', '7.25°N', '0°']);
  });
  it('longitudes E and W, folded into (-180, 180]', () => {
    expect([lonLabel(59.25), lonLabel(200), lonLabel(-30), lonLabel(0), lonLabel(180), lonLabel(360)]).toEqual([
      '59.25°E',
      '160°W',
      '30°W',
      '0°',
      '180°',
      '0°',
    ]);
  });
  it('a place is longitude, latitude', () => {
    expect(placeLabel(59.25, 7.25)).toBe('59.25°E, 7.25°N');
    expect(placeLabel(139.5, -2)).toBe('139.5°E, 2°S');
  });
});

/** A label width like an 11 px sans-serif font: 6.2 px a character. */
const measure = (s: string) => 6.2 * s.length;

describe('colour-bar ticks', () => {
  const ranges: Range[] = [
    { min: -10, max: 10 },
    { min: 0, max: 8 },
    { min: -8, max: 10 },
    { min: 150, max: 163.2 },
    { min: -0.003, max: 0.003 },
    { min: 0, max: 0.1234 },
    { min: -2.5e-7, max: 2.5e-7 },
    { min: 1e5, max: 7.3e5 },
    { min: -0.5, max: 0.5 },
    { min: 99.7, max: 100.1 },
  ];
  for (const r of ranges) {
    it(`${r.min} to ${r.max}: round steps, one precision, inside the range, no overlap at 400 or 120 px`, () => {
      for (const width of [400, 200, 120]) {
        const t = fittingTicks(r, width, measure);
        expect(t.values.length).toBeGreaterThanOrEqual(1);
        for (const v of t.values) {
          expect(v).toBeGreaterThanOrEqual(r.min - 1e-12);
          expect(v).toBeLessThanOrEqual(r.max + 1e-12);
        }
        // One precision per bar: every label has the same number of decimals.
        const decimals = t.labels.map((l) => (l.split('.')[1] ?? '').length);
        expect(new Set(decimals).size).toBe(1);
        // Labels say what they are: distinct, and the values they stand for.
        expect(new Set(t.labels).size).toBe(t.labels.length);
        t.values.forEach((v, k) =>
          expect(Number(t.labels[k].replace('\u2212', '-')) * 10 ** t.exponent).toBeCloseTo(v, 9),
        );
        // Steps are 1, 2, 2.5 or 5 times a power of ten.
        if (t.values.length > 1) {
          const step = t.values[1] - t.values[0];
          const m = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
          expect([1, 2, 2.5, 5].some((x) => Math.abs(m - x) < 1e-6)).toBe(true);
        }
        const boxes = labelBoxes(t, r, width, measure);
        for (let k = 1; k < boxes.length; k++) expect(boxes[k][0] - boxes[k - 1][1]).toBeGreaterThanOrEqual(8);
        for (const [a, b] of boxes) {
          expect(a).toBeGreaterThanOrEqual(0);
          expect(b).toBeLessThanOrEqual(width + 1e-9);
        }
      }
    });
  }
  it('the labels of the ranges that used to mix precision', () => {
    expect(ticksFor({ min: -10, max: 10 }, 5).labels).toEqual(['\u221210', '\u22125', '0', '5', '10']);
    expect(ticksFor({ min: 0, max: 8 }, 4).labels).toEqual(['0', '2', '4', '6', '8']);
    expect(ticksFor({ min: -0.003, max: 0.003 }, 6).labels).toEqual([
      '\u22120.003',
      '\u22120.002',
      '\u22120.001',
      '0.000',
      '0.001',
      '0.002',
      '0.003',
    ]);
    expect(niceStep(1, 4)).toEqual({ step: 0.25, decimals: 2 });
  });
  it('very small and very large numbers get one power of ten beside the units', () => {
    const t = ticksFor({ min: -2.5e-7, max: 2.5e-7 }, 5);
    expect(t.exponent).toBe(-7);
    expect(exponentText(t.exponent)).toBe('\u00d710\u207b\u2077');
    expect(t.labels).toEqual(['\u22122', '\u22121', '0', '1', '2']);
    expect(ticksFor({ min: 1e5, max: 7.3e5 }, 6).exponent).toBe(5);
  });
});

describe('conventions shared by every view', () => {
  it('Kelvin solid, long Rossby dashed', () => {
    expect(THEORY_LINES.kelvin.dash).toEqual([]);
    expect(THEORY_LINES.rossby.dash.length).toBeGreaterThan(0);
  });
  it('a Hovmoller range is the 99.5th percentile of |value| rounded up, so one spike does not set it', () => {
    expect([roundUp(17), roundUp(21), roundUp(2.2), roundUp(0.04), roundUp(1000)]).toEqual([20, 25, 2.5, 0.05, 1000]);
    const values = Float32Array.from({ length: 1000 }, (_, k) => ((k % 7) - 3) * 5);
    values[3] = 400;
    expect(symmetricRange([values, [NaN]])).toBe(20);
    expect(symmetricRange([[0, 0, NaN]])).toBe(1);
  });
});
