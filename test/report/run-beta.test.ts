// Wave measurement uses the run's own beta, not Earth's: the equatorial radius L = sqrt(c/beta)
// (Matsuno 1966; Gill 1982 ch. 11) sets which off-equatorial Hovmoller sections the long-Rossby
// fit looks at (within 3 L of the equator), so a scenario that sets physics.coriolis.beta must
// carry it into the file, the read-back run, the report and the comparison.

import { describe, expect, it } from 'vitest';
import { readRun } from '../../model/io/run-import.ts';
import { legacyRunPhysics } from '../../model/io/run-physics-file.ts';
import { measureWaves } from '../../model/report/measure.ts';
import { runReport } from '../../model/report/report.ts';
import { EARTH } from '../../model/config.ts';
import { FIXTURE, FIXTURE_TEXT } from '../support/engine-fixture.ts';
import { runInMemory } from '../support/run-records.ts';

const STRONG_BETA = 4e-11;
// The tiny basin has c = sqrt(0.03 x 150) = 2.12 m/s: with Earth's beta (2.29e-11) L = 304 km =
// 2.7 degrees, so a section at 7N lies within 3 L; with beta = 4e-11, L = 230 km = 2.1 degrees and
// 3 L = 6.2 degrees, so it does not.
const SETS = ['hovmoller.lat=[0,7]', 'time.days=4'];

describe("the run's own beta", () => {
  it('is written to the file, read back, and sets the Rossby windows of the measurement', async () => {
    const own = await runInMemory(FIXTURE_TEXT, FIXTURE, {
      sets: [...SETS, `physics.coriolis={"kind":"beta-plane","beta":${STRONG_BETA}}`],
    });
    const earth = await runInMemory(FIXTURE_TEXT, FIXTURE, { sets: SETS });
    expect(Array.from((own.file.attributes.pycno_physics_beta as { value: ArrayLike<number> }).value)).toEqual([
      STRONG_BETA,
    ]);
    const runOwn = readRun(own.bytes, 'own.nc');
    const runEarth = readRun(earth.bytes, 'earth.nc');
    expect(runOwn.physics.beta).toBe(STRONG_BETA);
    expect(runEarth.physics.beta).toBe((2 * EARTH.omega) / EARTH.radius);
    // 7N is within 3 L of the equator only with Earth's beta.
    expect(measureWaves(runEarth).rossby).not.toBeNull();
    expect(measureWaves(runOwn).rossby).toBeNull();
    // The report shows the run's L = sqrt(c / beta).
    const L = Math.sqrt(Math.sqrt(0.03 * 150) / STRONG_BETA) / 1000;
    expect(runReport(runOwn)).toContain(`${Number(L.toPrecision(3))} km (β = 4e-11 m⁻¹ s⁻¹)`);
  });

  it('of a file written before the attribute comes from the scenario it carries', () => {
    const kept = { reducedGravity: 0.03, layerThickness: 150 };
    const json = JSON.stringify({ physics: { ...kept, coriolis: { kind: 'beta-plane', beta: STRONG_BETA } } });
    expect(legacyRunPhysics(kept, json).beta).toBe(STRONG_BETA);
    const spherical = JSON.stringify({ physics: { ...kept, coriolis: { kind: 'spherical' } } });
    expect(legacyRunPhysics(kept, spherical).beta).toBe((2 * EARTH.omega) / EARTH.radius);
    // A pycno_beta the file kept wins over the scenario.
    expect(legacyRunPhysics({ ...kept, beta: 3e-11 }, json).beta).toBe(3e-11);
  });
});
