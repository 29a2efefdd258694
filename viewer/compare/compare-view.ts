// Comparing two runs, B minus A (model/compare does the arithmetic): the difference map at a
// matching model time in the diverging colours, A and B side by side on one shared colour range,
// the Hovmoller diagrams side by side with their difference, the probe series overlaid, the
// scenario differences, and each run's measured wave speeds beside theory. When the runs are on
// different grids the page says which was interpolated; with no common times it says so plainly.

import uPlot from 'uplot';
import { compareRuns, type RunComparison } from '../../model/compare/compare.ts';
import { FIELD_INFO, type FieldName } from '../../model/diagnostics/fields.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { measureWaves } from '../../model/report/measure.ts';
import { probeColour } from '../panels/probes.ts';
import { latLabel } from '../render/geo.ts';
import { fieldLabel, fieldName } from '../state/display-fields.ts';
import { button, el } from '../library-panel/dom.ts';
import { gridInfoOf } from '../library-panel/grid-info.ts';
import { MapBox } from '../library-panel/map-box.ts';
import { waveRows, wavesTable, type WaveRow } from '../library-panel/waves.ts';
import { drawHovmoller, type TheoryStart } from './hov-image.ts';
import { pulseStart } from '../state/characteristics.ts';
import { differenceRange, maxAbs, sharedRange } from './ranges.ts';
import { differenceRows, differenceTable, type DifferenceRow } from './scenario-table.ts';

export interface CompareChoice {
  value: string;
  label: string;
}

export interface CompareHost {
  /** The run behind a choice (a saved run's id, or 'live'); null after saying why there is none. */
  runFor(value: string): Promise<{ run: RunData; label: string } | null>;
  say(text: string, kind?: 'error' | 'info'): void;
}

/** What the tests read back (see window.__pycnoLibrary). */
export interface CompareState {
  status: string;
  message: string;
  gridNote: string;
  commonTimes: number;
  fieldTimes: number;
  shownDay: number | null;
  field: FieldName | null;
  maxAbsShown: number | null;
  table: DifferenceRow[];
  waves: { a: WaveRow[]; b: WaveRow[] };
  labels: [string, string];
}

const MAP_W = 380;

export class CompareView {
  readonly root: HTMLElement;
  private readonly pickA = el('select', { id: 'cmp-a', 'aria-label': 'run A' });
  private readonly pickB = el('select', { id: 'cmp-b', 'aria-label': 'run B' });
  private readonly status = el('p', { id: 'cmp-status', className: 'cmp-status', 'aria-live': 'polite' });
  private readonly body = el('div', { id: 'cmp-body', hidden: true });
  private readonly field = el('select', { id: 'cmp-field', 'aria-label': 'field compared' });
  private readonly slider = el('input', {
    id: 'cmp-slider',
    type: 'range',
    min: '0',
    max: '0',
    value: '0',
    step: '1',
    'aria-label': 'matching model time',
  });
  private readonly day = el('span', { id: 'cmp-day', className: 'day' });
  private readonly mapA = new MapBox('cmp-map-a', 'map of run A', MAP_W);
  private readonly mapB = new MapBox('cmp-map-b', 'map of run B', MAP_W);
  private readonly mapD = new MapBox('cmp-map-diff', 'difference map, B minus A', MAP_W);
  private readonly mapNote = el('p', { id: 'cmp-map-note', className: 'hint' });
  private readonly hovLat = el('select', { id: 'cmp-hov-lat', 'aria-label': 'Hovmoller latitude compared' });
  private readonly hovA = el('canvas', { id: 'cmp-hov-a', width: 300, height: 240, className: 'lib-hov' });
  private readonly hovB = el('canvas', { id: 'cmp-hov-b', width: 300, height: 240, className: 'lib-hov' });
  private readonly hovD = el('canvas', { id: 'cmp-hov-diff', width: 300, height: 240, className: 'lib-hov' });
  private readonly probeField = el('select', { id: 'cmp-probe-field', 'aria-label': 'probe series field compared' });
  private readonly probeHost = el('div', { id: 'cmp-probes', className: 'lib-probe-chart' });
  private readonly table = el('div', { id: 'cmp-table' });
  private readonly waves = el('div', { id: 'cmp-waves', className: 'lib-waves-box' });
  private cmp: RunComparison | null = null;
  private labels: [string, string] = ['A', 'B'];
  private theory: [TheoryStart | null, TheoryStart | null] = [null, null];
  private plot: uPlot | null = null;
  state: CompareState | null = null;

