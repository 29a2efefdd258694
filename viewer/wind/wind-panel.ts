// The wind panel: the scenario's wind parts as a list (pattern, envelope, amplitude), each
// editable, reorderable, switchable, duplicable and deletable; parts of every kind can be added or
// imported from a file; the map tools, the preview and the stress-at-a-point plot. What is designed
// stays in the panel until "Apply and restart" hands the whole scenario to the engine (the run on
// screen is untouched before that), and "Save scenario" downloads exactly that JSON.

import type { WindPart } from '../../model/forcing/spec.ts';
import { validateScenario } from '../../model/scenario/index.ts';
import { formatIssue, issueListLines, type ScenarioIssue } from '../../model/scenario/errors.ts';
import { pickedBytes, windFileKind } from '../picked-file.ts';
import type { MapView } from '../render/map-view.ts';
import { formatValue } from '../panels/colour-bar.ts';
import { deletePart, duplicatePart, movePart, newPart, PATTERN_KINDS, PATTERN_LABELS, patternOf, setEnabled, summary, windOf, withWind, type BasinBox, type WindSection } from './design.ts';
import { dayAxis, drawTimePlot, partSeries } from './envelope-plot.ts';
import { History } from './history.ts';
import { ImportError, partsFromSeries, readGridded } from './import.ts';
import { MapTools, type ToolMode } from './map-tools.ts';
import type { Brush } from './paint.ts';
import { partEditor, type PartEditor } from './part-editor.ts';
import { LAYER_INFO, PREVIEW_LAYERS, previewSetup, stressSeriesAt, type PreviewLayer } from './preview.ts';
import { computePreview, drawPreview, type PreviewResult } from './preview-view.ts';

type Json = Record<string, unknown>;

export interface WindHost {
  map: MapView;
  /** The element holding the map canvases (the tool canvas goes on top). */
  stack: HTMLElement;
  /** The map's colour bar (the preview labels its own layer there). */
  colourBar: HTMLCanvasElement;
  /** The scenario as edited in the scenario panel; the wind section is replaced by the design. */
  baseScenario(): Json;
  fileName(): string;
  /** Validate-and-run a scenario text; true when the engine took it. */
  apply(text: string, fileName: string): Promise<boolean>;
  /** Redraw the map (the page shows the preview or the run). */
  redraw(): void;
  /** A message in the page's message area. */
  message(text: string, kind?: 'error' | 'info'): void;
}

function $new<K extends keyof HTMLElementTagNameMap>(tag: K, props: Record<string, unknown> = {}, ...children: Array<Node | string>): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  Object.assign(el, props);
  el.append(...children);
  return el;
}

function button(text: string, id: string, title = ''): HTMLButtonElement {
  return $new('button', { type: 'button', id, textContent: text, title });
}

function numberBox(id: string, value: string, label: string, units: string, size = 5): [HTMLLabelElement, HTMLInputElement] {
  const input = $new('input', { id, type: 'text', value, size, autocomplete: 'off' });
  input.inputMode = 'decimal';
  return [$new('label', {}, `${label} `, input, ` ${units}`), input];
}

export class WindPanel {
  private wind: WindSection = { parts: [] };
  /** The wind as the running scenario has it, to tell the user what is not applied yet. */
  private appliedText = '';
  private scenarioKey = '';
  private selected: number | null = null;
  private readonly history = new History<WindSection>((w) => structuredClone(w));
  private editor: PartEditor | null = null;
  private issues: ScenarioIssue[] = [];
  private preview: PreviewResult | null = null;
  private previewError = '';
  private modelDay: number | null = null;
  private point: { lon: number; lat: number } | null = null;
  private refreshQueued = false;
  private pointSeries: { days: number[]; taux: Float64Array; tauy: Float64Array } | null = null;
  /** The user typed a preview day: a re-applied scenario keeps it. */
  private dayTyped = false;
  private readonly tools: MapTools;
  private readonly el: Record<string, HTMLElement> = {};

