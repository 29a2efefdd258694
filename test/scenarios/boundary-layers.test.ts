// Every shipped scenario, run over its full length, keeps its western boundary layer resolved:
// no two-grid-interval mode in v along western coasts, and currents of an ocean.
//
// Why: on a beta plane the wind-driven return flow runs in a western boundary layer of width
// (A/beta)^(1/3) (Munk 1950) or r/beta (Stommel 1948); common practice is that this width spans at
// least one grid interval (Griffies 2004, Fundamentals of Ocean Climate Models, from memory). A
// grid that cannot hold it fills the layer with v alternating in sign from one column to the next.
// Before the shipped scenarios had viscosity that mode reached 6 m/s (counter-current), and the
// measure below was 0.58-0.97 in six of the eight scenarios; the control case shows it still
// catches the mode.
//
// Bounds, both stated here:
// - grid-scale share of v near western coasts at most 0.2 (the measure is 1 for a pure
//   two-grid-interval pattern, and about 0.03 for a smooth profile sampled at 3 cells per half
//   wavelength; resolved runs measured 0.01-0.08);
// - fastest layer-mean flow over the whole run at most 2 m/s: about the fastest open-ocean currents
//   observed, the cores of western boundary currents such as the Gulf Stream and the Kuroshio
//   (from memory), and above the 0.5-1.5 m/s of equatorial jets and undercurrents (check-values §4).

import { describe, expect, it } from 'vitest';
import { Grid } from '../../model/grid.ts';
import type { Model } from '../../model/model.ts';
import { derivedNumbers } from '../../model/scenario/index.ts';
import { record } from '../support/physics-kit.ts';
import { build, resolved, startOfNewRun } from '../support/shipped-scenarios.ts';

const GRID_SCALE_BOUND = 0.2;
const SPEED_BOUND = 2;
/** Columns east of each western coast that the measure looks at. */
const COAST_COLUMNS = 6;

/**
 * The share of the two-grid-interval component in v near western coasts: in each row, the first
 * COAST_COLUMNS ocean cells east of a coast (the western wall or land), the second difference
 * (v[i-1] - 2 v[i] + v[i+1]) / 4, which is v itself for a pattern alternating in sign and near 0 for
 * a smooth one; its RMS over the RMS of v there.
 */
function westernGridScaleShare(m: Model): number {
  const { nx, ny } = m.grid;
  const v = m.field('v');
  const wet = (i: number, j: number) => i >= 0 && i < nx && Number.isFinite(v[j * nx + i]);
  let noise = 0;
  let total = 0;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      if (!wet(i, j) || wet(i - 1, j)) continue; // i is the first ocean cell east of a coast
      let run = 0;
      while (run < COAST_COLUMNS && wet(i + run, j)) run++;
      for (let q = 0; q < run; q++) total += v[j * nx + i + q] ** 2;
      for (let q = 1; q + 1 < run; q++) {
        const k = j * nx + i + q;
        noise += ((v[k - 1] - 2 * v[k] + v[k + 1]) / 4) ** 2;
      }
    }
  }
  return total > 0 ? Math.sqrt(noise / total) : 0;
}

interface Measured {
  share: number;
  fastest: number;
  fastestDay: number;
}

/** Run to the end, sampling the fastest flow at every output interval; the share at the end. */
function runThrough(m: Model, runSeconds: number, everySeconds: number): Measured {
  let fastest = 0;
  let fastestDay = 0;
  const t0 = m.state.time;
  for (let t = everySeconds; t <= runSeconds + 1e-6; t += everySeconds) {
    m.advance(m.stepsUntil(t0 + Math.min(t, runSeconds)));
    const s = m.integrals().maxSpeed;
    if (s > fastest) [fastest, fastestDay] = [s, m.day];
  }
  return { share: westernGridScaleShare(m), fastest, fastestDay };
}

function runScenario(file: string, overrides: string[] = []): Measured {
  const r = resolved(file, overrides);
  if (r.initial.kind === 'spinup') {
    const sp = build(r.initial.scenario, { overrides });
    sp.model.advance(sp.model.stepsUntil(sp.r.runSeconds));
    const { model } = build(file, { overrides, startState: startOfNewRun(sp.model.state) });
    return runThrough(model, r.runSeconds, r.outputEverySeconds);
  }
  const { model } = build(file, { overrides });
  return runThrough(model, r.runSeconds, r.outputEverySeconds);
}

const SHIPPED = [
  'kelvin-pulse.json',
  'westerly-burst.json',
  'trade-spinup.json',
  'trade-relaxation.json',
  'monsoon-reversal.json',
  'counter-current.json',
  'random-bursts.json',
  'example-minimal.json',
  'coupled-oscillation.json',
];

describe('western boundary layers of the shipped scenarios', () => {
  for (const file of SHIPPED) {
    it(`${file}: resolved on paper, no grid-scale v at western coasts, currents under ${SPEED_BOUND} m/s over the whole run`, () => {
      const r = resolved(file);
      const d = derivedNumbers(r, new Grid(r.model.basin, r.model.physics.earthRadius));
      expect(d.boundaryLayer.advice, file).toBeNull();
      expect(d.boundaryLayer.intervals).toBeGreaterThanOrEqual(1);
      const got = runScenario(file);
      record(`${file}: grid-scale share of v within ${COAST_COLUMNS} cells of western coasts`, got.share, 0, '', {
        source: 'Munk 1950; Stommel 1948; resolved layer, Griffies 2004 (from memory)',
        tolerance: `< ${GRID_SCALE_BOUND}`,
      });
      record(
        `${file}: fastest layer-mean flow over the run (day ${got.fastestDay.toFixed(0)})`,
        got.fastest,
        NaN,
        'm/s',
        { source: 'fastest ocean currents about 2 m/s (from memory)', tolerance: `< ${SPEED_BOUND} m/s` },
      );
      expect(got.share).toBeLessThan(GRID_SCALE_BOUND);
      expect(got.fastest).toBeLessThan(SPEED_BOUND);
    });
  }

  it('control: without viscosity the measure catches the grid-scale mode (westerly-burst, and check warns)', () => {
    const r = resolved('westerly-burst.json', ['physics.viscosity=0']);
    const d = derivedNumbers(r, new Grid(r.model.basin, r.model.physics.earthRadius));
    expect(d.boundaryLayer.resolved).toBe(false);
    expect(d.boundaryLayer.advice).toMatch(/raise physics\.viscosity to at least 4000 m2\/s/);
    const got = runScenario('westerly-burst.json', ['physics.viscosity=0']);
    record(
      'westerly-burst.json without viscosity: grid-scale share of v at western coasts (control)',
      got.share,
      NaN,
      '',
      { source: 'the same measure on an unresolved layer', tolerance: `> ${GRID_SCALE_BOUND}` },
    );
    expect(got.share).toBeGreaterThan(GRID_SCALE_BOUND);
  });
});