  constructor(private readonly host: CompareHost) {
    const go = button('Compare', { id: 'cmp-go', title: 'Compare run B with run A (B minus A)' });
    const swap = button('Swap', { id: 'cmp-swap', title: 'Swap A and B' });
    this.root = el(
      'div',
      { className: 'cmp' },
      el(
        'div',
        { className: 'row' },
        el('label', {}, 'A ', this.pickA),
        el('label', {}, 'B ', this.pickB),
        swap,
        go,
        el('span', { className: 'hint' }, 'differences are B minus A'),
      ),
      this.status,
      el('div', {}, this.body),
    );
    this.body.append(
      el(
        'div',
        { className: 'row small' },
        el('label', {}, 'Map shows ', this.field),
        el('label', { className: 'lib-scrub' }, 'Day in both runs ', this.slider),
        this.day,
      ),
      el('div', { className: 'cmp-maps' }, this.mapA.root, this.mapB.root, this.mapD.root),
      this.mapNote,
      el('h4', {}, 'Hovmoller diagrams'),
      el(
        'p',
        { className: 'legend' },
        el('span', { className: 'swatch kelvin' }),
        ' Kelvin wave, east at c ',
        el('span', { className: 'swatch rossby' }),
        ' long Rossby wave, west at c/3, from each run\u2019s pulsed wind patch; A and B on one colour scale, B \u2212 A on its own',
      ),
      el('div', { className: 'row small' }, el('label', {}, 'Latitude ', this.hovLat)),
      el('div', { className: 'cmp-hovs' }, this.hovA, this.hovB, this.hovD),
      el('h4', {}, 'Probes (A solid, B dashed)'),
      el('div', { className: 'row small' }, el('label', {}, 'Series ', this.probeField)),
      this.probeHost,
      el('h4', {}, 'Scenario differences'),
      this.table,
      el('h4', {}, 'Measured against theory'),
      this.waves,
    );
    go.addEventListener('click', () => void this.compare());
    swap.addEventListener('click', () => {
      const a = this.pickA.value;
      this.pickA.value = this.pickB.value;
      this.pickB.value = a;
    });
    this.field.addEventListener('change', () => this.drawMaps());
    this.slider.addEventListener('input', () => this.drawMaps());
    this.hovLat.addEventListener('change', () => this.drawHovs());
    this.probeField.addEventListener('change', () => this.drawProbes());
  }

  /** The runs to pick from (saved runs and the live one); keeps the picks that still exist. */
  setChoices(choices: CompareChoice[]): void {
    for (const [sel, fallback] of [
      [this.pickA, 1],
      [this.pickB, 0],
    ] as const) {
      const keep = sel.value;
      sel.replaceChildren(...choices.map((c) => new Option(c.label, c.value)));
      if (choices.some((c) => c.value === keep)) sel.value = keep;
      // By default A is the older of the two newest saved runs, B the newest.
      else if (choices.length) sel.value = choices[Math.min(fallback, choices.length - 1)].value;
    }
  }

  /** Pick two runs by value (the library's "compare" shortcut). */
  pick(a: string, b: string): void {
    this.pickA.value = a;
    this.pickB.value = b;
  }

