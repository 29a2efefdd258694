// A run continued from a restart file writes the same records as the straight run, all fields
// bit for bit, its first record included: a record shows the stress in force over the step that
// ends at it (docs/output.md), whether that step ran in this process or before the restart.
// Winds that change at the join: pulse ramps, a piecewise table, random bursts, a daily update.

import { describe, expect, it } from 'vitest';
import { writeRestart } from '../../model/io/restart.ts';
import { recordDays, recordDifferences, runInMemory, type RunInMemory } from '../support/run-records.ts';
import { BURSTS_PART } from '../support/trust-kit.ts';
import { FIXTURE_TEXT } from '../support/engine-fixture.ts';

const PATCH = { kind: 'shaped', shape: { kind: 'patch', lon: 165, lat: 0, lonWidth: 6, latWidth: 3 }, x: 0.1, y: 0.02 };

/** The fixture with one changing wind part; `join` is the day of the restart. */
function windy(kind: string, join: number): string {
  const sc = JSON.parse(FIXTURE_TEXT);
  const part = (envelope: object) => ({ kind: 'fixed', name: kind, quantity: 'stress', source: PATCH, envelope });
  if (kind === 'pulse ramp at the join') {
    sc.wind.parts = [part({ kind: 'pulse', start: join - 0.5, duration: 4, ramp: 1 })];
  } else if (kind === 'table, updated every step') {
    sc.wind.parts = [
      part({
        kind: 'table',
        points: [
          [0, 0],
          [join - 1, 0.3],
          [join + 1, 1],
          [30, -0.5],
        ],
      }),
    ];
    sc.wind.updateHours = 0;
  } else if (kind === 'bursts') {
    sc.wind.parts = [{ ...BURSTS_PART, window: [join - 3, join + 3], ratePerYear: 300, duration: [1, 4] }];
    sc.wind.updateHours = 6;
  } else if (kind === 'harmonics, updated daily') {
    sc.wind.parts = [part({ kind: 'harmonics', mean: 0.2, terms: [{ period: 7, amplitude: 1, peakDay: join + 0.3 }] })];
    sc.wind.updateHours = 24;
  } else throw new Error(kind);
  return JSON.stringify(sc);
}

async function legs(text: string, sets: string[], join: number, total: number) {
  const straight = await runInMemory(text, '/runs/straight.json', { sets: [...sets, `time.days=${total}`] });
  const first = await runInMemory(text, '/runs/first.json', { sets: [...sets, `time.days=${join}`] });
  const sc = JSON.parse(text);
  sc.initial = { kind: 'restart', path: 'first-end.nc' };
  const files = new Map([['/runs/first-end.nc', await writeRestart(first.model)]]);
  const second = await runInMemory(JSON.stringify(sc), '/runs/second.json', {
    sets: [...sets, `time.days=${total - join}`],
    files,
  });
  return { straight, first, second };
}

/** Records of b whose time a also has, paired by time (exact). */
function common(a: RunInMemory, b: RunInMemory): Array<[number, number]> {
  const da = recordDays(a.file);
  return recordDays(b.file).flatMap((d, j) => (da.includes(d) ? [[da.indexOf(d), j] as [number, number]] : []));
}

function differences(a: RunInMemory, b: RunInMemory, pairs: Array<[number, number]>): string[] {
  return pairs.flatMap(([i, j]) =>
    recordDifferences(a.file, i, b.file, j).map((v) => `${v} at day ${recordDays(b.file)[j]}`),
  );
}

describe('records across a restart', () => {
  for (const kind of ['pulse ramp at the join', 'table, updated every step', 'bursts', 'harmonics, updated daily']) {
    for (const mode of kind === 'bursts' ? (['linear', 'nonlinear'] as const) : (['linear'] as const)) {
      it(`${kind} (${mode}): the restarted run's records, the first included, are the straight run's`, async () => {
        const join = 10;
        const { straight, first, second } = await legs(
          windy(kind, join),
          ['physics.reducedGravity=0.037', `physics.dynamics=${mode}`, 'time.outputEveryDays=2.5'],
          join,
          20,
        );
        expect(recordDays(second.file)).toEqual([10, 12.5, 15, 17.5, 20]);
        const pairs = common(straight, second);
        expect(pairs.map(([, j]) => j)).toEqual([0, 1, 2, 3, 4]);
        expect(differences(straight, second, pairs)).toEqual([]);
        expect(differences(straight, first, common(straight, first))).toEqual([]);
        // Something to compare: the stress in the patch changes across the join.
        const taux = (r: RunInMemory, k: number) =>
          (r.file.variable('taux').values as Float64Array)[
            k * r.model.grid.nx * r.model.grid.ny + 10 * r.model.grid.nx + 15
          ];
        const i = recordDays(straight.file).indexOf(join);
        expect(taux(straight, i)).not.toBe(taux(straight, i + 1));
      });
    }
  }

  it("a fresh run's first record shows the stress its first step uses", async () => {
    // The envelope falls from 1 at day 0 to 0 at day 1, evaluated at every step: the first step
    // uses the full stress, the same as a constant envelope's.
    const sc = JSON.parse(windy('table, updated every step', 10));
    sc.wind.parts[0].envelope = {
      kind: 'table',
      points: [
        [0, 1],
        [1, 0],
      ],
    };
    const falling = await runInMemory(JSON.stringify(sc), '/runs/falling.json', { sets: ['time.days=2'] });
    sc.wind.parts[0].envelope = { kind: 'constant' };
    const steady = await runInMemory(JSON.stringify(sc), '/runs/steady.json', { sets: ['time.days=2'] });
    const cells = falling.model.grid.nx * falling.model.grid.ny;
    for (const f of ['taux', 'tauy']) {
      const a = (falling.file.variable(f).values as Float64Array).subarray(0, cells);
      const b = (steady.file.variable(f).values as Float64Array).subarray(0, cells);
      expect(Array.from(a), f).toEqual(Array.from(b));
      expect(a.some((x) => x !== 0 && x < 1e30)).toBe(true);
    }
  });

  it("a restart between whole intervals: the first record repeats the last of the first leg, later ones are the straight run's", async () => {
    const join = 8.5; // not a whole number of 2.5-day intervals: the first leg ends with a shorter one
    const { straight, first, second } = await legs(
      windy('pulse ramp at the join', join),
      ['physics.reducedGravity=0.037', 'time.outputEveryDays=2.5'],
      join,
      20,
    );
    const d1 = recordDays(first.file);
    const d2 = recordDays(second.file);
    expect(d1.slice(0, 4)).toEqual([0, 2.5, 5, 7.5]);
    expect(d1.at(-1)).toBeGreaterThanOrEqual(join);
    expect(d2[0]).toBe(d1.at(-1));
    expect(recordDifferences(first.file, d1.length - 1, second.file, 0)).toEqual([]);
    // Later records fall on whole intervals from day 0, where the straight run has them too.
    expect(d2.slice(1, 6)).toEqual([10, 12.5, 15, 17.5, 20]);
    const pairs = common(straight, second);
    expect(pairs.map(([, j]) => j)).toEqual([1, 2, 3, 4, 5]);
    expect(differences(straight, second, pairs)).toEqual([]);
  });
});