  constructor(
    private readonly root: HTMLElement,
    private readonly host: WindHost,
  ) {
    this.build();
    this.tools = new MapTools(host.stack, host.map, {
      part: () => (this.selected === null ? null : (this.wind.parts[this.selected] ?? null)),
      begin: () => this.history.record(this.wind),
      changed: (part) => {
        if (this.selected === null) return;
        this.wind.parts[this.selected] = part;
        this.changed({ rebuild: true });
      },
      brush: () => this.brush(),
      point: () => this.point,
      setPoint: (lon, lat) => {
        this.point = { lon: Number(lon.toFixed(2)), lat: Number(lat.toFixed(2)) };
        (this.el.pointLon as HTMLInputElement).value = String(this.point.lon);
        (this.el.pointLat as HTMLInputElement).value = String(this.point.lat);
        this.drawPointPlot();
      },
      say: (t) => (this.el.toolMsg.textContent = t),
    });
    (window as unknown as { __pycnoWind: unknown }).__pycnoWind = {
      json: () => this.text(),
      issues: () => this.issues.map(formatIssue),
      preview: () => (this.preview ? { layer: this.preview.layer, day: this.preview.field.day, peak: this.preview.peak, range: this.preview.range } : null),
      previewError: () => this.previewError,
      selected: () => this.selected,
    };
  }