  async compare(): Promise<void> {
    const va = this.pickA.value;
    const vb = this.pickB.value;
    if (!va || !vb) {
      this.showStatus('Pick two runs: save a run first (or pick the run on screen).', true);
      return;
    }
    const [a, b] = await Promise.all([this.host.runFor(va), this.host.runFor(vb)]);
    if (!a || !b) return;
    this.labels = [a.label, b.label];
    const theoryOf = (run: RunData): TheoryStart | null => {
      const s = pulseStart(run.scenarioJson);
      return s ? { ...s, c: run.physics.waveSpeed } : null;
    };
    this.theory = [theoryOf(a.run), theoryOf(b.run)];
    let cmp: RunComparison;
    try {
      cmp = compareRuns(a.run, b.run);
    } catch (e) {
      this.showStatus(`These runs cannot be compared: ${(e as Error).message}`, true);
      return;
    }
    this.cmp = cmp;
    const rows = differenceRows(cmp.scenario);
    this.table.replaceChildren(differenceTable(rows));
    const wa = waveRows(measureWaves(a.run));
    const wb = waveRows(measureWaves(b.run));
    this.waves.replaceChildren(wavesTable(wa, `A: ${a.label}`), wavesTable(wb, `B: ${b.label}`));
    this.state = {
      status: cmp.status,
      message: cmp.message,
      gridNote: cmp.grid?.note ?? '',
      commonTimes: cmp.commonTimes.length,
      fieldTimes: cmp.fieldTimes.length,
      shownDay: null,
      field: null,
      maxAbsShown: null,
      table: rows,
      waves: { a: wa, b: wb },
      labels: this.labels,
    };
    this.body.hidden = false;
    if (cmp.status !== 'ok') {
      // Said plainly; the scenario table and the wave speeds still tell something.
      this.showStatus(`A: ${a.label}; B: ${b.label}. Nothing to set side by side: ${cmp.message}.`, true);
      this.setSectionsVisible(false);
      return;
    }
    this.setSectionsVisible(true);
    this.showStatus(
      `A: ${a.label}; B: ${b.label}. Grid: ${cmp.grid!.note}. ${cmp.commonTimes.length} matching times (within ${+cmp.toleranceDays.toFixed(3)} days), ${cmp.fieldTimes.length} with maps in both.`,
      false,
    );
    const opts = cmp.fields.map((f) => new Option(fieldLabel(f), f));
    for (const sel of [this.field, this.probeField]) {
      const keep = sel.value;
      sel.replaceChildren(...opts.map((o) => new Option(o.text, o.value)));
      sel.value = cmp.fields.includes(keep as FieldName)
        ? keep
        : cmp.fields.includes('h_anom')
          ? 'h_anom'
          : cmp.fields[0];
    }
    const ft = cmp.fieldTimes;
    this.slider.max = String(Math.max(0, ft.length - 1));
    this.slider.value = String(Math.max(0, ft.length - 1));
    this.slider.disabled = ft.length < 2;
    const g = gridInfoOf(cmp.grid!);
    for (const m of [this.mapA, this.mapB, this.mapD]) {
      try {
        m.setGrid(g);
      } catch (e) {
        this.host.say(`The comparison maps cannot be drawn: ${(e as Error).message}`);
      }
    }
    this.hovLat.replaceChildren(...cmp.hovmoller.map((h, k) => new Option(latLabel(h.rowLatA), String(k))));
    this.drawMaps();
    this.drawHovs();
    this.drawProbes();
  }

  private setSectionsVisible(on: boolean): void {
    for (const c of this.body.children) {
      const keep =
        c === this.table || c === this.waves || (c.tagName === 'H4' && /Scenario|Measured/.test(c.textContent ?? ''));
      (c as HTMLElement).hidden = !on && !keep;
    }
  }

  private showStatus(text: string, bad: boolean): void {
    this.status.textContent = text;
    this.status.classList.toggle('bad', bad);
  }

