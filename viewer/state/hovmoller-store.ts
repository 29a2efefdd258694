// Rows of the Hovmoller diagrams as they arrive, one list per latitude. The engine's samples
// come at every output interval and are never dropped, so the diagram has no gaps.

export interface HovRow {
  day: number;
  values: Float32Array;
}

export class HovmollerStore {
  private rows: HovRow[][] = [];
  lats: number[] = [];

  reset(lats: number[]): void {
    this.lats = [...lats];
    this.rows = lats.map(() => []);
  }

  /**
   * A latitude added during a run: earlier days come from `backfill` (rows cut from the frames the
   * page kept), later ones from the samples, which carry it at `index` from now on.
   */
  addLatitude(index: number, lat: number, backfill: HovRow[]): void {
    this.lats[index] = lat;
    this.rows[index] = [...backfill].sort((a, b) => a.day - b.day);
  }

  add(day: number, rows: Float32Array[]): void {
    rows.forEach((values, n) => {
      const list = this.rows[n];
      // A backfilled latitude may already hold this day from a kept frame.
      if (list && !(list.length && list[list.length - 1].day >= day)) list.push({ day, values });
    });
  }

  /** Rows at latitude index n, oldest first. */
  at(n: number): readonly HovRow[] {
    return this.rows[n] ?? [];
  }

  /** The largest |value| so far along latitude n (for a symmetric colour range). */
  maxAbs(n: number): number {
    let m = 0;
    for (const r of this.at(n))
      for (let i = 0; i < r.values.length; i++) {
        const a = Math.abs(r.values[i]);
        if (a > m) m = a;
      }
    return m;
  }
}
