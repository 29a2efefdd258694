// configs/westerly-burst.json (the viewer's default): a two-week westerly patch sends a downwelling
// Kelvin wave east at c = sqrt(g'H) (Matsuno 1966; Gill 1982, ch. 11).
//
// Arrival criterion: the time of the largest h' at the equatorial probe. Along a Kelvin
// characteristic the wave amplitude q obeys q_t + c q_x = F(x) T(t) (Gill 1982, §11), so at a
// point east of the patch q(t) = integral of F(x) T(t - (x_p - x)/c) dx: the pulse shape T
// delayed by the travel time from each part of the patch. For a symmetric patch and a symmetric
// pulse the maximum comes when the pulse centre, delayed from the patch centre, arrives:
// t_max = t_pulse_centre + (x_p - x_patch)/c. That is the prediction tested (within 10 %).

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import { at, build, DAY, metresPerDegree, peakIndex, runDaily } from '../support/shipped-scenarios.ts';

describe('westerly burst scenario', () => {
  it('the downwelling Kelvin wave peaks at the east coast and mid-basin at the predicted time (within 10 %)', () => {
    const { model: m, r } = build('westerly-burst.json', { overrides: ['time.days=110'] });
    const part = r.wind.parts[0];
    if (
      part.kind !== 'fixed' ||
      part.source.kind !== 'shaped' ||
      part.source.shape.kind !== 'patch' ||
      part.envelope.kind !== 'pulse'
    ) {
      throw new Error('westerly-burst.json should hold one patch under a pulse');
    }
    const patch = part.source.shape;
    const pulse = part.envelope;
    expect(patch.lat).toBe(0);
    expect(part.source.x).toBeGreaterThan(0);
    const c = Math.sqrt(r.model.physics.reducedGravity * r.model.physics.layerThickness);
    const names = ['mid', 'east'] as const;
    const probes = names.map((n) => r.probes.find((p) => p.name === n)!);
    const series = names.map(() => [] as number[]);
    let westOffEquator = 0;
    runDaily(m, r.days, (d) => {
      probes.forEach((p, k) => series[k].push(at(m, 'h_anom', p.lon, 0)));
      // Upwelling Rossby waves west of the patch, off the equator (h' < 0) about 3 weeks in.
      if (d === 40) westOffEquator = at(m, 'h_anom', patch.lon - 10, 4);
    });
    const tCentre = pulse.start + pulse.duration / 2;
    names.forEach((n, k) => {
      const cell = m.grid.cellAt(probes[k].lon, 0)!;
      const predicted = tCentre + ((m.grid.lonCentre[cell.i] - patch.lon) * metresPerDegree(m)) / c / DAY;
      const measured = peakIndex(series[k]);
      record(`westerly burst scenario: Kelvin peak at ${n} (days)`, measured, predicted, 'd', {
        source: "Kelvin wave at c = sqrt(g' H) (Matsuno 1966)",
        tolerance: '10 %',
      });
      expect(
        Math.abs(measured / predicted - 1),
        `${n}: measured ${measured.toFixed(2)} d, predicted ${predicted.toFixed(2)} d`,
      ).toBeLessThan(0.1);
      // Downwelling: the peak is a deepening of the thermocline, and the largest signal of either sign.
      const max = Math.max(...series[k]);
      expect(max).toBeGreaterThan(1);
      expect(max).toBeGreaterThan(2 * Math.max(...series[k].map((x) => -x)));
    });
    expect(westOffEquator).toBeLessThan(-0.5);
  });
});
