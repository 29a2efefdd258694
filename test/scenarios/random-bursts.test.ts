// configs/random-bursts.json: a year of seeded random westerly bursts. The seed fixes the run bit
// for bit; the bursts listed are those the model applies; each burst's downwelling Kelvin pulse
// reaches the probe east of the burst region at the Kelvin time (Matsuno 1966; Gill 1982, ch. 11).

import { describe, expect, it } from 'vitest';
import { record } from '../support/physics-kit.ts';
import type { DrawnBurst } from '../../model/forcing/bursts.ts';
import { at, build, DAY, metresPerDegree, runDaily } from '../support/shipped-scenarios.ts';

function run(seedOverride?: string) {
  const built = build('random-bursts.json', seedOverride ? { overrides: [`seed=${seedOverride}`] } : {});
  const { model: m, r } = built;
  const east = r.probes.find((p) => p.name === 'east')!;
  const probe: number[] = [];
  const tauMax: number[] = [];
  runDaily(m, r.days, () => {
    probe.push(at(m, 'h_anom', east.lon, 0));
    tauMax.push(Math.max(...m.field('taux').filter((t) => !Number.isNaN(t))));
  });
  return { ...built, probe, tauMax, east, h: Float64Array.from(m.state.h), u: Float64Array.from(m.state.u) };
}

/** Is day d inside some burst (ramps included, with half a day of slack for the wind update interval)? */
function inBurst(bursts: DrawnBurst[], d: number): boolean {
  return bursts.some((b) => d > b.start - 0.5 && d < b.start + b.duration + 0.5);
}

describe('random bursts scenario', () => {
  it('is reproducible from its seed, lists the bursts it applies, and each burst reaches the east probe on Kelvin time', () => {
    const a = run();
    const b = run();
    const other = run('7');

    // Same seed: bit-identical thermocline and currents after a year; another seed: a different run.
    expect(b.bursts).toEqual(a.bursts);
    expect(Buffer.from(b.h.buffer).equals(Buffer.from(a.h.buffer))).toBe(true);
    expect(Buffer.from(b.u.buffer).equals(Buffer.from(a.u.buffer))).toBe(true);
    expect(other.bursts).not.toEqual(a.bursts);
    let differ = 0;
    for (let k = 0; k < a.h.length; k++) if (other.h[k] !== a.h[k]) differ++;
    expect(differ).toBeGreaterThan(a.h.length / 10);

    // The list is what the model applies: westerly stress exactly on the listed burst days, none
    // outside them, and as many separate windy spells as listed bursts (the shipped seed's bursts
    // do not overlap).
    const bursts = a.bursts;
    expect(bursts.length).toBeGreaterThan(0);
    let spellCount = 0;
    for (let d = 0; d < a.tauMax.length; d++) {
      const windy = a.tauMax[d] > 1e-4;
      if (windy && (d === 0 || !(a.tauMax[d - 1] > 1e-4))) spellCount++;
      if (!inBurst(bursts, d)) expect(a.tauMax[d], `no burst listed on day ${d}`).toBeLessThan(1e-6);
    }
    expect(spellCount).toBe(bursts.length);
    for (const burst of bursts) {
      // On the day nearest the middle of the burst the strongest stress is about its amplitude.
      const mid = Math.round(burst.start + burst.duration / 2);
      expect(a.tauMax[mid] / burst.amplitude).toBeGreaterThan(0.8);
      expect(a.tauMax[mid] / burst.amplitude).toBeLessThan(1.01);
    }

    // Each burst: the equatorial h' at the east probe peaks (a rise, then a fall) about when the
    // burst's centre, delayed by the Kelvin travel time from the burst to the probe, arrives:
    // t = start + duration/2 + (x_probe - x_burst)/c (see westerly-burst.test.ts for why the peak).
    // Generous tolerance, 20 % of that delay: other bursts' pulses and the Rossby waves reflected
    // at the west coast (upwelling) ride on the same record.
    const m = a.model;
    const c = Math.sqrt(m.physics.reducedGravity * m.physics.layerThickness);
    const cell = m.grid.cellAt(a.east.lon, 0)!;
    const xProbe = m.grid.lonCentre[cell.i];
    for (const burst of bursts) {
      const travel = ((xProbe - burst.lon) * metresPerDegree(m)) / c / DAY;
      const predicted = burst.start + burst.duration / 2 + travel;
      const halfWindow = burst.duration / 2 + 10;
      const from = Math.max(0, Math.floor(predicted - halfWindow));
      const to = Math.min(a.probe.length - 1, Math.ceil(predicted + halfWindow));
      const seg = a.probe.slice(from, to + 1);
      const top = Math.max(...seg);
      const when = from + seg.indexOf(top);
      record(
        `random bursts: pulse of the burst on day ${burst.start.toFixed(1)} at the east probe (day)`,
        when,
        predicted,
        'd',
      );
      expect(
        Math.abs(when - predicted),
        `burst of day ${burst.start.toFixed(1)}: peak on day ${when}, predicted ${predicted.toFixed(1)}`,
      ).toBeLessThan(0.2 * (burst.duration / 2 + travel));
      // A real peak inside the window, clearly above the level before the pulse arrived.
      expect(when).toBeGreaterThan(from);
      expect(when).toBeLessThan(to);
      expect(top - a.probe[from]).toBeGreaterThan(1);
    }
  });
});
