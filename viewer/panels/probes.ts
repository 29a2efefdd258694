// Probe time series: one chart (uPlot draws the lines and axes), one line per probe, the field
// chosen above it, and a legend of our own above the chart: the day under the pointer (or the
// newest day) and each probe's value then, a probe without a value on that exact day showing its
// nearest one, so a probe added during a run is never blank.

import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { placeLabel } from '../render/geo.ts';
import { displayAt, type DisplayKey, displayField } from '../state/display-fields.ts';
import { alignSeries, type ProbeStore } from '../state/probe-store.ts';
import { formatValue } from './colour-bar.ts';

// Distinct line colours (Okabe and Ito's colour-blind-safe set, common practice).
const COLOURS = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#000000', '#F0E442'];

export function probeColour(n: number): string {
  return COLOURS[n % COLOURS.length];
}

/** The value of a series nearest to `day` (by day), or NaN when it has none. */
export function nearestValue(
  days: readonly number[],
  values: readonly number[],
  day: number,
): { day: number; value: number } | null {
  if (days.length === 0) return null;
  let lo = 0;
  let hi = days.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (days[mid] <= day) lo = mid;
    else hi = mid;
  }
  const k = Math.abs(days[hi] - day) < Math.abs(days[lo] - day) ? hi : lo;
  return { day: days[k], value: values[k] };
}

export class ProbePanel {
  private plot: uPlot | null = null;
  private signature = '';
  private series: Array<{ days: number[]; values: number[] }> = [];
  private x: number[] = [];
  readonly legend: HTMLElement;
  key: DisplayKey = 'h_anom';
  layerThickness = 150;
  height = 220;

  constructor(
    private readonly host: HTMLElement,
    private readonly list: HTMLUListElement,
    private readonly store: ProbeStore,
    private readonly onRemove: (id: string) => void,
  ) {
    this.legend = document.createElement('div');
    this.legend.className = 'probe-legend';
    if (host.id) this.legend.id = `${host.id}-legend`;
    host.before(this.legend);
  }

  /** Rebuild the list of probes (names, places, where their series start, remove buttons). */
  renderList(): void {
    this.list.replaceChildren(
      ...this.store.probes.map((p, n) => {
        const li = document.createElement('li');
        const dot = document.createElement('span');
        dot.className = 'dot';
        dot.style.background = probeColour(n);
        const text = document.createElement('span');
        text.textContent = `${p.name} (${placeLabel(p.lon, p.lat)})${p.origin === 'scenario' ? ', from the scenario' : p.note ? `, ${p.note}` : ''}`;
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
    this.series = probes.map((p) => {
      const vals: number[] = [];
      for (let k = 0; k < p.days.length; k++) vals.push(displayAt(this.key, p.values, this.layerThickness, k));
      return { days: p.days, values: vals };
    });
    const { x, ys } = alignSeries(this.series);
    this.x = x;
    // Names too: a new scenario reuses probe ids, and its legend must not keep the old names.
    const sig = `${this.key}|${probes.map((p) => `${p.id}:${p.name}`).join(',')}`;
    const width = Math.max(280, this.host.clientWidth || 400);
    if (!this.plot || sig !== this.signature) {
      this.plot?.destroy();
      this.signature = sig;
      this.plot = new uPlot(
        {
          width,
          height: this.height,
          scales: { x: { time: false } },
          axes: [{ label: 'day' }, { label: info.units, size: 56 }],
          series: [
            { label: 'day' },
            ...probes.map((p, n) => ({ label: p.name, stroke: probeColour(n), width: 1.5, spanGaps: true })),
          ],
          // The legend is ours (above the chart); uPlot's own stays off.
          legend: { show: false },
          hooks: { setCursor: [(u: uPlot) => this.showLegend(u.cursor.idx ?? null)] },
        },
        [x, ...ys] as uPlot.AlignedData,
        this.host,
      );
      this.host.dataset.series = String(probes.length);
    } else {
      if (Math.abs(this.plot.width - width) > 4) this.plot.setSize({ width, height: this.height });
      this.plot.setData([x, ...ys] as uPlot.AlignedData);
    }
    this.host.dataset.points = String(x.length);
    for (const li of this.list.children) {
      const p = probes[[...this.list.children].indexOf(li)];
      if (p) (li as HTMLElement).dataset.points = String(p.days.length);
    }
    if (this.plot.cursor.idx === null || this.plot.cursor.idx === undefined) this.showLegend(null);
  }

  /** The legend at the day under the pointer (index into the shared days), or at the newest day. */
  private showLegend(idx: number | null): void {
    const probes = this.store.probes;
    const units = displayField(this.key).units;
    const day = idx !== null && idx >= 0 && idx < this.x.length ? this.x[idx] : this.x[this.x.length - 1];
    const head = document.createElement('span');
    head.className = 'day';
    head.textContent = day === undefined ? 'no values yet' : `day ${day.toFixed(1)}${idx === null ? ' (newest)' : ''}`;
    const keys = probes.map((p, n) => {
      const s = this.series[n];
      const near = s && day !== undefined ? nearestValue(s.days, s.values, day) : null;
      const k = document.createElement('span');
      k.className = 'key';
      k.dataset.probe = p.name;
      const line = document.createElement('span');
      line.className = 'line';
      line.style.borderColor = probeColour(n);
      const v =
        near && Number.isFinite(near.value)
          ? `${formatValue(near.value)} ${units}${Math.abs(near.day - day!) > 1e-9 ? ` (day ${near.day.toFixed(1)})` : ''}`
          : '—';
      k.append(line, `${p.name}: ${v}`);
      return k;
    });
    this.legend.replaceChildren(head, ...keys);
  }

  /** The chart's canvas for the PNG export. */
  canvas(): HTMLCanvasElement | null {
    return this.plot ? this.plot.ctx.canvas : null;
  }
}
