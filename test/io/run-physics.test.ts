// The run-physics record (model/run-physics.ts): made once from the resolved scenario, carried by
// the loaded scenario into the run file as one set of pycno_physics_* attributes (each value once:
// no other attribute repeats it), read back exactly, refused by name when damaged, and worked out
// for files written before it from what they kept. No reader takes a number of it from the
// scenario text (a scan of the code holds every JSON.parse of scenario text to a listed reason).

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EARTH } from '../../model/config.ts';
import { readRun } from '../../model/io/run-import.ts';
import {
  legacyRunPhysics,
  readRunPhysics,
  RUN_PHYSICS_ATTRIBUTES,
  runPhysicsAttributes,
} from '../../model/io/run-physics-file.ts';
import { runPhysics } from '../../model/run-physics.ts';
import { loadScenario, resolveScenario } from '../../model/scenario/index.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';
import { runInMemory } from '../support/run-records.ts';
import { edited } from '../support/nc-edit.ts';

async function loaded(sets: string[] = []) {
  const r = await new Engine({ host: fakeHost(2) }).load(FIXTURE_TEXT, FIXTURE, { sets });
  if (!r.ok) throw new Error(r.error.message);
  return r.scenario;
}

describe('the record', () => {
  it("holds the resolved physics, c = sqrt(g' H) and L = sqrt(c / beta) (Matsuno 1966; Gill 1982 ch. 11)", async () => {
    const info = await loaded([
      'physics.reducedGravity=0.02',
      'physics.layerThickness=120',
      'physics.frictionDays=40',
      'physics.viscosity=800',
      'physics.dynamics=nonlinear',
    ]);
    const p = info.physics;
    expect(p).toMatchObject({
      reducedGravity: 0.02,
      layerThickness: 120,
      density: 1025,
      coriolis: 'beta-plane',
      earthRadius: EARTH.radius,
      dynamics: 'nonlinear',
      frictionDays: 40,
      viscosity: 800,
    });
    // beta = 2 Omega / R (GRS80 Omega, IUGG mean radius; DESIGN.md gives 2.289e-11).
    expect(p.beta).toBeCloseTo(2.289e-11, 14);
    expect(p.waveSpeed).toBe(Math.sqrt(0.02 * 120));
    expect(p.equatorialRadius).toBe(Math.sqrt(Math.sqrt(0.02 * 120) / p.beta));
    // The derived numbers the check shows are the same numbers.
    expect(info.derived.c).toBe(p.waveSpeed);
    expect(info.derived.equatorialRadiusKm).toBeCloseTo(p.equatorialRadius / 1000, 9);
  });

  it('on the sphere takes the equatorial 2 Omega / R; without friction says none', async () => {
    const p = (await loaded(['physics.coriolis={"kind":"spherical"}', 'physics.frictionDays=null'])).physics;
    expect(p.coriolis).toBe('spherical');
    expect(p.beta).toBe((2 * EARTH.omega) / EARTH.radius);
    expect(p.frictionDays).toBeNull();
  });

  it('is made by one function from the resolved scenario', () => {
    const p = runPhysics(resolveScenario(loadScenario(FIXTURE_TEXT, FIXTURE)));
    expect(p.reducedGravity).toBe(0.03);
    expect(p.layerThickness).toBe(150);
  });
});

