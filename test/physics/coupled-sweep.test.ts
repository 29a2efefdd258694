// Coupling sweep: below a critical coupling strength the coupled mode decays, above it it grows
// (the coupled instability of the Bjerknes feedback: Philander, Yamagata & Pacanowski 1984, J.
// Atmos. Sci. 41, 604; Hirst 1986, J. Atmos. Sci. 43, 606; both from memory), and the growing
// mode is a recharge oscillation whose warm-water volume leads the eastern SST by about a quarter
// period (Jin 1997, J. Atmos. Sci. 54, 811, from memory).
//
// The shipped basin (configs/coupled-oscillation.json) without its burst, kicked by an SST anomaly
// of 1 mK so that every run stays linear (the tanh of the subsurface relation never saturates):
// the growth rate then belongs to the mode, not to its amplitude. The critical strength is where
// the growth rate, linear between the two runs that bracket zero, crosses it.

import { describe, expect, it } from 'vitest';
import { fitOscillation, phaseLead } from '../../model/coupling/mode-fit.ts';
import { build } from '../support/shipped-scenarios.ts';
import { record } from '../support/physics-kit.ts';

const STRENGTHS = [16, 19, 23, 26];
const DAYS = 2190;

function growth(strength: number) {
  const { model } = build('coupled-oscillation.json', {
    overrides: [
      'wind.parts[0].enabled=false',
      `wind.parts[1].strength=${strength}`,
      'wind.parts[1].sst.initial=0.001',
      `time.days=${DAYS}`,
    ],
  });
  const days: number[] = [];
  const east: number[] = [];
  const warm: number[] = [];
  for (let d = 0; d <= DAYS; d += 10) {
    if (d > 0) model.advance(model.stepsUntil(d * 86400));
    const c = model.coupledIndices()!;
    days.push(d);
    east.push(c.eastSst);
    warm.push(c.warmWater);
  }
  // Skip the first half year: the kick is not yet the mode.
  const fit = fitOscillation(days, east, 180);
  if (!fit) throw new Error(`strength ${strength}: no oscillation to fit`);
  const largest = Math.max(...east.map(Math.abs));
  return { fit, lead: phaseLead(days, warm, east, fit), largest };
}

describe('coupling sweep of the answering wind', () => {
  it('decays below a critical strength and grows above it', () => {
    const runs = STRENGTHS.map((s) => ({ strength: s, ...growth(s) }));
    const rates = runs.map((r) => r.fit.growthPerYear);
    // Linear: the 1 mK kick never grows past a fraction of a kelvin.
    for (const r of runs) expect(r.largest).toBeLessThan(0.05);
    expect(rates[0]).toBeLessThan(0);
    expect(rates[1]).toBeLessThan(0);
    expect(rates[2]).toBeGreaterThan(0);
    expect(rates[3]).toBeGreaterThan(0);
    for (let k = 1; k < rates.length; k++) expect(rates[k]).toBeGreaterThan(rates[k - 1]);
    const [a, b] = [runs[1], runs[2]];
    const critical =
      a.strength + ((b.strength - a.strength) * -a.fit.growthPerYear) / (b.fit.growthPerYear - a.fit.growthPerYear);
    for (const r of runs) {
      record(`coupling sweep: growth rate at strength ${r.strength} m/s per K`, r.fit.growthPerYear, NaN, 'per year', {
        source:
          'coupled instability: decay below, growth above a critical strength (Philander et al. 1984; Hirst 1986, from memory)',
        tolerance: r.strength < critical ? '< 0' : '> 0',
      });
    }
    record(
      'coupling sweep: critical strength (growth rate 0, linear between the bracketing runs)',
      critical,
      NaN,
      'm/s per K',
      {
        source: "this basin's own number; the sweep brackets it (Philander et al. 1984, from memory)",
        tolerance: `between ${a.strength} and ${b.strength}`,
      },
    );
    record('coupling sweep: period at the strength just above critical', b.fit.periodDays, NaN, 'days', {
      source: "this basin's own number",
      tolerance: '1.5-4 years',
    });
    expect(critical).toBeGreaterThan(a.strength);
    expect(critical).toBeLessThan(b.strength);
    // The growing mode oscillates on the recharge time scale, warm water leading.
    expect(b.fit.periodDays).toBeGreaterThan(1.5 * 365.25);
    expect(b.fit.periodDays).toBeLessThan(4 * 365.25);
    record(
      'coupling sweep: lead of the warm-water volume over the eastern SST, growing mode (share of a period)',
      b.lead,
      0.25,
      '',
      {
        source: 'recharge oscillator, Jin 1997 (about a quarter period, from memory)',
        tolerance: '1/8 to 3/8',
      },
    );
    expect(b.lead).toBeGreaterThan(1 / 8);
    expect(b.lead).toBeLessThan(3 / 8);
  });
});
