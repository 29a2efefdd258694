// Blow-ups never end as success (issue 19). The model checks its state every 10 steps; a run
// whose layer vanished after the last of those checks used to exit 0 and print "thinnest layer
// -286.15 m". Now the engine checks the state before every record (the last one included) and the
// command line once more before its summary: such a run fails with the blow-up, exit 1, and no
// record of a bad state is ever written. Each case is a real `pycno` invocation, except the one
// that watches the engine itself (the page's engine) record by record.

import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { OUTPUT_FILL } from '../../model/io/run-output.ts';
import { RUNAWAY_SPEED } from '../../model/model.ts';
import { Engine } from '../../worker/engine.ts';
import { FIXTURE, FIXTURE_TEXT, fakeHost } from '../support/engine-fixture.ts';
import { filesLike, folder, nc, noInternals, pycno } from '../support/cli-kit.ts';
import { edited, setScenario } from '../support/nc-edit.ts';

let dir: string;
beforeAll(() => {
  dir = folder('blow');
});

/** A thin linear layer under a strong steady westerly: it outcrops within the first day. */
const thin = (H: number, x: number) => [
  `physics.layerThickness=${H}`,
  'physics.surfaceLayer.depth=10',
  'physics.entrainment.minThickness=5',
  `wind.parts[0].source.x=${x}`,
  'wind.parts[0].envelope={"kind":"constant"}',
];
const sets = (list: string[]) => list.flatMap((s) => ['--set', s]);

// With dt = 12 h, these runs end (7 or 9 steps) before the first 10-step check: each of them
// exited 0 before, with a negative thinnest layer (-6.08, -158.57, -286.15, -243.50, -295.99 m)
// and flows of 12 to 55 m/s.
const ENDS_BETWEEN_CHECKS: Array<[number, number, number]> = [
  [20, 3, 1],
  [20, 3, 3.5],
  [20, 3, 4.5],
  [30, 3, 4.5],
  [60, 5, 4.5],
];

describe('a run whose layer vanishes after the last 10-step check', () => {
  for (const [H, x, days] of ENDS_BETWEEN_CHECKS) {
    it(`H = ${H} m, stress ${x} N/m2, ${days} days: exit 1 with the blow-up, no summary, no file`, () => {
      const out = `h${H}-x${x}-d${days}.nc`;
      const r = pycno(dir, ['run', 'tiny.json', '--out', out, '--quiet', '--days', String(days), ...sets(thin(H, x))]);
      expect(r.code, r.stdout).toBe(1);
      expect(r.stderr).toMatch(
        /^pycno: the run blew up on day \d+\.\d\d at [\d.]+°[EW], [\d.]+°[NS]: the upper layer vanished \(thickness -[\d.]+ m/,
      );
      expect(r.stdout).not.toMatch(/thinnest layer|fastest flow/);
      noInternals(r);
      expect(filesLike(dir, out)).toEqual([]);
    });
  }

  it('the records kept (--keep-partial) are all of a healthy state: layer present, flow below the runaway limit, fields finite', () => {
    const r = pycno(dir, [
      'run',
      'tiny.json',
      '--out',
      'kept.nc',
      '--quiet',
      '--keep-partial',
      '--days',
      '4.5',
      ...sets(thin(60, 5)),
    ]);
    expect(r.code).toBe(1);
    const temp = /are in (kept\.nc\.part-\d+)|is in (kept\.nc\.part-\d+)/.exec(r.stderr);
    expect(temp, r.stderr).not.toBeNull();
    const f = nc(join(dir, temp![1] ?? temp![2]));
    expect(f.numRecords).toBeGreaterThanOrEqual(1);
    for (const x of f.variable('min_thickness').values as Float64Array) expect(x).toBeGreaterThan(0);
    for (const x of f.variable('max_speed').values as Float64Array) expect(x).toBeLessThanOrEqual(RUNAWAY_SPEED);
    expect((f.variable('h_anom').values as Float64Array).every((x) => x === OUTPUT_FILL || Number.isFinite(x))).toBe(
      true,
    );
  });

  it('the engine (the page uses the same) never hands a record of a bad state to its recorder', async () => {
    const engine = new Engine({ host: fakeHost(2) });
    const loaded = await engine.load(FIXTURE_TEXT, FIXTURE, { sets: [...thin(20, 3), 'time.days=4.5'] });
    expect(loaded.ok).toBe(true);
    const thinnest: number[] = [];
    engine.setRecorder((rec) => void thinnest.push(rec.integrals.minThickness));
    engine.start();
    const end = await engine.idle();
    expect(end.status).toBe('failed');
    expect(end.error!.kind).toBe('blow-up');
    expect(thinnest.length).toBeGreaterThanOrEqual(1);
    expect(thinnest.every((h) => h > 0)).toBe(true);
  });

  it('pycno rerun of a run file whose scenario blows up at its end: exit 1, not a match', async () => {
    expect(pycno(dir, ['run', 'tiny.json', '--out', 'fine.nc', '--quiet']).code).toBe(0);
    // Crafted: the embedded scenario (with a matching hash) is one that ends between checks.
    const sc = JSON.parse(nc(join(dir, 'fine.nc')).attributes.pycno_scenario.value as string);
    sc.physics.layerThickness = 20;
    sc.physics.surfaceLayer.depth = 10;
    sc.physics.entrainment.minThickness = 5;
    sc.wind.parts[0].source.x = 3;
    sc.wind.parts[0].envelope = { kind: 'constant' };
    sc.time.days = 3.5;
    writeFileSync(
      join(dir, 'ends-badly.nc'),
      await edited(new Uint8Array(readFileSync(join(dir, 'fine.nc'))), (f) =>
        setScenario(f, JSON.stringify(sc, null, 2)),
      ),
    );
    const r = pycno(dir, ['rerun', 'ends-badly.nc']);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^pycno: the rerun failed: the run blew up on day/);
    expect(r.stdout).not.toMatch(/^match/m);
  });

  it('a sweep member that blows up: the member fails (exit 1 in the index), leaves no file, the sweep exits 1', () => {
    const r = pycno(
      dir,
      [
        'sweep',
        'tiny.json',
        '--vary',
        'physics.layerThickness=150,20',
        '--days',
        '3.5',
        ...sets(thin(20, 3).slice(1)),
        '--out',
        'sw',
        '--jobs',
        '2',
      ],
      120_000,
    );
    expect(r.code).toBe(1);
    const index = JSON.parse(readFileSync(join(dir, 'sw', 'index.json'), 'utf8'));
    expect(index.runs.map((x: { exit: number }) => x.exit)).toEqual([0, 1]);
    expect(filesLike(join(dir, 'sw'), 'run-')).toEqual(['run-001.nc']);
  }, 120_000);
});
