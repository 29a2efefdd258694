// Time series at probe points. The scenario's probes arrive in the engine's samples from day 0;
// probes added on the page read the frames' fields at their cell from then on (and from the
// frames still kept for scrubbing, so they start with some history).

import type { FieldName } from '../../model/diagnostics/fields.ts';
import type { Frame } from '../../worker/protocol.ts';

export interface ProbeSeries {
  id: string;
  name: string;
  lon: number;
  lat: number;
  origin: 'scenario' | 'page';
  /** Index into centred fields (page probes only). */
  cell: number;
  days: number[];
  values: Partial<Record<FieldName, number[]>>;
  /** For a page probe: where its series came from ("days 0 to 35 from the kept maps"). */
  note?: string;
}

export class ProbeStore {
  probes: ProbeSeries[] = [];
  private fields: FieldName[] = [];
  private counter = 0;

  reset(fields: FieldName[], scenarioProbes: Array<{ name: string; lon: number; lat: number }>): void {
    this.fields = [...fields];
    this.counter = 0;
    this.probes = scenarioProbes.map((p, n) => this.blank(`s${n}`, p.name, p.lon, p.lat, 'scenario', -1));
  }

  /** Clear the series but keep the probes (a restart of the same run). */
  clearSeries(): void {
    for (const p of this.probes) {
      p.days = [];
      for (const f of this.fields) p.values[f] = [];
    }
  }

  private blank(
    id: string,
    name: string,
    lon: number,
    lat: number,
    origin: ProbeSeries['origin'],
    cell: number,
  ): ProbeSeries {
    const values: ProbeSeries['values'] = {};
    for (const f of this.fields) values[f] = [];
    return { id, name, lon, lat, origin, cell, days: [], values };
  }

  /** Samples: probeValues[p][field index] for the scenario's probes, in order. */
  addSample(day: number, probeValues: Float32Array[]): void {
    const sc = this.probes.filter((p) => p.origin === 'scenario');
    probeValues.forEach((vals, n) => {
      const p = sc[n];
      if (!p) return;
      p.days.push(day);
      this.fields.forEach((f, i) => p.values[f]!.push(vals[i]));
    });
  }

  /**
   * A page probe's series before it was added, from kept maps: `days` in order, `fields` the
   * full maps of those days. Replaces what the probe had.
   */
  fillPageProbe(p: ProbeSeries, days: readonly number[], maps: ReadonlyArray<Frame['fields']>): void {
    p.days = [...days];
    for (const f of this.fields) p.values[f] = maps.map((m) => (m[f] ? m[f]![p.cell] : NaN));
  }

  /** A frame's (or a sample's) fields at every page probe's cell. */
  addFrame(day: number, fields: Frame['fields']): void {
    for (const p of this.probes) {
      if (p.origin !== 'page') continue;
      const last = p.days[p.days.length - 1];
      if (last !== undefined && day <= last) continue;
      p.days.push(day);
      for (const f of this.fields) p.values[f]!.push(fields[f] ? fields[f]![p.cell] : NaN);
    }
  }

  addPageProbe(lon: number, lat: number, cell: number): ProbeSeries {
    this.counter++;
    const p = this.blank(`p${this.counter}`, `P${this.counter}`, lon, lat, 'page', cell);
    this.probes.push(p);
    return p;
  }

  remove(id: string): void {
    this.probes = this.probes.filter((p) => p.id !== id);
  }
}

/**
 * uPlot wants one shared x: the union of every probe's days, with null where a probe has no
 * value on a day.
 */
export function alignSeries(series: Array<{ days: number[]; values: number[] }>): {
  x: number[];
  ys: (number | null)[][];
} {
  const all = new Set<number>();
  for (const s of series) for (const d of s.days) all.add(d);
  const x = [...all].sort((a, b) => a - b);
  const where = new Map(x.map((d, i) => [d, i]));
  const ys = series.map((s) => {
    const y: (number | null)[] = new Array(x.length).fill(null);
    s.days.forEach((d, i) => {
      const v = s.values[i];
      y[where.get(d)!] = Number.isFinite(v) ? v : null;
    });
    return y;
  });
  return { x, ys };
}