  // ---- building the panel ----
  private build(): void {
    const r = this.root;
    const e = this.el;
    e.note = $new('span', { className: 'wd-note', id: 'wd-note' });
    const undo = button('Undo', 'wd-undo', 'Undo the last change (Ctrl+Z)');
    const redo = button('Redo', 'wd-redo', 'Redo (Ctrl+Shift+Z or Ctrl+Y)');
    const apply = button('Apply and restart', 'wd-apply', 'Run the scenario with this wind from day 0');
    const save = button('Save scenario…', 'wd-save', 'Download the scenario with this wind as JSON');
    const clear = button('Remove all parts', 'wd-clear', 'Start from no wind at all (undo brings the parts back)');
    e.undo = undo;
    e.redo = redo;
    e.apply = apply;
    undo.addEventListener('click', () => this.undo());
    redo.addEventListener('click', () => this.redo());
    apply.addEventListener('click', () => void this.applyDesign());
    save.addEventListener('click', () => this.save());
    clear.addEventListener('click', () => this.edit((w) => ({ ...w, parts: [] }), null));
    r.append($new('div', { className: 'wd-head' }, $new('h2', { textContent: 'Wind design' }), undo, redo, apply, save, clear, e.note));

    // Adding parts.
    const [spacingLabel, spacing] = numberBox('wd-paint-spacing', '1', 'painted grid spacing', '°', 3);
    e.spacing = spacing;
    const adds = PATTERN_KINDS.map((k) => {
      const b = button(PATTERN_LABELS[k], `wd-add-${k}`, `Add a ${PATTERN_LABELS[k].toLowerCase()} part`);
      b.addEventListener('click', () => this.add(k));
      return b;
    });
    r.append($new('div', { className: 'row small wd-add' }, $new('span', { textContent: 'Add a part:' }), ...adds, spacingLabel));

    // Import.
    const file = $new('input', { type: 'file', id: 'wd-import', accept: '.csv,.nc,.cdf,text/csv,application/x-netcdf' });
    const q = $new('select', { id: 'wd-import-quantity' });
    q.add(new Option('stress, N m-2', 'stress'));
    q.add(new Option('wind, m s-1', 'wind'));
    e.importMsg = $new('span', { id: 'wd-import-msg', className: 'field-msg' });
    file.addEventListener('change', async () => {
      const f = file.files?.[0];
      if (f) await this.importFile(f.name, () => pickedBytes(f, windFileKind(f.name)), q.value as 'stress' | 'wind');
      file.value = '';
    });
    r.append(
      $new('div', { className: 'row small' }, $new('label', { className: 'file-button' }, 'Import CSV or NetCDF…', file), $new('label', {}, 'values are ', q), e.importMsg),
    );

    e.issues = $new('ul', { className: 'issues', id: 'wd-issues' });
    e.parts = $new('ol', { className: 'wd-parts', id: 'wd-parts' });
    e.editorHost = $new('div', { id: 'wd-editor-host' });
    const listCol = $new('div', { className: 'wd-col' }, $new('h3', { textContent: 'Parts (their stresses add up)' }), e.parts, e.issues);
    const editCol = $new('div', { className: 'wd-col' }, $new('h3', { textContent: 'Selected part' }), e.editorHost);

    // Map tools.
    const toolNames: Array<[ToolMode, string]> = [
      ['off', 'none (map clicks add probes)'],
      ['patch', 'move / size / turn the patch'],
      ['band', 'draw the latitude band'],
      ['paint', 'paint'],
      ['point', 'pick the time-series point'],
    ];
    const radios = toolNames.map(([v, t]) => {
      const input = $new('input', { type: 'radio', name: 'wd-tool', value: v, checked: v === 'off' });
      input.addEventListener('change', () => {
        this.tools.setMode(v);
        this.el.toolMsg.textContent = '';
        if (v !== 'off') this.tools.canvas.focus();
      });
      return $new('label', {}, input, ` ${t}`);
    });
    const [radL, rad] = numberBox('wd-brush-radius', '4', 'size', '°', 3);
    const [strL, str] = numberBox('wd-brush-strength', '0.05', 'strength', 'N m-2 or m s-1', 5);
    const [dirL, dir] = numberBox('wd-brush-dir', '0', 'toward', '° (0 east, 90 north)', 4);
    const [softL, soft] = numberBox('wd-brush-soft', '0.5', 'soft edge', '(0 hard – 1 soft)', 3);
    const mode = $new('select', { id: 'wd-brush-mode' });
    for (const [v, t] of [['paint', 'paint'], ['soften', 'soften'], ['erase', 'erase']]) mode.add(new Option(t, v));
    Object.assign(e, { rad, str, dir, soft, mode });
    e.brushMsg = $new('span', { className: 'field-msg', id: 'wd-brush-msg' });
    for (const b of [rad, str, dir, soft]) b.addEventListener('input', () => this.brush());
    e.toolMsg = $new('div', { className: 'hint', id: 'wd-tool-msg', role: 'status' });
    const tools = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'On the map' }),
      $new('div', { className: 'row small' }, ...radios),
      $new('div', { className: 'row small' }, $new('span', { textContent: 'Brush:' }), mode, radL, strL, dirL, softL, e.brushMsg),
      $new('div', { className: 'hint', textContent: 'With a tool on, the map also takes keys: arrows move, [ ] { } resize, , . turn a patch; Space paints at the brush; Enter picks the point. Ctrl+Z undoes any change.' }),
      e.toolMsg,
    );

    // Preview.
    const on = $new('input', { type: 'checkbox', id: 'wd-preview-on' });
    const [dayL, day] = numberBox('wd-preview-day', '0', 'at day', '', 5);
    const layer = $new('select', { id: 'wd-preview-layer' });
    for (const l of PREVIEW_LAYERS) layer.add(new Option(`${LAYER_INFO[l].label} (${LAYER_INFO[l].units})`, l));
    const arrows = $new('input', { type: 'checkbox', id: 'wd-preview-arrows', checked: true });
    e.previewMsg = $new('div', { className: 'hint', id: 'wd-preview-msg', role: 'status' });
    Object.assign(e, { previewOn: on, previewDay: day, previewLayer: layer, previewArrows: arrows });
    for (const c of [on, layer, arrows]) c.addEventListener('change', () => this.queueRefresh());
    day.addEventListener('input', () => {
      this.dayTyped = true;
      this.queueRefresh();
    });
    const preview = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'Preview (the forcing the model will get, before running)' }),
      $new('div', { className: 'row small' }, $new('label', {}, on, ' show on the map'), dayL, $new('label', {}, 'layer ', layer), $new('label', {}, arrows, ' arrows')),
      $new('div', {
        className: 'hint',
        textContent: 'Sverdrup layers: beta V = curl(tau)/rho0 (Sverdrup 1947) and U from continuity, integrated west from the east coast; they predict the steady flow off the equator, such as a counter current under a weak-wind band.',
      }),
      e.previewMsg,
    );

    // Stress at a point.
    const [plL, pLon] = numberBox('wd-point-lon', '', 'lon', '°E', 6);
    const [ptL, pLat] = numberBox('wd-point-lat', '0', 'lat', '°N', 5);
    Object.assign(e, { pointLon: pLon, pointLat: pLat });
    for (const b of [pLon, pLat]) {
      b.addEventListener('input', () => {
        const lon = Number(pLon.value);
        const lat = Number(pLat.value);
        this.point = pLon.value.trim() && pLat.value.trim() && Number.isFinite(lon) && Number.isFinite(lat) ? { lon, lat } : null;
        this.drawPointPlot();
      });
    }
    e.pointPlot = $new('canvas', { id: 'wd-point-plot', width: 360, height: 110 });
    e.pointPlot.setAttribute('aria-label', 'Total stress at the chosen point over the run');
    e.pointMsg = $new('div', { className: 'hint', id: 'wd-point-msg' });
    const point = $new(
      'fieldset',
      { className: 'wd-box' },
      $new('legend', { textContent: 'Total stress at a point over the run' }),
      $new('div', { className: 'row small' }, plL, ptL, $new('span', { className: 'hint', textContent: 'blue taux, orange tauy; the red dashes mark the model day on screen' })),
      e.pointPlot,
      e.pointMsg,
    );

    r.append($new('div', { className: 'wd-grid' }, listCol, editCol, $new('div', { className: 'wd-col' }, tools, preview, point)));
    // Undo and redo from the keyboard anywhere in the panel or on the tool canvas.
    const keys = (ev: KeyboardEvent) => {
      if (!(ev.ctrlKey || ev.metaKey)) return;
      const k = ev.key.toLowerCase();
      if ((ev.target as HTMLElement).tagName === 'TEXTAREA' || ((ev.target as HTMLElement).tagName === 'INPUT' && (ev.target as HTMLInputElement).type === 'text')) return; // the box's own undo
      if (k === 'z' && !ev.shiftKey) this.undo();
      else if ((k === 'z' && ev.shiftKey) || k === 'y') this.redo();
      else return;
      ev.preventDefault();
    };
    r.addEventListener('keydown', keys);
    document.addEventListener('keydown', (ev) => {
      if (ev.target === this.tools.canvas) keys(ev);
    });
  }

  // ---- the design ----
  /** A scenario was opened or loaded: the panel shows its wind (a new file starts a new history). */
  setScenario(json: Json): void {
    const key = JSON.stringify([json.name, json.basin]);
    if (key !== this.scenarioKey) this.history.clear();
    this.scenarioKey = key;
    this.wind = windOf(json);
    this.appliedText = JSON.stringify(this.wind);
    this.selected = this.wind.parts.length ? 0 : null;
    const b = this.basin();
    if (!this.point) this.point = { lon: Number(((b.lonWest + b.lonEast) / 2).toFixed(2)), lat: Math.min(b.latNorth, Math.max(b.latSouth, 0)) };
    (this.el.pointLon as HTMLInputElement).value = String(this.point.lon);
    (this.el.pointLat as HTMLInputElement).value = String(this.point.lat);
    if (key !== this.scenarioKey || !this.dayTyped) (this.el.previewDay as HTMLInputElement).value = String(this.liveliestDay());
    this.changed({ rebuild: true });
  }

  /** The day when the parts' time factors add up to the most: a preview day that shows something. */
  private liveliestDay(): number {
    const days = dayAxis(this.runDays(), 120);
    const total = days.map(() => 0);
    this.wind.parts.forEach((p, k) => {
      if (p.enabled === false) return;
      try {
        partSeries(p, days, this.seed(), k).values.forEach((v, n) => (total[n] += Math.abs(v)));
      } catch {
        /* the validator reports it */
      }
    });
    let best = 0;
    total.forEach((v, n) => {
      if (v > total[best] + 1e-12) best = n;
    });
    return Number(days[best].toFixed(1));
  }

  /** The scenario with the designed wind, as JSON. */
  compose(): Json {
    return withWind(this.host.baseScenario(), this.wind);
  }

  text(): string {
    return `${JSON.stringify(this.compose(), null, 2)}\n`;
  }

  private basin(): BasinBox {
    const b = (this.host.baseScenario().basin ?? {}) as Partial<BasinBox>;
    return { lonWest: b.lonWest ?? 0, lonEast: b.lonEast ?? 1, latSouth: b.latSouth ?? -1, latNorth: b.latNorth ?? 1 };
  }

  private runDays(): number {
    const d = Number((this.host.baseScenario().time as Json | undefined)?.days);
    return Number.isFinite(d) && d > 0 ? d : 100;
  }

  private seed(): string {
    return String(this.host.baseScenario().seed ?? 0);
  }

  /** A change through a function of the design, with an undo step. */
  private edit(f: (w: WindSection) => WindSection, select: number | null): void {
    this.history.record(this.wind);
    this.wind = f(structuredClone(this.wind));
    this.selected = select !== null && select < this.wind.parts.length ? select : this.wind.parts.length ? Math.min(this.selected ?? 0, this.wind.parts.length - 1) : null;
    this.changed({ rebuild: true });
  }

  private add(kind: (typeof PATTERN_KINDS)[number]): void {
    let spacing = Number((this.el.spacing as HTMLInputElement).value);
    if (kind === 'painted' && !(spacing >= 0.05 && spacing <= 10)) {
      this.el.toolMsg.textContent = `painted grid spacing must be a number of degrees between 0.05 and 10 (got '${(this.el.spacing as HTMLInputElement).value}')`;
      return;
    }
    if (!Number.isFinite(spacing)) spacing = 1;
    const part = newPart(kind, this.basin(), spacing);
    this.edit((w) => ({ ...w, parts: [...w.parts, part] }), this.wind.parts.length);
    // The tool that goes with the new part, so the next drag on the map shapes it.
    const tool: ToolMode | null = kind === 'patch' ? 'patch' : kind === 'band' ? 'band' : kind === 'painted' ? 'paint' : null;
    if (tool) this.chooseTool(tool);
  }

  private chooseTool(mode: ToolMode): void {
    const radio = this.root.querySelector<HTMLInputElement>(`input[name="wd-tool"][value="${mode}"]`);
    if (radio) radio.checked = true;
    this.tools.setMode(mode);
  }

  private undo(): void {
    const prev = this.history.undo(this.wind);
    if (!prev) return;
    this.wind = prev;
    if (this.selected !== null && this.selected >= this.wind.parts.length) this.selected = this.wind.parts.length ? this.wind.parts.length - 1 : null;
    this.changed({ rebuild: true });
  }

  private redo(): void {
    const next = this.history.redo(this.wind);
    if (!next) return;
    this.wind = next;
    if (this.selected !== null && this.selected >= this.wind.parts.length) this.selected = this.wind.parts.length ? this.wind.parts.length - 1 : null;
    this.changed({ rebuild: true });
  }

  private brush(): Brush {
    const e = this.el as Record<string, HTMLInputElement>;
    const read = (b: HTMLInputElement, name: string, lo: number, hi: number, fallback: number): number => {
      const v = Number(b.value);
      const ok = b.value.trim() !== '' && Number.isFinite(v) && v >= lo && v <= hi;
      b.classList.toggle('bad', !ok);
      if (!ok) problems.push(`brush ${name} must be a number from ${lo} to ${hi} (got '${b.value}')`);
      return ok ? v : fallback;
    };
    const problems: string[] = [];
    const brush: Brush = {
      radius: read(e.rad, 'size', 0.05, 90, 4),
      strength: read(e.str, 'strength', -100, 100, 0),
      directionDeg: read(e.dir, 'direction', -360, 360, 0),
      softEdge: read(e.soft, 'soft edge', 0, 1, 0.5),
      mode: (this.el.mode as HTMLSelectElement).value as Brush['mode'],
    };
    this.el.brushMsg.textContent = problems.length ? `${problems.join('; ')}; the last good value is used` : '';
    return brush;
  }

  /** After any change: summaries at once, validation and preview on the next frame. */
  private changed(opts: { rebuild: boolean }): void {
    if (opts.rebuild) {
      this.renderList();
      this.renderEditor();
    } else this.updateSummaries();
    (this.el.undo as HTMLButtonElement).disabled = !this.history.canUndo;
    (this.el.redo as HTMLButtonElement).disabled = !this.history.canRedo;
    this.el.note.textContent = JSON.stringify(this.wind) === this.appliedText ? '' : 'Not applied yet: the run on screen still uses its own wind.';
    this.queueRefresh();
  }

  private queueRefresh(): void {
    if (this.refreshQueued) return;
    this.refreshQueued = true;
    requestAnimationFrame(() => {
      this.refreshQueued = false;
      this.refresh();
    });
  }

  /** Validate the composed scenario, show the messages, recompute the preview and the plots. */
  private refresh(): void {
    const json = this.compose();
    const r = validateScenario(json);
    this.issues = r.ok ? [] : r.errors;
    const mine = this.issues.filter((i) => i.path.startsWith('wind'));
    const at = (k: number) => `wind.parts[${k}]`;
    if (this.editor && this.selected !== null) {
      const pre = at(this.selected);
      this.editor.showIssues(
        mine
          .filter((i) => i.path === pre || i.path.startsWith(`${pre}.`) || i.path.startsWith(`${pre}[`))
          .map((i) => ({ ...i, rel: i.path.slice(pre.length).replace(/^\./, '').replace(/\[(\d+)\]/g, '.$1').replace(/^\./, '') })),
      );
    }
    // Issues of other parts and of the rest of the scenario are listed under the parts.
    const elsewhere = this.issues.filter((i) => this.selected === null || !(i.path === at(this.selected) || i.path.startsWith(`${at(this.selected)}.`) || i.path.startsWith(`${at(this.selected)}[`)));
    this.el.issues.replaceChildren(...elsewhere.map((i) => $new('li', { textContent: formatIssue(i) })));
    this.el.parts.querySelectorAll<HTMLElement>('li').forEach((li, k) => li.classList.toggle('invalid', mine.some((i) => i.path === at(k) || i.path.startsWith(`${at(k)}.`) || i.path.startsWith(`${at(k)}[`))));
    (this.el.apply as HTMLButtonElement).disabled = !r.ok;
    this.editor?.redrawPlot();
    this.computePreview(r.ok);
    this.drawPointPlot(r.ok);
    this.tools.draw();
  }

  private computePreview(valid: boolean): void {
    this.preview = null;
    this.previewError = '';
    const msg = this.el.previewMsg;
    if (!(this.el.previewOn as HTMLInputElement).checked) {
      msg.textContent = '';
      this.host.redraw();
      return;
    }
    const dayText = (this.el.previewDay as HTMLInputElement).value;
    const day = Number(dayText);
    if (dayText.trim() === '' || !Number.isFinite(day) || day < 0) {
      this.previewError = `preview day must be a number of days >= 0 (got '${dayText}')`;
    } else if (!valid) {
      this.previewError = 'fix the marked values to see the preview';
    } else {
      try {
        this.preview = computePreview(this.compose(), day, (this.el.previewLayer as HTMLSelectElement).value as PreviewLayer);
      } catch (e) {
        this.previewError = (e as Error).message;
      }
    }
    const p = this.preview;
    msg.textContent = p
      ? `Day ${formatValue(p.field.day)}: largest |tau| ${formatValue(p.peak.value)} N m-2${p.peak.value > 0 ? ` at ${formatValue(p.peak.lon)}°E, ${formatValue(p.peak.lat)}°N` : ''}; colours ${formatValue(p.range.min)} to ${formatValue(p.range.max)} ${LAYER_INFO[p.layer].units}.`
      : this.previewError;
    msg.classList.toggle('field-msg', !p);
    this.host.redraw();
  }

  /** True when the preview is shown on the map (the page then skips its own field). */
  previewActive(): boolean {
    return (this.el.previewOn as HTMLInputElement).checked;
  }

  /** Called by the page's draw: draws the preview if it is on. True when it drew. */
  drawOnMap(): boolean {
    if (!this.previewActive()) return false;
    if (!this.preview) {
      this.tools.draw();
      return false;
    }
    const ok = drawPreview(this.host.map, this.host.colourBar, this.preview, (this.el.previewArrows as HTMLInputElement).checked);
    if (!ok) this.el.previewMsg.textContent = 'The map shows another basin: apply this scenario first to preview it.';
    this.tools.draw();
    return ok;
  }

  /** The model day on screen, for the plots' markers. */
  setModelDay(day: number): void {
    if (day === this.modelDay) return;
    this.modelDay = day;
    this.editor?.redrawMarker();
    this.drawPointMarker();
  }

  /** Map layout changed: keep the tool canvas over the map. */
  layout(): void {
    this.tools.draw();
  }

  /** Recompute the stress series at the point (after a change of design or point), then draw it. */
  private drawPointPlot(valid = this.issues.length === 0): void {
    const msg = this.el.pointMsg;
    this.pointSeries = null;
    if (!this.point || !valid) {
      msg.textContent = this.point ? 'fix the marked values to see the series' : 'type a longitude and latitude, or pick the point on the map';
      return;
    }
    try {
      const { resolved, grid } = previewSetup(this.compose());
      const days = dayAxis(this.runDays(), 160);
      const s = stressSeriesAt(resolved, grid, this.point.lon, this.point.lat, days);
      if (!s) {
        msg.textContent = `${this.point.lon}°E, ${this.point.lat}°N is land`;
        return;
      }
      this.pointSeries = { days, taux: s.taux, tauy: s.tauy };
      msg.textContent = `cell centre ${formatValue(s.lon)}°E, ${formatValue(s.lat)}°N`;
      this.drawPointMarker();
    } catch (e) {
      msg.textContent = (e as Error).message;
    }
  }

  /** Redraw the kept series with the marker at the model day (cheap: called for every frame). */
  private drawPointMarker(): void {
    const s = this.pointSeries;
    if (!s) return;
    drawTimePlot(this.el.pointPlot as HTMLCanvasElement, s.days, [{ values: s.taux, colour: '#0b5cad', label: 'taux' }, { values: s.tauy, colour: '#e67e22', label: 'tauy' }], 'N m-2', this.modelDay);
  }

  // ---- the list ----
  private renderList(): void {
    const items = this.wind.parts.map((part, k) => {
      const li = $new('li', { className: `wd-part${k === this.selected ? ' selected' : ''}${part.enabled === false ? ' off' : ''}` });
      li.dataset.index = String(k);
      const on = $new('input', { type: 'checkbox', checked: part.enabled !== false, title: 'On or off (off leaves it out of the run)' });
      on.setAttribute('aria-label', `part ${k + 1} on`);
      on.addEventListener('change', () => this.edit((w) => ({ ...w, parts: w.parts.map((p, n) => (n === k ? setEnabled(p, on.checked) : p)) }), k));
      const pick = $new('button', { type: 'button', className: 'wd-pick', textContent: `${k + 1}. ${part.name || PATTERN_LABELS[patternOf(part)]}` });
      pick.setAttribute('aria-pressed', String(k === this.selected));
      pick.addEventListener('click', () => {
        this.selected = k;
        this.changed({ rebuild: true });
        const tool: ToolMode | null = patternOf(part) === 'patch' ? 'patch' : patternOf(part) === 'band' ? 'band' : patternOf(part) === 'painted' ? 'paint' : null;
        if (tool && this.tools.mode !== 'off' && this.tools.mode !== 'point') this.chooseTool(tool);
      });
      const sum = $new('span', { className: 'wd-summary', textContent: summary(part) });
      const up = $new('button', { type: 'button', textContent: '↑', title: 'Move up', disabled: k === 0 });
      up.setAttribute('aria-label', `move part ${k + 1} up`);
      up.addEventListener('click', () => this.edit((w) => ({ ...w, parts: movePart(w.parts, k, -1) }), k - 1));
      const down = $new('button', { type: 'button', textContent: '↓', title: 'Move down', disabled: k === this.wind.parts.length - 1 });
      down.setAttribute('aria-label', `move part ${k + 1} down`);
      down.addEventListener('click', () => this.edit((w) => ({ ...w, parts: movePart(w.parts, k, 1) }), k + 1));
      const dup = $new('button', { type: 'button', textContent: 'Duplicate' });
      dup.addEventListener('click', () => this.edit((w) => ({ ...w, parts: duplicatePart(w.parts, k) }), k + 1));
      const del = $new('button', { type: 'button', textContent: 'Delete', title: 'Delete (undo brings it back)' });
      del.addEventListener('click', () => this.edit((w) => ({ ...w, parts: deletePart(w.parts, k) }), Math.max(0, k - 1)));
      li.append($new('div', { className: 'row small' }, on, pick, up, down, dup, del), sum);
      return li;
    });
    this.el.parts.replaceChildren(...items);
    if (!items.length) this.el.parts.replaceChildren($new('li', { className: 'hint', textContent: 'No wind: the ocean stays at rest. Add a part above.' }));
  }

  private updateSummaries(): void {
    this.el.parts.querySelectorAll<HTMLElement>('li.wd-part').forEach((li) => {
      const k = Number(li.dataset.index);
      const part = this.wind.parts[k];
      if (!part) return;
      li.querySelector('.wd-summary')!.textContent = summary(part);
      li.querySelector('.wd-pick')!.textContent = `${k + 1}. ${part.name || PATTERN_LABELS[patternOf(part)]}`;
    });
  }

  private renderEditor(): void {
    const k = this.selected;
    if (k === null || !this.wind.parts[k]) {
      this.editor = null;
      this.el.editorHost.replaceChildren($new('p', { className: 'hint', textContent: 'Select a part to edit it.' }));
      return;
    }
    this.editor = partEditor(this.wind.parts[k], {
      basin: this.basin(),
      runDays: this.runDays(),
      seed: this.seed(),
      index: k,
      markDay: () => this.modelDay,
      change: (part, { record, rebuild }) => {
        if (record) this.history.record(this.wind);
        this.wind.parts[k] = part;
        this.changed({ rebuild });
      },
    });
    this.el.editorHost.replaceChildren(this.editor.el);
  }

  // ---- import, apply, save ----
  async importFile(name: string, bytes: Uint8Array | (() => Promise<Uint8Array>), quantity: 'stress' | 'wind'): Promise<void> {
    const msg = this.el.importMsg;
    try {
      const series = readGridded(name, typeof bytes === 'function' ? await bytes() : bytes);
      const { parts, notes } = partsFromSeries(series, name, quantity, this.basin());
      this.edit((w) => ({ ...w, parts: [...w.parts, ...(parts as WindPart[])] }), this.wind.parts.length);
      msg.classList.remove('field-msg');
      msg.textContent = `${name}: ${series.nLon} x ${series.nLat} points stored in the scenario as ${parts.length === 1 ? 'a painted part' : `${parts.length} painted parts`}${notes.length ? `; ${notes.join('; ')}` : ''}.`;
    } catch (e) {
      msg.classList.add('field-msg');
      msg.textContent = e instanceof ImportError ? `Refused: ${e.message}` : `Refused: ${name}: ${(e as Error).message}`;
    }
  }

  private async applyDesign(): Promise<void> {
    const json = this.compose();
    const r = validateScenario(json);
    if (!r.ok) {
      this.host.message(`The wind design is not applied:\n${issueListLines(r.errors).join('\n')}`);
      return;
    }
    const text = this.text();
    if (await this.host.apply(text, this.host.fileName())) {
      this.appliedText = JSON.stringify(this.wind);
      this.changed({ rebuild: false });
    }
  }

  private save(): void {
    const json = this.compose();
    const r = validateScenario(json);
    if (!r.ok) {
      this.host.message(`The scenario is not saved; fix these first:\n${issueListLines(r.errors).join('\n')}`);
      return;
    }
    const blob = new Blob([this.text()], { type: 'application/json' });
    const a = document.createElement('a');
    a.href = URL.createObjectURL(blob);
    const stem = String(json.name ?? 'scenario').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'scenario';
    a.download = `${stem}.json`;
    a.click();
    setTimeout(() => URL.revokeObjectURL(a.href), 5000);
  }
}
