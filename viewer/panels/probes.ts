// Probe time series with uPlot: one chart, one line per probe, the field chosen above it.

import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { displayAt, type DisplayKey, displayField } from '../state/display-fields.ts';
import { alignSeries, type ProbeStore } from '../state/probe-store.ts';

// Distinct line colours (Okabe and Ito's colour-blind-safe set, common practice).
const COLOURS = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#000000', '#F0E442'];

export function probeColour(n: number): string {
  return COLOURS[n % COLOURS.length];
}

export class ProbePanel {
  private plot: uPlot | null = null;
  private signature = '';
  key: DisplayKey = 'h_anom';
  layerThickness = 150;

  constructor(
    private readonly host: HTMLElement,
    private readonly list: HTMLUListElement,
    private readonly store: ProbeStore,
    private readonly onRemove: (id: string) => void,
  ) {}

  /** Rebuild the list of probes (names, places, remove buttons). */
  renderList(): void {
    this.list.replaceChildren(
      ...this.store.probes.map((p, n) => {
        const li = document.createElement('li');
        const dot = document.createElement('span');
        dot.className = 'dot';
        dot.style.background = probeColour(n);
        const text = document.createElement('span');
        text.textContent = `${p.name} (${p.lon.toFixed(2)}°, ${p.lat.toFixed(2)}°)${p.origin === 'scenario' ? ', from the scenario' : ''}`;
        li.append(dot, text);
        if (p.origin === 'page') {
          const b = document.createElement('button');
          b.type = 'button';
          b.textContent = 'remove';
          b.setAttribute('aria-label', `remove probe ${p.name}`);
          b.addEventListener('click', () => this.onRemove(p.id));
          li.append(b);
        }
        li.dataset.points = String(p.days.length);
        return li;
      }),
    );
  }

  draw(): void {
    const probes = this.store.probes;
    const info = displayField(this.key);
    const series = probes.map((p) => {
      const vals: number[] = [];
      for (let k = 0; k < p.days.length; k++) vals.push(displayAt(this.key, p.values, this.layerThickness, k));
      return { days: p.days, values: vals };
    });
    const { x, ys } = alignSeries(series);
    // Names too: a new scenario reuses probe ids, and its legend must not keep the old names.
    const sig = `${this.key}|${probes.map((p) => `${p.id}:${p.name}`).join(',')}`;
    const width = Math.max(280, this.host.clientWidth || 400);
    if (!this.plot || sig !== this.signature) {
      this.plot?.destroy();
      this.signature = sig;
      this.plot = new uPlot(
        {
          width,
          height: 240,
          scales: { x: { time: false } },
          axes: [{ label: 'day' }, { label: info.units, size: 60 }],
          series: [{ label: 'day' }, ...probes.map((p, n) => ({ label: p.name, stroke: probeColour(n), width: 1.5, spanGaps: true }))],
          legend: { show: true },
        },
        [x, ...ys] as uPlot.AlignedData,
        this.host,
      );
      this.host.dataset.series = String(probes.length);
    } else {
      this.plot.setData([x, ...ys] as uPlot.AlignedData);
    }
    this.host.dataset.points = String(x.length);
    for (const li of this.list.children) {
      const p = probes[[...this.list.children].indexOf(li)];
      if (p) (li as HTMLElement).dataset.points = String(p.days.length);
    }
  }

  /** The chart's canvas for the PNG export. */
  canvas(): HTMLCanvasElement | null {
    return this.plot ? this.plot.ctx.canvas : null;
  }
}
