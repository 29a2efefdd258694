// A saved run opened from the library: its snapshots on a map with a time slider, its Hovmoller
// diagram (with the Kelvin and long Rossby lines), its probe series, the wave speeds measured on
// it beside theory, and its report as a download. Everything shown is the run's saved output.

import type { RunData } from '../../model/io/run-data.ts';
import { measureWaves } from '../../model/report/measure.ts';
import { runReport } from '../../model/report/report.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { HovmollerPanel } from '../panels/hovmoller.ts';
import { ProbePanel } from '../panels/probes.ts';
import { mapFor } from '../render/colour-maps.ts';
import { latLabel } from '../render/geo.ts';
import { symmetricRange } from '../../model/display/conventions.ts';
import { autoRange, type Range } from '../state/colour-range.ts';
import { availableDisplays, displayField, fillDisplay, type DisplayKey } from '../state/display-fields.ts';
import { HovmollerStore } from '../state/hovmoller-store.ts';
import { ProbeStore } from '../state/probe-store.ts';
import { button, el } from './dom.ts';
import { download, fileSafe } from '../files.ts';
import { pulseStart } from '../state/characteristics.ts';
import { gridInfoOf } from './grid-info.ts';
import { MapBox } from './map-box.ts';
import { waveRows, wavesTable, type WaveRow } from './waves.ts';

/**
 * One colour range over every snapshot of a field, so colours mean the same while scrubbing:
 * for a signed field the rule of every view (the 99.5th percentile of |value|, rounded up).
 */
export function rangeOverSnapshots(run: RunData, key: DisplayKey): Range {
  const kind = displayField(key).kind;
  const out = new Float32Array(run.grid.nx * run.grid.ny);
  if (kind === 'diverging') {
    const all: Float32Array[] = [];
    for (const s of run.snapshots)
      if (fillDisplay(key, s.fields, run.physics.layerThickness, out)) all.push(out.slice());
    const m = symmetricRange(all);
    return { min: -m, max: m };
  }
  let r: Range | null = null;
  for (const s of run.snapshots) {
    if (!fillDisplay(key, s.fields, run.physics.layerThickness, out)) continue;
    const x = autoRange(out, kind);
    r = r ? { min: Math.min(r.min, x.min), max: Math.max(r.max, x.max) } : x;
  }
  return r ?? autoRange(out, kind);
}

export class RunView {
  readonly root: HTMLElement;
  private run: RunData | null = null;
  private label = '';
  private key: DisplayKey = 'h_anom';
  private range: Range | null = null;
  private readonly map = new MapBox('lib-view-map', 'map of the saved run', 520);
  private readonly title = el('h3', { id: 'lib-view-title' });
  private readonly field = el('select', { id: 'lib-view-field', 'aria-label': 'field of the saved run' });
  private readonly slider = el('input', {
    id: 'lib-view-slider',
    type: 'range',
    min: '0',
    max: '0',
    value: '0',
    step: '1',
    'aria-label': 'snapshot of the saved run',
  });
  private readonly day = el('span', { id: 'lib-view-day', className: 'day' });
  private readonly hovLat = el('select', {
    id: 'lib-view-hov-lat',
    'aria-label': 'Hovmoller latitude of the saved run',
  });
  private readonly hovCanvas = el('canvas', {
    id: 'lib-view-hov',
    width: 420,
    height: 280,
    className: 'lib-hov',
    'aria-label': 'Hovmoller diagram of the saved run',
  });
  private readonly probeField = el('select', {
    id: 'lib-view-probe-field',
    'aria-label': 'probe series field of the saved run',
  });
  private readonly probeHost = el('div', { id: 'lib-view-probes', className: 'lib-probe-chart' });
  private readonly probeList = el('ul', { className: 'probe-list' });
  private readonly waves = el('div', { id: 'lib-view-waves', className: 'lib-waves-box' });
  private readonly hovStore = new HovmollerStore();
  private readonly probeStore = new ProbeStore();
  private readonly hov: HovmollerPanel;
  private readonly probes: ProbePanel;
  lastWaves: WaveRow[] = [];

