// Ensemble statistics of a seed ensemble: per group of members (the members that share every
// varied value but the seed), the mean and standard deviation of each recorded field, of the
// Hovmoller rows, of the probe series and of the energy, record by record, in one pass
// (welford.ts). Members are added one at a time and not kept: memory is the accumulators', the
// same for 5 members as for 500.

import type { FieldName } from '../diagnostics/fields.ts';
import type { RunData } from '../io/run-data.ts';
import { WelfordAccumulator } from './welford.ts';

/** What every member of the statistics must share (taken from the first one added). */
export interface EnsembleShape {
  nx: number;
  ny: number;
  lon: Float64Array;
  lat: Float64Array;
  ocean: Uint8Array;
  days: Float64Array;
  fields: FieldName[];
  hovmollerRowLats: number[];
  hovmollerRequestedLats: number[];
  probes: Array<{ name: string; lon: number; lat: number }>;
}

export interface GroupStatistics {
  fields: WelfordAccumulator;
  hovmoller: WelfordAccumulator;
  probes: WelfordAccumulator;
  energy: WelfordAccumulator;
}

export class StatisticsShapeError extends Error {
  override name = 'StatisticsShapeError';
}

export class EnsembleStatistics {
  shape: EnsembleShape | null = null;
  readonly groups: GroupStatistics[] = [];

  constructor(
    readonly groupCount: number,
    /** The fields to take statistics of (null: every field the members recorded). */
    private readonly only: readonly FieldName[] | null = null,
  ) {}

  /** Bytes the accumulators take for members of this shape, before any is added. */
  static bytesFor(
    groups: number,
    nt: number,
    cells: number,
    fields: number,
    hovmoller: number,
    nx: number,
    probes: number,
  ): number {
    return 16 * groups * nt * (fields * cells + hovmoller * nx + fields * probes + 1);
  }

  get bytes(): number {
    return this.groups.reduce((s, g) => s + g.fields.bytes + g.hovmoller.bytes + g.probes.bytes + g.energy.bytes, 0);
  }

  private shapeOf(run: RunData): EnsembleShape {
    const fields = this.only ? this.only.filter((f) => run.fields.includes(f)) : [...run.fields];
    return {
      nx: run.grid.nx,
      ny: run.grid.ny,
      lon: run.grid.lon,
      lat: run.grid.lat,
      ocean: run.grid.ocean,
      days: run.days,
      fields,
      hovmollerRowLats: run.hovmoller.map((h) => h.rowLat),
      hovmollerRequestedLats: run.hovmoller.map((h) => h.requestedLat),
      probes: run.probes.map((p) => ({ name: p.name, lon: p.lon, lat: p.lat })),
    };
  }

  /** Why a member cannot join (another grid, other times...), or null. */
  private mismatch(a: EnsembleShape, run: RunData): string | null {
    const same = (x: ArrayLike<number>, y: ArrayLike<number>) =>
      x.length === y.length && Array.prototype.every.call(x, (v: number, k: number) => v === y[k]);
    if (run.grid.nx !== a.nx || run.grid.ny !== a.ny || !same(run.grid.lon, a.lon) || !same(run.grid.lat, a.lat))
      return `its grid (${run.grid.nx} x ${run.grid.ny}) is not the first member's (${a.nx} x ${a.ny})`;
    if (!same(run.grid.ocean, a.ocean)) return "its land mask is not the first member's";
    if (!same(run.days, a.days))
      return `its ${run.days.length} record times are not the first member's ${a.days.length}`;
    const missing = a.fields.find((f) => !run.fields.includes(f));
    if (missing) return `it has no field ${missing}`;
    if (
      !same(
        run.hovmoller.map((h) => h.rowLat),
        a.hovmollerRowLats,
      )
    )
      return "its Hovmoller rows are not the first member's";
    if (run.probes.length !== a.probes.length || run.probes.some((p, k) => p.name !== a.probes[k].name))
      return "its probes are not the first member's";
    if (run.snapshots.length !== run.days.length)
      return `it kept fields for ${run.snapshots.length} of its ${run.days.length} records`;
    return null;
  }

  /** Add one member to group g. Throws StatisticsShapeError when it does not fit the others. */
  add(group: number, run: RunData): void {
    if (!this.shape) {
      const shape = this.shapeOf(run);
      const nt = shape.days.length;
      const cells = shape.nx * shape.ny;
      for (let g = 0; g < this.groupCount; g++) {
        this.groups.push({
          fields: new WelfordAccumulator(nt * shape.fields.length * cells),
          hovmoller: new WelfordAccumulator(nt * shape.hovmollerRowLats.length * shape.nx),
          probes: new WelfordAccumulator(nt * shape.fields.length * shape.probes.length),
          energy: new WelfordAccumulator(nt),
        });
      }
      this.shape = shape;
    }
    const s = this.shape;
    const why = this.mismatch(s, run);
    if (why) throw new StatisticsShapeError(why);
    const g = this.groups[group];
    const nt = s.days.length;
    const cells = s.nx * s.ny;
    const nf = s.fields.length;
    g.fields.startMember();
    for (const snap of run.snapshots) {
      s.fields.forEach((f, q) => g.fields.addSlice((snap.index * nf + q) * cells, snap.fields[f]!));
    }
    g.fields.endMember();
    g.hovmoller.startMember();
    const nh = s.hovmollerRowLats.length;
    for (let n = 0; n < nt; n++) {
      for (let q = 0; q < nh; q++)
        g.hovmoller.addSlice((n * nh + q) * s.nx, run.hovmoller[q].values.subarray(n * s.nx, (n + 1) * s.nx));
    }
    g.hovmoller.endMember();
    g.probes.startMember();
    const np = s.probes.length;
    const row = new Float64Array(np);
    for (let n = 0; n < nt; n++) {
      for (let q = 0; q < nf; q++) {
        for (let p = 0; p < np; p++) row[p] = run.probes[p].series[s.fields[q]]![n];
        g.probes.addSlice((n * nf + q) * np, row);
      }
    }
    g.probes.endMember();
    g.energy.add(run.integrals.energy);
  }
}
