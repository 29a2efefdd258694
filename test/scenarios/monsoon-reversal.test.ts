// configs/monsoon-reversal.json: seasonally reversing winds over a small basin closed to the north.
// Phenomenon: an eastward equatorial surface jet in both monsoon transitions (Wyrtki 1973, Science
// 181, 262; check-values §4), westward flow when the zonal wind turns easterly.

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import { boxMean, build, runDaily } from '../support/shipped-scenarios.ts';

/** Contiguous runs of days [first, last] where pred holds, within [from, to]. */
function spells(values: number[], pred: (v: number) => boolean, from: number, to: number): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  let start = -1;
  for (let d = from; d <= to; d++) {
    const on = pred(values[d]);
    if (on && start < 0) start = d;
    if ((!on || d === to) && start >= 0) {
      out.push([start, on ? d : d - 1]);
      start = -1;
    }
  }
  return out;
}

describe('monsoon reversal scenario', () => {
  it('eastward equatorial surface jets in both westerly (transition) seasons, westward flow in the easterly ones, of order 0.5-1 m/s', () => {
    const { model: m, r } = build('monsoon-reversal.json');
    // Closed to the north: the northern rows are land, so no wave leaves that way.
    const top = m.grid.ny - 1;
    for (let i = 0; i < m.grid.nx; i++) expect(m.grid.ocean[m.grid.idx(i, top)]).toBe(0);

    const lonBand: [number, number] = [10, 50];
    const eqBand: [number, number] = [-0.3, 0.3];
    const taux: number[] = [];
    const uEq: number[] = [];
    const uOff: number[] = [];
    runDaily(m, r.days, () => {
      taux.push(boxMean(m.field('taux'), m, lonBand, eqBand));
      const us = m.field('u_surf');
      uEq.push(boxMean(us, m, lonBand, eqBand));
      // 8 degrees off the equator, both sides: outside the equatorial waveguide (L = 3.1 degrees).
      uOff.push(0.5 * (boxMean(us, m, lonBand, [7.7, 8.3]) + boxMean(us, m, lonBand, [-8.3, -7.7])));
    });
    // Second year only, after the start-up from rest. Seasons from the model's own wind.
    const westerly = spells(taux, (t) => t > 0, 366, r.days).filter(([a, b]) => b - a > 30);
    const easterly = spells(taux, (t) => t < 0, 366, r.days).filter(([a, b]) => b - a > 30);
    // The semiannual equatorial wind gives two westerly seasons in the year.
    expect(westerly.length).toBe(2);
    expect(easterly.length).toBeGreaterThanOrEqual(1);
    for (const [a, b] of westerly) {
      const seg = uEq.slice(a, b + 1);
      const jet = Math.max(...seg);
      const at = a + seg.indexOf(jet);
      record(`monsoon reversal: eastward equatorial jet, days ${a}-${b}`, jet, NaN, 'm/s', {
        source: 'Wyrtki jets 0.7-0.8 m/s observed (Wyrtki 1973), order of magnitude',
        tolerance: '> 0.25 m/s',
      });
      // Order-of-magnitude check against the observed 0.5-1 m/s (Wyrtki 1973; 0.7-0.8 m/s in altimetry, check-values §4).
      expect(jet, `jet in days ${a}-${b}`).toBeGreaterThan(0.25);
      expect(jet).toBeLessThan(2);
      // A jet: trapped at the equator, much stronger there than 8 degrees away.
      expect(jet).toBeGreaterThan(3 * Math.abs(uOff[at]));
    }
    for (const [a, b] of easterly) {
      const back = Math.min(...uEq.slice(a, b + 1));
      record(`monsoon reversal: westward flow, days ${a}-${b} (no reference value)`, back, NaN, 'm/s');
      expect(back, `reversal in days ${a}-${b}`).toBeLessThan(-0.25);
    }
  });
});
