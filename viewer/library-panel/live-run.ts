// The run on screen, kept for saving: every output sample (integrals, Hovmoller rows, probe
// values, step) and the full fields of every k-th sample, which the engine sends in the samples
// (Engine.setSampleFields) because frames may skip fields when the model outruns the screen.
// Fields are kept within a memory budget: when it is reached, every other kept snapshot is let go
// and k doubles, so a long run still saves its series in full and snapshots at a coarser interval.
// No physics here: the values are the engine's, stored as they came.

import type { FieldName } from '../../model/diagnostics/fields.ts';
import { RunCollector, type RunSetup } from '../../model/io/run-collector.ts';
import type { RunData } from '../../model/io/run-data.ts';
import type { LoadedScenario, OutputSample } from '../../worker/protocol.ts';

interface KeptRecord {
  sample: OutputSample;
  step: number;
  fields: Partial<Record<FieldName, Float32Array>> | null;
}

export class LiveRun {
  private setup: (RunSetup & { startDay: number }) | null = null;
  private records: KeptRecord[] = [];
  private every = 1;
  private fieldBytes = 0;
  private startedAt = new Date();

  constructor(
    /** Bytes of snapshot fields to keep at most. */
    private budgetBytes: number,
  ) {}

  /** A new run (a load, or stop-and-reset): forget the old one. */
  reset(r: LoadedScenario): void {
    // Copies: the page adds Hovmoller latitudes to its LoadedScenario during a run; the saved run
    // has the ones sampled from its first record.
    this.setup = {
      name: r.name,
      description: r.description,
      scenarioJson: r.scenarioJson,
      seed: r.seed,
      physics: r.physics,
      grid: r.grid,
      fields: [...r.fields],
      hovmollerLats: [...r.hovmollerLats],
      hovmollerRowLats: r.hovmollerRowLats ? [...r.hovmollerRowLats] : undefined,
      probes: r.probes.map((p) => ({ ...p })),
      bursts: r.bursts,
      dt: r.dt,
      startDay: r.startDay ?? 0,
    };
    this.records = [];
    this.every = 1;
    this.fieldBytes = 0;
    this.startedAt = new Date();
  }

  get name(): string {
    return this.setup?.name ?? '';
  }

  /** Output records so far. */
  get length(): number {
    return this.records.length;
  }

  get lastDay(): number | null {
    return this.records.length ? this.records[this.records.length - 1].sample.day : null;
  }

  /** Snapshots are kept for every `keptEvery`-th record (the first included). */
  get keptEvery(): number {
    return this.every;
  }

  get bytesKept(): number {
    return this.fieldBytes;
  }

  get budget(): number {
    return this.budgetBytes;
  }

  /**
   * Take one output sample. Returns the new snapshot interval when the budget made it coarser
   * (the page then asks the engine for fields that often), else null.
   */
  add(s: OutputSample): number | null {
    const setup = this.setup;
    if (!setup) return null;
    const n = this.records.length;
    // Samples arrive in order and once each; one that does not follow belongs to another run.
    if (n > 0 && !(s.day > this.records[n - 1].sample.day)) return null;
    const step = s.step ?? Math.round(((s.day - setup.startDay) * 86400) / setup.dt);
    const rows = s.hovmoller.slice(0, setup.hovmollerLats.length);
    let fields: KeptRecord['fields'] = null;
    if (s.fields && n % this.every === 0 && setup.fields.every((f) => s.fields![f])) {
      fields = {};
      for (const f of setup.fields) {
        fields[f] = s.fields[f]!;
        this.fieldBytes += s.fields[f]!.byteLength;
      }
    }
    this.records.push({ sample: { ...s, hovmoller: rows, fields: undefined }, step, fields });
    let changed: number | null = null;
    while (this.fieldBytes > this.budgetBytes && this.snapshotCount() > 1) {
      this.every *= 2;
      this.thin();
      changed = this.every;
    }
    return changed;
  }

  private thin(): void {
    this.fieldBytes = 0;
    this.records.forEach((r, n) => {
      if (!r.fields) return;
      if (n % this.every !== 0) r.fields = null;
      else for (const a of Object.values(r.fields)) this.fieldBytes += a!.byteLength;
    });
  }

  /** The days and full maps kept so far (every keptEvery-th output record), oldest first. */
  keptMaps(): { days: number[]; maps: Array<Partial<Record<FieldName, Float32Array>>> } {
    const days: number[] = [];
    const maps: Array<Partial<Record<FieldName, Float32Array>>> = [];
    for (const r of this.records) {
      if (!r.fields) continue;
      days.push(r.sample.day);
      maps.push(r.fields);
    }
    return { days, maps };
  }

  snapshotCount(): number {
    return this.records.reduce((c, r) => c + (r.fields ? 1 : 0), 0);
  }

  /** The run so far as a RunData (every kept snapshot), or null before the first sample. */
  toRunData(): RunData | null {
    const setup = this.setup;
    if (!setup || this.records.length === 0) return null;
    const c = new RunCollector(setup, {
      snapshotEvery: 1,
      createdAt: this.startedAt,
      command: `run of ${setup.name} in the page`,
    });
    for (const r of this.records) {
      c.add({
        day: r.sample.day,
        step: r.step,
        fields: r.fields ?? {},
        integrals: r.sample.integrals,
        hovmoller: r.sample.hovmoller,
        probeValues: r.sample.probeValues,
      });
    }
    return c.finish();
  }
}

/**
 * Snapshot intervals the save form offers, in output records: multiples of what was kept
 * (1, 2, 5, 10, ... times), up to one that keeps only the first record.
 */
export function snapshotChoices(keptEvery: number, records: number): number[] {
  const out: number[] = [];
  for (const m of [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000]) {
    const k = m * keptEvery;
    out.push(k);
    if (k >= records - 1) break;
  }
  return out;
}
