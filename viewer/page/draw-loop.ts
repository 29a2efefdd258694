// Drawing the run: at most once per animation frame, the frame on screen as the chosen field with
// its colour range and arrows, the colour bar, the day and the time slider, the read-out, and the
// slow panels (Hovmoller diagram, probe chart) throttled. What was drawn last is remembered so a
// redraw without new data repeats no work: the display field is filled (and its range scanned)
// once per shown frame; the colour bar, read-out, Hovmoller diagram and texts are touched only
// when what they show changed.

import { formatValue, drawColourBar } from '../panels/colour-bar.ts';
import { lookupTable, MAP_TITLES, mapFor } from '../render/colour-maps.ts';
import type { VectorLayer } from '../render/map-view.ts';
import { autoRange, checkFixedRange, steadyRange, type Range } from '../state/colour-range.ts';
import { displayField, fillDisplay, type DisplayKey } from '../state/display-fields.ts';
import type { KeptFrame } from '../state/frame-history.ts';
import { $, checkedValue, setText, setValue } from './dom.ts';
import type { Page } from './page.ts';
import { showReadout } from './readout.ts';
import { shownFrame } from './state.ts';
import { FrameQueue, Throttle } from '../throttle.ts';

export class DrawLoop {
  private readonly frameQueue = new FrameQueue(() => this.draw());
  // A new Hovmoller row at most five times a second (it redraws every row); the probe chart, the
  // slowest panel, a few times a second: plenty to follow a run.
  private readonly hovThrottle = new Throttle(200, () => this.drawHovmoller());
  private readonly probeThrottle = new Throttle(250, () => this.page.probePanel.draw());
  private display = new Float32Array(0);
  private displayFrom: { frame: KeptFrame; key: DisplayKey } | null = null;
  private displayOk = false;
  private range: Range | null = null;
  private barKey = '';
  private readoutKey = '';
  private readoutFrame: KeptFrame | null = null;
  private hovShown = { rows: -1, rest: '' };

  constructor(private readonly page: Page) {}

  /** Draw on the next animation frame; `all` also redraws the throttled panels at once. */
  queue(all: boolean): void {
    if (all) this.probeThrottle.release();
    this.frameQueue.request();
  }

  /** A new run: nothing drawn so far counts. */
  forget(): void {
    this.displayFrom = null;
    this.barKey = '';
    this.readoutKey = '';
    this.readoutFrame = null;
    this.hovShown = { rows: -1, rest: '' };
  }

  /** The colour range is scanned afresh from the next frame (a new field, a new range mode, a new run). */
  rescanRange(): void {
    this.range = null;
  }

  private draw(): void {
    const { state, info, map, windPanel, hovPanel } = this.page;
    const f = shownFrame(state, this.page.history);
    const run = state.run;
    if (!run || !f) return;
    const g = run.grid;
    const key = state.fieldKey;
    const df = displayField(key);
    const fresh =
      this.displayFrom === null ||
      this.displayFrom.frame !== f ||
      this.displayFrom.key !== key ||
      this.display.length !== g.nx * g.ny;
    if (fresh) {
      if (this.display.length !== g.nx * g.ny) this.display = new Float32Array(g.nx * g.ny);
      this.displayOk = fillDisplay(key, f.fields, run.physics.layerThickness, this.display);
      this.displayFrom = { frame: f, key };
    }
    if (!this.displayOk) return;
    const range = this.currentRange(df.kind, fresh);
    const layers = this.arrowLayers(f);
    // Over the SST anomaly, the wind that answers it.
    if (key === 'sst_anom' && f.fields.u_atm && f.fields.v_atm) {
      layers.push({ name: 'answering wind', u: f.fields.u_atm, v: f.fields.v_atm, units: 'm/s', colour: [0, 90, 40] });
    }
    if (fresh) this.page.coupledPanel.drawFields(f.fields);
    map.gl.setColourMap(mapFor(key), lookupTable(mapFor(key)));
    // While the wind preview is on, the map shows the designed forcing instead of the run's field.
    if (!windPanel.drawOnMap()) {
      map.draw(this.display, range, layers, this.page.probes.probes, state.cursor, { frame: f, field: key });
      const bar = `${key}|${range.min}|${range.max}`;
      if (bar !== this.barKey) {
        drawColourBar(
          $<HTMLCanvasElement>('colour-bar'),
          lookupTable(mapFor(key)),
          range,
          df.label,
          df.units,
          MAP_TITLES[mapFor(key)],
        );
        this.barKey = bar;
      }
    } else this.barKey = ''; // the preview drew its own colour bar
    windPanel.setModelDay(f.day);
    if (fresh) info.framesDrawn++;
    info.shownDay = f.day;
    setText('map-day', `day ${f.day.toFixed(1)}`);
    // A badge whose place is always kept, so the map never moves when it shows.
    const back = $('map-looking-back');
    if (back.hidden !== (state.viewIndex === null)) back.hidden = state.viewIndex === null;
    this.updateSlider(f);
    const cell = state.hover ?? state.cursor;
    const rk = cell ? `${cell.i},${cell.j}|${key}` : '';
    if (f !== this.readoutFrame || rk !== this.readoutKey) {
      this.readoutFrame = f;
      this.readoutKey = rk;
      showReadout($<HTMLTableElement>('readout'), run, f, cell);
    }
    hovPanel.setMark(state.viewIndex !== null ? f.day : null);
    // The Hovmoller diagram again only when it changed: a new row throttled; a new mark,
    // latitude, size or start of the lines at once.
    const rest = this.hovRest();
    if (hovPanel.rows !== this.hovShown.rows || rest !== this.hovShown.rest)
      this.hovThrottle.request(rest !== this.hovShown.rest);
    this.probeThrottle.request();
    setText('budget-note', this.budgetNote());
  }

