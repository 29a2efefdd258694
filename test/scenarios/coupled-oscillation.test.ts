// The shipped coupled scenario (configs/coupled-oscillation.json): a westerly burst triggers a
// coupled event, and the answering wind keeps the basin oscillating, weakly damped, with the
// equatorial warm-water volume leading the eastern SST (the recharge oscillator).
//
// Sources: the recharge oscillator, Jin (1997), J. Atmos. Sci. 54, 811-829: the zonal-mean
// thermocline depth (the warm-water volume) leads the eastern SST by about a quarter period (from
// memory; observed leads of about 7 months on a 3-5 year cycle, Meinen & McPhaden 2000, J. Climate
// 13, 3551, from memory). The period and growth rate are this demo's own: the scenario is built to
// be weakly damped, just below the critical coupling strength (test/physics/coupled-sweep.test.ts).

import { describe, expect, it } from 'vitest';
import { coupledMode } from '../../model/coupling/mode-fit.ts';
import { record } from '../support/physics-kit.ts';
import { build } from '../support/shipped-scenarios.ts';

describe('coupled-oscillation.json', () => {
  it('a burst-triggered event rings on as a weakly damped oscillation, warm water leading the eastern SST', () => {
    const { model, r } = build('coupled-oscillation.json');
    const days: number[] = [];
    const east: number[] = [];
    const warm: number[] = [];
    const every = r.outputEverySeconds;
    for (let t = 0; t <= r.runSeconds + 1e-6; t += every) {
      if (t > 0) model.advance(model.stepsUntil(t));
      const c = model.coupledIndices()!;
      days.push(model.day);
      east.push(c.eastSst);
      warm.push(c.warmWater);
    }
    const mode = coupledMode(days, east, warm);
    expect(mode).not.toBeNull();
    const { fit, warmWaterLead } = mode!;
    record('coupled-oscillation.json: period of the coupled mode (eastern SST)', fit.periodDays, NaN, 'days', {
      source: "this demo's own numbers (weakly damped by design)",
      tolerance: '1.5-4 years',
    });
    record('coupled-oscillation.json: growth rate of the coupled mode', fit.growthPerYear, NaN, 'per year', {
      source: "this demo's own numbers (weakly damped by design)",
      tolerance: '-0.3 to 0 per year',
    });
    record(
      'coupled-oscillation.json: lead of the warm-water volume over the eastern SST (share of a period)',
      warmWaterLead,
      0.25,
      '',
      { source: 'recharge oscillator, Jin 1997 (about a quarter period, from memory)', tolerance: '1/8 to 3/8' },
    );
    expect(fit.halfCycles).toBeGreaterThanOrEqual(4);
    expect(fit.periodDays).toBeGreaterThan(1.5 * 365.25);
    expect(fit.periodDays).toBeLessThan(4 * 365.25);
    expect(fit.growthPerYear).toBeLessThan(0);
    expect(fit.growthPerYear).toBeGreaterThan(-0.3);
    expect(warmWaterLead).toBeGreaterThan(1 / 8);
    expect(warmWaterLead).toBeLessThan(3 / 8);
    // The burst started it: a warm event in the east within the first half year.
    const firstPeak = Math.max(
      ...east.slice(
        0,
        days.findIndex((d) => d > 180),
      ),
    );
    expect(firstPeak).toBeGreaterThan(0.1);
  });
});
