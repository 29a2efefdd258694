// The page's recorder of the run on screen: samples in, a RunData out (through RunCollector),
// snapshots thinned within a memory budget, the choices the save form offers.

import { completeRunPhysics } from '../../model/run-physics.ts';
import { describe, expect, it } from 'vitest';
import type { FieldName } from '../../model/diagnostics/fields.ts';
import type { Integrals } from '../../model/diagnostics/integrals.ts';
import { LiveRun, snapshotChoices } from '../../viewer/library-panel/live-run.ts';
import type { LoadedScenario, OutputSample } from '../../worker/protocol.ts';

const nx = 4;
const ny = 3;
const scenario = JSON.stringify({ name: 'tiny', physics: { reducedGravity: 0.05, layerThickness: 150 }, seed: 3 });

function loaded(): LoadedScenario {
  return {
    name: 'tiny',
    description: 'a test run',
    scenarioJson: scenario,
    grid: {
      nx,
      ny,
      lonWest: 0,
      lonEast: 4,
      latSouth: -1.5,
      latNorth: 1.5,
      dLon: 1,
      dLat: 1,
      lon: Float64Array.from([0.5, 1.5, 2.5, 3.5]),
      lat: Float64Array.from([-1, 0, 1]),
      ocean: new Uint8Array(nx * ny).fill(1),
    },
    seed: 3,
    physics: completeRunPhysics({
      reducedGravity: 0.05,
      layerThickness: 150,
      density: 1025,
      coriolis: 'beta-plane',
      beta: 2.289e-11,
      earthRadius: 6371008.7714,
      dynamics: 'linear',
      frictionDays: null,
      viscosity: 0,
    }),
    derived: {} as LoadedScenario['derived'],
    dt: 3600,
    days: 10,
    outputEveryDays: 1,
    fields: ['h_anom', 'u'] as FieldName[],
    hovmollerLats: [0],
    hovmollerRowLats: [0],
    probes: [{ name: 'p', lon: 1.5, lat: 0 }],
    bursts: [],
    startDay: 0,
  };
}

function sample(n: number, withFields: boolean, extraRow = false): OutputSample {
  const integrals = {
    day: n,
    volume: 1,
    volumeAnomaly: 0,
    spongeVolume: 0,
    entrainedVolume: 0,
    kinetic: n,
    potential: 2 * n,
    energy: 3 * n,
    minThickness: 150,
    maxSpeed: 0.1 * n,
    courant: 0.2,
  } as Integrals;
  const f = (k: number) => Float32Array.from({ length: nx * ny }, (_, c) => n * 100 + c + k / 10);
  return {
    day: n,
    step: 24 * n,
    integrals,
    hovmoller: extraRow ? [Float32Array.from([n, n, n, n]), new Float32Array(nx)] : [Float32Array.from([n, n, n, n])],
    probeValues: [Float32Array.from([n, n === 0 ? 0 : -n])],
    ...(withFields ? { fields: { h_anom: f(0), u: f(1) } } : {}),
  };
}

describe('LiveRun', () => {
  it('builds the RunData of the samples, with the fields of the records that carried them', () => {
    const live = new LiveRun(1e9);
    live.reset(loaded());
    expect(live.toRunData()).toBeNull();
    for (let n = 0; n <= 4; n++) live.add(sample(n, n !== 3, n >= 2));
    const run = live.toRunData()!;
    expect(Array.from(run.days)).toEqual([0, 1, 2, 3, 4]);
    expect(Array.from(run.steps)).toEqual([0, 24, 48, 72, 96]);
    expect(Array.from(run.integrals.energy)).toEqual([0, 3, 6, 9, 12]);
    // A latitude added during the run is not in the saved run: it has no early days.
    expect(run.hovmoller).toHaveLength(1);
    expect(Array.from(run.hovmoller[0].values.subarray(8, 12))).toEqual([2, 2, 2, 2]);
    expect(Array.from(run.probes[0].series.u!)).toEqual([0, -1, -2, -3, -4]);
    expect(run.snapshots.map((s) => s.index)).toEqual([0, 1, 2, 4]);
    expect(run.snapshots[3].fields.u![5]).toBeCloseTo(405.1, 4);
    expect(run.seed).toBe(3);
    expect(run.command).toBe('run of tiny in the page');
  });

  it('ignores a sample that does not follow (another run) and starts afresh on reset', () => {
    const live = new LiveRun(1e9);
    live.reset(loaded());
    live.add(sample(0, true));
    live.add(sample(1, true));
    live.add(sample(1, true));
    expect(live.length).toBe(2);
    live.reset(loaded());
    expect(live.length).toBe(0);
    live.add(sample(0, true));
    expect(live.toRunData()!.days.length).toBe(1);
  });

  it('thins the snapshots within its budget: every other one goes and the interval doubles', () => {
    const perRecord = 2 * nx * ny * 4;
    const live = new LiveRun(4.5 * perRecord);
    live.reset(loaded());
    const changes: Array<number | null> = [];
    for (let n = 0; n <= 8; n++) changes.push(live.add(sample(n, true)));
    // 5 records' fields passed the budget at record 4 (-> every 2), 5 again at record 8 (-> every 4).
    expect(changes).toEqual([null, null, null, null, 2, null, null, null, 4]);
    expect(live.keptEvery).toBe(4);
    expect(live.bytesKept).toBeLessThanOrEqual(4.5 * perRecord);
    const run = live.toRunData()!;
    expect(run.snapshots.map((s) => s.index)).toEqual([0, 4, 8]);
    expect(run.days.length).toBe(9);
    // Later samples with fields at other records are not kept.
    live.add(sample(9, true));
    expect(live.toRunData()!.snapshots.map((s) => s.index)).toEqual([0, 4, 8]);
  });

  it('offers snapshot intervals that are multiples of what was kept', () => {
    expect(snapshotChoices(1, 41)).toEqual([1, 2, 5, 10, 20, 50]);
    expect(snapshotChoices(4, 41)).toEqual([4, 8, 20, 40]);
    expect(snapshotChoices(1, 1)).toEqual([1]);
  });
});