  private drawMaps(): void {
    const cmp = this.cmp;
    if (cmp?.status !== 'ok') return;
    const f = this.field.value as FieldName;
    const ft = cmp.fieldTimes;
    if (ft.length === 0) {
      this.mapNote.textContent =
        'No matching time has maps in both runs (they were saved with other snapshot intervals); the series below are still compared.';
      return;
    }
    const k = ft[Number(this.slider.value)];
    const t = cmp.commonTimes[k];
    const a = cmp.fieldA(k, f)!;
    const b = cmp.fieldB(k, f)!;
    const d = cmp.difference(k, f)!;
    const shared = sharedRange(a, b);
    const units = FIELD_INFO[f].units;
    const [la, lb] = this.labels;
    this.mapA.setTitle(`A: ${la}, day ${t.dayA.toFixed(1)}`);
    this.mapB.setTitle(`B: ${lb}, day ${t.dayB.toFixed(1)}`);
    this.mapD.setTitle(`B − A, day ${t.day.toFixed(1)}`);
    this.mapA.draw(a, shared, 'anomaly', `${fieldName(f)}, A and B on one scale`, units);
    this.mapB.draw(b, shared, 'anomaly', `${fieldName(f)}, A and B on one scale`, units);
    const m = maxAbs(d);
    this.mapD.draw(d, differenceRange(d), 'anomaly', `${fieldName(f)}, B − A`, units);
    this.day.textContent = `day ${t.day.toFixed(1)} (${Number(this.slider.value) + 1} of ${ft.length})`;
    this.mapNote.textContent = `Largest |B − A| of the ${fieldName(f).toLowerCase()} at this time: ${m.toPrecision(3)} ${units}; over the whole run: ${(cmp.maxAbsDifference[f] ?? NaN).toPrecision(3)} ${units}.`;
    if (this.state) Object.assign(this.state, { shownDay: t.day, field: f, maxAbsShown: m });
  }

  private drawHovs(): void {
    const cmp = this.cmp;
    if (cmp?.status !== 'ok') return;
    const h = cmp.hovmoller[Number(this.hovLat.value)];
    if (!h) {
      for (const c of [this.hovA, this.hovB, this.hovD]) c.getContext('2d')?.clearRect(0, 0, c.width, c.height);
      return;
    }
    const s = sharedRange(h.a, h.b).max;
    drawHovmoller(this.hovA, h.lon, h.days, h.a, s, `A: h′ at ${latLabel(h.rowLatA)}`, this.theory[0]);
    drawHovmoller(this.hovB, h.lon, h.days, h.b, s, `B: h′ at ${latLabel(h.rowLatB)}`, this.theory[1]);
    drawHovmoller(this.hovD, h.lon, h.days, h.diff, differenceRange(h.diff).max, 'B − A');
  }

  private drawProbes(): void {
    const cmp = this.cmp;
    if (cmp?.status !== 'ok') return;
    const f = this.probeField.value as FieldName;
    this.plot?.destroy();
    this.plot = null;
    if (cmp.probes.length === 0) {
      this.probeHost.textContent = 'The runs have no probe of the same name.';
      return;
    }
    // Our own key: one colour per probe, A solid and B dashed (uPlot's legend stays off).
    const key = el(
      'div',
      { className: 'probe-legend', id: 'cmp-probe-legend' },
      ...cmp.probes.map((p, n) => {
        const line = el('span', { className: 'line' });
        line.style.borderColor = probeColour(n);
        return el('span', { className: 'key' }, line, p.name);
      }),
      el('span', { className: 'hint' }, 'A solid, B dashed'),
    );
    this.probeHost.replaceChildren(key);
    const x = Array.from(cmp.probes[0].days);
    const ys: Array<Array<number | null>> = [];
    const series: uPlot.Series[] = [{ label: 'day' }];
    const clean = (a: Float32Array) => Array.from(a, (v) => (Number.isFinite(v) ? v : null));
    cmp.probes.forEach((p, n) => {
      const s = p.series[f];
      if (!s) return;
      ys.push(clean(s.a), clean(s.b));
      series.push(
        { label: `${p.name} A`, stroke: probeColour(n), width: 1.5 },
        { label: `${p.name} B`, stroke: probeColour(n), width: 1.5, dash: [6, 4] },
      );
    });
    this.plot = new uPlot(
      {
        width: Math.max(320, Math.min(900, this.probeHost.clientWidth || 640)),
        height: 220,
        scales: { x: { time: false } },
        axes: [{ label: 'day' }, { label: FIELD_INFO[f].units, size: 60 }],
        series,
        legend: { show: false },
      },
      [x, ...ys] as uPlot.AlignedData,
      this.probeHost,
    );
    this.probeHost.dataset.series = String(series.length - 1);
  }
}
