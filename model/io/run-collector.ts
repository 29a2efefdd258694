// A RunData built as a run goes, from what it is made of (RunSetup) and its records.

import type { FieldName } from '../diagnostics/fields.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import type { RunPhysics } from '../run-physics.ts';
import { INTEGRAL_KEYS, RunFileError, type IntegralKey, type RunData, type RunSnapshot } from './run-data.ts';
import { PYCNO_VERSION, type OutputRecord } from './run-output.ts';
import { sha256Hex } from './sha256.ts';

/** What a run is made of before its records: the engine's LoadedScenario has all of it. */
export interface RunSetup {
  name: string;
  description: string;
  scenarioJson: string;
  seed: string | number;
  physics: RunPhysics;
  grid: { nx: number; ny: number; lon: ArrayLike<number>; lat: ArrayLike<number>; ocean: ArrayLike<number> };
  fields: readonly FieldName[];
  hovmollerLats: readonly number[];
  hovmollerRowLats?: readonly number[];
  probes: ReadonlyArray<{ name: string; lon: number; lat: number }>;
  bursts: readonly DrawnBurst[];
  dt: number;
}

/**
 * Collects a run record by record (from Engine.setRecorder, or from frames on the page) into a
 * RunData. Fields are kept for every `snapshotEvery`-th record (the first included); a record
 * with no fields simply has no snapshot.
 */
export class RunCollector {
  private readonly setup: RunSetup;
  private readonly every: number;
  private readonly days: number[] = [];
  private readonly steps: number[] = [];
  private readonly integrals: number[][] = INTEGRAL_KEYS.map(() => []);
  private readonly hov: number[][][];
  private readonly probe: number[][][];
  private readonly snapshots: RunSnapshot[] = [];

  constructor(setup: RunSetup, options: { snapshotEvery?: number; createdAt?: Date; command?: string } = {}) {
    const every = options.snapshotEvery ?? 1;
    if (!Number.isInteger(every) || every < 1)
      throw new RunFileError(`snapshotEvery must be a whole number >= 1 (got ${every})`);
    this.setup = setup;
    this.every = every;
    this.createdAt = (options.createdAt ?? new Date()).toISOString();
    this.command = options.command ?? `run of ${setup.name}`;
    this.hov = setup.hovmollerLats.map(() => []);
    this.probe = setup.probes.map(() => setup.fields.map(() => []));
  }

  private readonly createdAt: string;
  private readonly command: string;

  get records(): number {
    return this.days.length;
  }

  add(r: OutputRecord): void {
    const n = this.days.length;
    const { nx } = this.setup.grid;
    if (n > 0 && !(r.day > this.days[n - 1]))
      throw new RunFileError(`record ${n}: day ${r.day} does not follow day ${this.days[n - 1]}`);
    if (r.hovmoller.length !== this.hov.length)
      throw new RunFileError(`record ${n}: ${r.hovmoller.length} Hovmoller rows, expected ${this.hov.length}`);
    if (r.probeValues.length !== this.probe.length)
      throw new RunFileError(`record ${n}: ${r.probeValues.length} probes, expected ${this.probe.length}`);
    this.days.push(r.day);
    this.steps.push(r.step);
    INTEGRAL_KEYS.forEach((k, q) => this.integrals[q].push(r.integrals[k]));
    r.hovmoller.forEach((row, h) => {
      if (row.length !== nx)
        throw new RunFileError(`record ${n}: Hovmoller row ${h} has ${row.length} values, expected ${nx}`);
      this.hov[h].push(Array.from(row));
    });
    r.probeValues.forEach((vals, p) => this.setup.fields.forEach((_, k) => this.probe[p][k].push(vals[k])));
    const hasFields = this.setup.fields.every((f) => r.fields[f] !== undefined);
    if (hasFields && n % this.every === 0) {
      const fields: Partial<Record<FieldName, Float32Array>> = {};
      for (const f of this.setup.fields) fields[f] = Float32Array.from(r.fields[f]!);
      this.snapshots.push({ index: n, day: r.day, fields });
    }
  }

  finish(): RunData {
    const s = this.setup;
    const nt = this.days.length;
    const integrals = {} as Record<IntegralKey, Float64Array>;
    INTEGRAL_KEYS.forEach((k, q) => (integrals[k] = Float64Array.from(this.integrals[q])));
    return {
      name: s.name,
      description: s.description,
      scenarioJson: s.scenarioJson,
      scenarioSha256: sha256Hex(s.scenarioJson),
      version: PYCNO_VERSION,
      seed: s.seed,
      createdAt: this.createdAt,
      command: this.command,
      dt: s.dt,
      physics: structuredClone(s.physics),
      grid: {
        nx: s.grid.nx,
        ny: s.grid.ny,
        lon: Float64Array.from(s.grid.lon),
        lat: Float64Array.from(s.grid.lat),
        ocean: Uint8Array.from(s.grid.ocean),
      },
      fields: [...s.fields],
      days: Float64Array.from(this.days),
      steps: Float64Array.from(this.steps),
      integrals,
      hovmoller: s.hovmollerLats.map((lat, h) => {
        const values = new Float32Array(nt * s.grid.nx);
        this.hov[h].forEach((row, n) => values.set(row, n * s.grid.nx));
        return { requestedLat: lat, rowLat: s.hovmollerRowLats?.[h] ?? lat, values };
      }),
      probes: s.probes.map((p, q) => {
        const series: Partial<Record<FieldName, Float32Array>> = {};
        s.fields.forEach((f, k) => (series[f] = Float32Array.from(this.probe[q][k])));
        return { name: p.name, lon: p.lon, lat: p.lat, series };
      }),
      snapshots: this.snapshots.slice(),
      bursts: structuredClone([...s.bursts]),
    };
  }
}
