// configs/kelvin-pulse.json: a free equatorial Kelvin wave crosses a wide basin at c = sqrt(g'H)
// (Matsuno 1966, J. Meteor. Soc. Japan 44; Gill 1982, Atmosphere-Ocean Dynamics, ch. 11).

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import { at, build, DAY, metresPerDegree, peakIndex, runDaily } from '../support/shipped-scenarios.ts';

describe('Kelvin pulse scenario', () => {
  it("the packet peak reaches mid-basin and the east coast at distance / sqrt(g'H), within 5 %", () => {
    const { model: m, r } = build('kelvin-pulse.json', { overrides: ['time.days=80'] });
    const init = r.initial;
    if (init.kind !== 'kelvin') throw new Error('kelvin-pulse.json should start from a Kelvin wave');
    const c = Math.sqrt(r.model.physics.reducedGravity * r.model.physics.layerThickness);
    const probes = { mid: r.probes.find((p) => p.name === 'mid')!, east: r.probes.find((p) => p.name === 'east')! };
    const series = { mid: [] as number[], east: [] as number[] };
    runDaily(m, r.days, () => {
      series.mid.push(at(m, 'h_anom', probes.mid.lon, 0));
      series.east.push(at(m, 'h_anom', probes.east.lon, 0));
    });
    for (const name of ['mid', 'east'] as const) {
      // Arrival = time of the largest h' at the probe (a nondispersive packet keeps its peak).
      const cell = m.grid.cellAt(probes[name].lon, 0)!;
      const distance = (m.grid.lonCentre[cell.i] - init.lon) * metresPerDegree(m);
      const predicted = distance / c / DAY;
      const measured = peakIndex(series[name]);
      record(`Kelvin pulse scenario: arrival at ${name} (days)`, measured, predicted, 'd', {
        source: "Kelvin wave at c = sqrt(g' H) (Matsuno 1966)",
        tolerance: '5 %',
      });
      expect(
        Math.abs(measured / predicted - 1),
        `${name}: measured ${measured.toFixed(2)} d, predicted ${predicted.toFixed(2)} d`,
      ).toBeLessThan(0.05);
      // A downwelling packet arrives as a downwelling peak of the right size (10 m released).
      expect(Math.max(...series[name])).toBeGreaterThan(0.8 * init.amplitude);
    }
  });
});