  /** The arrow layers asked for, with the key arrows the user set (an empty box: automatic). */
  private arrowLayers(f: KeptFrame): VectorLayer[] {
    const layers: VectorLayer[] = [];
    const problems: string[] = [];
    const key = (id: string, what: string): number | undefined => {
      const t = $<HTMLInputElement>(id).value.trim();
      if (t === '') return undefined;
      const v = Number(t);
      if (!(v > 0) || !Number.isFinite(v)) {
        problems.push(`${what} key: give a speed above 0, or leave it empty for automatic (got '${t}')`);
        return undefined;
      }
      return v;
    };
    const current = key('arrow-ref-current', 'current');
    const wind = key('arrow-ref-wind', 'wind stress');
    if ($<HTMLInputElement>('show-currents').checked && f.fields.u_surf && f.fields.v_surf) {
      layers.push({
        name: 'surface current',
        u: f.fields.u_surf,
        v: f.fields.v_surf,
        units: 'm/s',
        colour: [20, 20, 20],
        reference: current,
      });
    }
    if ($<HTMLInputElement>('show-wind').checked && f.fields.taux && f.fields.tauy) {
      layers.push({
        name: 'wind stress',
        u: f.fields.taux,
        v: f.fields.tauy,
        units: 'N m-2',
        colour: [120, 30, 160],
        reference: wind,
      });
    }
    this.page.map.arrowSpacing = Number($<HTMLSelectElement>('arrow-density').value) || 22;
    setText('arrow-msg', problems.join('; '));
    return layers;
  }

  /** The read-out of the cell under the pointer (or the cursor) now, outside the draw. */
  showReadout(): void {
    const { state } = this.page;
    showReadout(
      $<HTMLTableElement>('readout'),
      state.run,
      shownFrame(state, this.page.history),
      state.hover ?? state.cursor,
    );
  }

  /** What the Hovmoller diagram shows besides its rows. */
  private hovRest(): string {
    const c = $<HTMLCanvasElement>('hovmoller');
    const { hovPanel, state, info } = this.page;
    const mark = state.viewIndex !== null ? info.shownDay : null;
    return `${mark}|${$<HTMLSelectElement>('hov-lat').value}|${c.width}x${c.height}|${hovPanel.start?.lon},${hovPanel.start?.day}`;
  }

  private drawHovmoller(): void {
    const hovPanel = this.page.hovPanel;
    this.hovShown = { rows: hovPanel.rows, rest: this.hovRest() };
    hovPanel.draw();
  }

  private currentRange(kind: 'diverging' | 'sequential', fresh: boolean): Range {
    const fixed = checkedValue('range-mode', 'auto') === 'fixed';
    const lo = Number($<HTMLInputElement>('range-min').value);
    const hi = Number($<HTMLInputElement>('range-max').value);
    if (fixed) {
      const problem = checkFixedRange(lo, hi);
      setText('range-msg', problem ?? '');
      if (!problem) return { min: lo, max: hi };
    } else setText('range-msg', '');
    // The automatic range scans the field: once per new frame or field, not per redraw.
    if (fresh || !this.range) this.range = steadyRange(this.range, autoRange(this.display, kind), kind);
    if (!fixed) {
      setValue('range-min', formatValue(this.range.min));
      setValue('range-max', formatValue(this.range.max));
    }
    return this.range;
  }

  private updateSlider(f: KeptFrame): void {
    const { history, state } = this.page;
    const s = $<HTMLInputElement>('time-slider');
    const max = String(Math.max(0, history.length - 1));
    if (s.max !== max) s.max = max;
    const value = String(state.viewIndex ?? history.length - 1);
    if (s.value !== value) s.value = value;
    const first = history.at(0);
    setText('scrub-day', first ? `kept: day ${first.day.toFixed(1)} to ${history.latest()!.day.toFixed(1)}` : '');
    const vt = `day ${f.day.toFixed(1)}`;
    if (s.getAttribute('aria-valuetext') !== vt) s.setAttribute('aria-valuetext', vt);
  }

  /**
   * What the scrubbing budget buys; once full, the history says it has thinned the older frames
   * (the time slider still reaches back to the start). A budget under 3 frames keeps the newest.
   */
  private budgetNote(): string {
    const { history, state } = this.page;
    const run = state.run;
    const first = history.at(0);
    if (
      run &&
      first &&
      history.length >= history.maxFrames &&
      history.spacing === 0 &&
      first.day > (run.startDay ?? 0) + 1e-9
    ) {
      return `${history.describe()}; frames before day ${first.day.toFixed(1)} were let go to stay within it`;
    }
    return history.describe();
  }
}
