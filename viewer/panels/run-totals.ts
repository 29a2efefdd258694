// The "Run totals" list: the run's fixed numbers (dt, c, crossing time) and, as frames arrive, what
// the run has done: the layer volume the sponges took or gave (and entrainment), the fastest flow
// now and over the run, the Courant number of the scheme. The numbers come from the engine's
// integrals; the page only lays them out.

import type { Integrals } from '../../model/diagnostics/integrals.ts';
import { formatValue } from './colour-bar.ts';

export class RunTotals {
  private fixed: Array<[string, string]> = [];
  private start: Integrals | null = null;
  private fastest: Integrals | null = null;
  private nonlinear = false;

  constructor(private readonly list: HTMLElement) {}

  /** A new run: its fixed rows; the running ones start over. */
  setRun(rows: Array<[string, string]>, dynamics: string): void {
    this.fixed = rows;
    this.start = null;
    this.fastest = null;
    this.nonlinear = dynamics === 'nonlinear';
    this.render(null);
  }

  /** The integrals of every output sample, in order, then of the frame shown. */
  add(samples: readonly Integrals[], latest: Integrals): void {
    for (const s of samples) {
      this.start ??= s;
      if (!this.fastest || s.maxSpeed > this.fastest.maxSpeed) this.fastest = s;
    }
    this.render(latest);
  }

  private render(now: Integrals | null): void {
    const rows = [...this.fixed];
    if (now && this.start) {
      const v0 = this.start.volume;
      const share = (x: number) => `${x >= 0 ? '+' : '\u2212'}${formatValue(Math.abs((100 * x) / v0))} %`;
      rows.push([
        'Volume by sponges',
        Number.isFinite(now.spongeVolume) ? `${share(now.spongeVolume)} of the layer` : '\u2013',
      ]);
      if (this.nonlinear) rows.push(['Volume by entrainment', `${share(now.entrainedVolume)} of the layer`]);
      const f = this.fastest;
      rows.push([
        'Fastest flow',
        `${formatValue(now.maxSpeed)} m/s${f && f.maxSpeed > now.maxSpeed ? ` (run: ${formatValue(f.maxSpeed)} on day ${f.day.toFixed(0)})` : ''}`,
      ]);
      rows.push(['Courant number', formatValue(now.courant)]);
    }
    this.list.replaceChildren(
      ...rows.flatMap(([k, v]) => [
        Object.assign(document.createElement('dt'), { textContent: k }),
        Object.assign(document.createElement('dd'), { textContent: v }),
      ]),
    );
  }
}