describe('in the run file', () => {
  it('is one set of attributes, read back exactly; no other attribute repeats a value of it', async () => {
    const r = await runInMemory(FIXTURE_TEXT, FIXTURE, { sets: ['physics.frictionDays=40', 'physics.viscosity=800'] });
    const info = await loaded(['physics.frictionDays=40', 'physics.viscosity=800']);
    const atts = r.file.attributes;
    expect(readRunPhysics(atts)).toEqual(info.physics);
    expect(readRun(r.bytes, 'run.nc').physics).toEqual(info.physics);
    for (const old of [
      'pycno_reduced_gravity',
      'pycno_layer_thickness',
      'pycno_beta',
      'pycno_dynamics',
      'pycno_earth_radius',
    ])
      expect(atts[old], old).toBeUndefined();
    const record = new Set<string>(RUN_PHYSICS_ATTRIBUTES.map((a) => a.name));
    const values = Object.values(runPhysicsAttributes(info.physics)).filter((v): v is number => typeof v === 'number');
    for (const [name, a] of Object.entries(atts)) {
      if (record.has(name) || typeof a.value === 'string') continue;
      for (const v of values) expect(Array.from(a.value).includes(v), `${name} repeats ${v}`).toBe(false);
    }
    // Without friction the friction attribute is left out.
    const none = await runInMemory(FIXTURE_TEXT, FIXTURE, { sets: ['physics.frictionDays=null'] });
    expect(none.file.attributes.pycno_physics_friction_days).toBeUndefined();
    expect(readRun(none.bytes).physics.frictionDays).toBeNull();
  });

  it('a damaged record is refused with the attribute it names', async () => {
    const good = (await runInMemory(FIXTURE_TEXT, FIXTURE)).bytes;
    const cases: Array<[string, (a: Record<string, unknown>) => void, RegExp]> = [
      [
        'c changed',
        (a) => (a.pycno_physics_wave_speed = 2.5),
        /pycno_physics_wave_speed is 2\.5, but the record's g', H and beta give 2\.12/,
      ],
      [
        'H missing',
        (a) => delete a.pycno_physics_layer_thickness,
        /pycno_physics_layer_thickness is missing or not one number/,
      ],
      [
        "g' negative",
        (a) => (a.pycno_physics_reduced_gravity = -0.03),
        /pycno_physics_reduced_gravity is -0\.03; it must be a positive number/,
      ],
      [
        'dynamics unknown',
        (a) => (a.pycno_physics_dynamics = 'fast'),
        /pycno_physics_dynamics is 'fast'; it must be one of linear, nonlinear/,
      ],
    ];
    for (const [what, change, message] of cases) {
      const bad = await edited(good, (f) => change(f.attributes as Record<string, unknown>));
      expect(() => readRun(bad, 'bad.nc'), what).toThrow(
        new RegExp(`^bad\\.nc: damaged Pycno run file: .*${message.source}`),
      );
    }
  });

  it('a file written before the record gets it from the attributes it kept and the scenario it carries', async () => {
    const r = await runInMemory(FIXTURE_TEXT, FIXTURE, { sets: ['physics.frictionDays=40'] });
    const info = await loaded(['physics.frictionDays=40']);
    const old = await edited(r.bytes, (f) => {
      for (const a of RUN_PHYSICS_ATTRIBUTES) delete f.attributes[a.name];
      Object.assign(f.attributes, {
        pycno_dynamics: 'linear',
        pycno_reduced_gravity: 0.03,
        pycno_layer_thickness: 150,
      });
    });
    expect(readRun(old, 'old.nc').physics).toEqual(info.physics);
    // The numbers it kept win over the scenario's.
    expect(
      legacyRunPhysics({ reducedGravity: 0.04, layerThickness: 100, dynamics: 'nonlinear' }, info.scenarioJson),
    ).toMatchObject({
      reducedGravity: 0.04,
      layerThickness: 100,
      dynamics: 'nonlinear',
      waveSpeed: Math.sqrt(0.04 * 100),
      frictionDays: 40,
    });
  });
});

describe('readers', () => {
  // Every JSON.parse of a run's scenario text in the program, and why it is not a number of the
  // physics read back: a new one must say here what it reads.
  const ALLOWED: Record<string, string> = {
    'model/io/run-import.ts': "name, description, seed and output.fields: the file's only copy is its scenario",
    'model/io/run-physics-file.ts': 'legacyRunPhysics: files and saved runs from before the record',
    'model/io/run-output.ts': 'the basin of a one-cell grid, whose cell size the centres cannot give',
    'model/report/report.ts': 'the scenario resolved for its stability limit, and the basin and wind parts as written',
    'model/compare/compare.ts': 'the difference of two scenarios, key by key',
    'viewer/library/store.ts':
      'the run list shows the scenario name, basin and wind parts as written; duplicating renames it',
    'viewer/state/characteristics.ts': 'the first pulsed wind patch, where the Hovmoller lines start',
    'model/coupling/run-indices.ts':
      "the answering part's region and settings, to measure the coupled indices from a saved run",
    'model/scenario/canonical-hash.ts':
      "a member's identity: the hash of the whole resolved scenario in canonical form",
    'worker/cli/batch-member.ts': "a member file's scenario against the batch's, key by key, to say what differs",
    'worker/cli/sweep-batch.ts': 'the paths a batch scenario names (made absolute for the tasks) and its name',
  };
  const files = (dir: string): string[] =>
    readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
      e.isDirectory() ? files(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : [],
    );

  it('parse scenario text only for what the record does not hold', () => {
    const found = ['model', 'worker', 'viewer']
      .flatMap(files)
      .filter((f) => /JSON\.parse\([^)]*[sS]cenario(Json|JSON|Text)?\b/.test(readFileSync(f, 'utf8')));
    expect(found.length).toBeGreaterThan(3); // the scan sees them
    expect(found.filter((f) => !(f in ALLOWED))).toEqual([]);
    // And the list stays true: each file listed still does it.
    expect(Object.keys(ALLOWED).filter((f) => !found.includes(f))).toEqual([]);
  });
});