  constructor(private readonly say: (text: string, kind?: 'error' | 'info') => void) {
    const report = button('Report (HTML)', {
      id: 'lib-view-report',
      title: 'Download the one-page report of this run',
    });
    const close = button('Close', { id: 'lib-view-close' });
    this.root = el(
      'div',
      { id: 'lib-view', className: 'lib-view', hidden: true },
      el('div', { className: 'row' }, this.title, report, close),
      el(
        'div',
        { className: 'row small' },
        el('label', {}, 'Map shows ', this.field),
        el('label', { className: 'lib-scrub' }, 'Saved map ', this.slider),
        this.day,
      ),
      this.map.root,
      el('h4', {}, 'Measured against theory'),
      this.waves,
      el(
        'div',
        { className: 'split' },
        el(
          'div',
          {},
          el('h4', {}, 'Hovmoller diagram'),
          el(
            'div',
            { className: 'row small' },
            el('label', {}, 'Latitude ', this.hovLat),
            el(
              'span',
              { className: 'hint' },
              'Kelvin wave (east at c) solid, long Rossby wave (west at c/3) dashed; a click moves their start',
            ),
          ),
          this.hovCanvas,
        ),
        el(
          'div',
          {},
          el('h4', {}, 'Probes'),
          el('div', { className: 'row small' }, el('label', {}, 'Series ', this.probeField)),
          this.probeHost,
          this.probeList,
        ),
      ),
    );
    this.hov = new HovmollerPanel(this.hovCanvas, this.hovStore, () => undefined);
    this.probes = new ProbePanel(this.probeHost, this.probeList, this.probeStore, () => undefined);
    this.field.addEventListener('change', () => {
      this.key = this.field.value as DisplayKey;
      this.range = null;
      this.drawMap();
    });
    this.slider.addEventListener('input', () => this.drawMap());
    this.hovLat.addEventListener('change', () => {
      this.hov.setLatitude(Number(this.hovLat.value));
      this.hov.draw();
    });
    this.probeField.addEventListener('change', () => {
      this.probes.key = this.probeField.value as DisplayKey;
      this.probes.draw();
    });
    report.addEventListener('click', () => {
      if (!this.run) return;
      try {
        download(
          runReport(this.run, { source: `the run library ('${this.label}')` }),
          `${fileSafe(this.label)}-report.html`,
          'text/html',
        );
      } catch (e) {
        this.say(`Report of '${this.label}': ${(e as Error).message}`);
      }
    });
    close.addEventListener('click', () => this.close());
  }

  get shown(): string | null {
    return this.run ? this.label : null;
  }

  close(): void {
    this.run = null;
    this.root.hidden = true;
  }

  show(run: RunData, label: string): void {
    this.run = run;
    this.label = label;
    this.root.hidden = false;
    this.title.textContent = `Saved run: ${label}`;
    const avail = availableDisplays(run.fields);
    for (const sel of [this.field, this.probeField]) {
      const keep = sel.value;
      sel.replaceChildren(...avail.map((d) => new Option(`${d.label} (${d.units})`, d.key)));
      if (avail.some((d) => d.key === keep)) sel.value = keep;
    }
    this.key = (this.field.value || 'h_anom') as DisplayKey;
    this.range = null;
    this.slider.max = String(Math.max(0, run.snapshots.length - 1));
    this.slider.value = String(Math.max(0, run.snapshots.length - 1));
    this.slider.disabled = run.snapshots.length < 2;
    try {
      this.map.setGrid(gridInfoOf(run.grid));
    } catch (e) {
      this.say(`The saved run's map cannot be drawn: ${(e as Error).message}`);
    }
    this.drawMap();

    // Hovmoller: every record of every saved section.
    this.hovStore.reset(run.hovmoller.map((h) => h.rowLat));
    const nx = run.grid.nx;
    for (let n = 0; n < run.days.length; n++)
      this.hovStore.add(
        run.days[n],
        run.hovmoller.map((h) => h.values.subarray(n * nx, (n + 1) * nx)),
      );
    this.hovLat.replaceChildren(...run.hovmoller.map((h, k) => new Option(latLabel(h.rowLat), String(k))));
    const g = gridInfoOf(run.grid);
    this.hov.setRun(
      { lonWest: g.lonWest, lonEast: g.lonEast, days: run.days[run.days.length - 1], nx },
      run.physics.waveSpeed,
      run.physics.earthRadius,
      pulseStart(run.scenarioJson),
    );
    this.hov.draw();

    // Probe series, as the live chart draws them.
    this.probeStore.reset(run.fields, run.probes);
    for (let n = 0; n < run.days.length; n++)
      this.probeStore.addSample(
        run.days[n],
        run.probes.map((p) => Float32Array.from(run.fields, (f) => p.series[f]![n])),
      );
    this.probes.key = (this.probeField.value || 'h_anom') as DisplayKey;
    this.probes.layerThickness = run.physics.layerThickness;
    this.probes.renderList();
    this.probes.draw();

    this.lastWaves = waveRows(measureWaves(run));
    this.waves.replaceChildren(
      wavesTable(
        this.lastWaves,
        `${label}: g′ = ${formatValue(run.physics.reducedGravity)} m s-2, H = ${formatValue(run.physics.layerThickness)} m`,
      ),
    );
    this.root.scrollIntoView({ block: 'nearest' });
  }

  private drawMap(): void {
    const run = this.run;
    if (!run) return;
    const s = run.snapshots[Number(this.slider.value)];
    if (!s) {
      this.day.textContent = 'this run was saved without snapshots';
      return;
    }
    this.day.textContent = `day ${s.day.toFixed(1)} (snapshot ${Number(this.slider.value) + 1} of ${run.snapshots.length})`;
    const df = displayField(this.key);
    const out = new Float32Array(run.grid.nx * run.grid.ny);
    if (!fillDisplay(this.key, s.fields, run.physics.layerThickness, out)) return;
    this.range ??= rangeOverSnapshots(run, this.key);
    this.map.setTitle(`${this.label}, day ${s.day.toFixed(1)}`);
    this.map.draw(out, this.range, mapFor(this.key), df.label, df.units, run.probes);
  }
}
