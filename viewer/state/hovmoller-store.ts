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

  add(day: number, rows: Float32Array[]): void {
    rows.forEach((values, n) => {
      if (this.rows[n]) this.rows[n].push({ day, values });
    });
  }

  /** Rows at latitude index n, oldest first. */
  at(n: number): readonly HovRow[] {
    return this.rows[n] ?? [];
  }

  /** The largest |value| so far along latitude n (for a symmetric colour range). */
  maxAbs(n: number): number {
    let m = 0;
    for (const r of this.at(n)) for (let i = 0; i < r.values.length; i++) {
      const a = Math.abs(r.values[i]);
      if (a > m) m = a;
    }
    return m;
  }
}
