// The wind panel, the DOM side of the wind designer: the parts list (parts-list.ts), the editor of
// the selected part (part-editor.ts), adding and importing parts, the map tools (tools-box.ts,
// map-tools.ts), the preview (preview-box.ts) and the stress at a point (point-series-box.ts).
// The design itself, its undo and where the validator's issues go live in design-state.ts (a
// reducer, tested in Node); this file renders it and turns input into its actions. What is
// designed stays in the panel until "Apply and run" hands the whole scenario to the engine
// (the run on screen is untouched before that), and "Save scenario" downloads exactly that JSON.

import type { WindPart } from '../../model/forcing/spec.ts';
import { validateScenario } from '../../model/scenario/index.ts';
import { forcingProblem } from './forcing-check.ts';
import { formatIssue, issueListLines, type ScenarioIssue } from '../../model/scenario/errors.ts';
import { pickedBytes, windFileKind } from '../picked-file.ts';
import { download } from '../files.ts';
import type { MapView } from '../render/map-view.ts';
import { FrameQueue } from '../throttle.ts';
import { newPart, PATTERN_KINDS, PATTERN_LABELS, windOf, withWind, type BasinBox, type PatternKind } from './design.ts';
import {
  basinOf,
  canRedo,
  canUndo,
  emptyDesign,
  liveliestDay,
  notApplied,
  reduceDesign,
  routeIssues,
  runDaysOf,
  scenarioKeyOf,
  seedOf,
  type DesignAction,
  type DesignState,
  type ListEdit,
} from './design-state.ts';
import { $new, button, numberBox } from './dom.ts';
import { ImportError, partsFromSeries, readGridded } from './import.ts';
import { MapTools, type ToolMode } from './map-tools.ts';
import { partEditor, type PartEditor } from './part-editor.ts';
import { renderPartsList, toolFor, updatePartSummaries } from './parts-list.ts';
import { PointSeriesBox } from './point-series-box.ts';
import { PreviewBox } from './preview-box.ts';
import { ToolsBox } from './tools-box.ts';

type Json = Record<string, unknown>;

export interface WindHost {
  map: MapView;
  /** The element holding the map canvases (the tool canvas goes on top). */
  stack: HTMLElement;
  /** The map's colour bar (the preview labels its own layer there). */
  colourBar: HTMLCanvasElement;
  /** The scenario as edited in the scenario panel; the wind section is replaced by the design. */
  baseScenario(): Json;
  /** The scenario as it was opened, before any edit (to name an edited one's download). */
  openedScenario(): Json;
  /** Whether the scenario panel's values differ from the scenario as it was opened. */
  valuesEdited(): boolean;
  fileName(): string;
  /** Validate-and-run a scenario text; true when the engine took it. */
  apply(text: string, fileName: string): Promise<boolean>;
  /** Redraw the map (the page shows the preview or the run). */
  redraw(): void;
  /** A message in the page's message area. */
  message(text: string, kind?: 'error' | 'info'): void;
}

export class WindPanel {
  private design: DesignState = emptyDesign();
  private editor: PartEditor | null = null;
  private issues: ScenarioIssue[] = [];
  private modelDay: number | null = null;
  private readonly refreshQueue = new FrameQueue(() => this.refresh());
  private readonly preview: PreviewBox;
  private readonly point: PointSeriesBox;
  private readonly toolsBox: ToolsBox;
  private readonly tools: MapTools;
  private readonly el: {
    note: HTMLElement;
    undo: HTMLButtonElement;
    redo: HTMLButtonElement;
    apply: HTMLButtonElement;
    spacing: HTMLInputElement;
    importMsg: HTMLElement;
    issues: HTMLElement;
    parts: HTMLElement;
    editorHost: HTMLElement;
  };

  constructor(
    private readonly root: HTMLElement,
    private readonly host: WindHost,
  ) {
    this.preview = new PreviewBox({
      map: host.map,
      colourBar: host.colourBar,
      changed: () => this.queueRefresh(),
      redraw: () => host.redraw(),
    });
    this.point = new PointSeriesBox({
      compose: () => this.compose(),
      runDays: () => this.runDays(),
      valid: () => this.issues.length === 0,
    });
    this.toolsBox = new ToolsBox((mode) => {
      this.tools.setMode(mode);
      if (mode !== 'off') this.tools.canvas.focus();
    });
    this.el = this.build();
    this.tools = new MapTools(host.stack, host.map, {
      part: () => (this.design.selected === null ? null : (this.design.wind.parts[this.design.selected] ?? null)),
      // A drag or a stroke is one undo step, however many changes it makes.
      begin: () => (this.design = reduceDesign(this.design, { kind: 'record' })),
      changed: (part) => {
        if (this.design.selected === null) return;
        this.dispatch({ kind: 'set-part', index: this.design.selected, part, record: false }, { rebuild: true });
      },
      brush: () => this.toolsBox.brush(),
      point: () => this.point.point,
      setPoint: (lon, lat) => this.point.setPoint(lon, lat),
      say: (t) => this.toolsBox.say(t),
    });
    (window as unknown as { __pycnoWind: unknown }).__pycnoWind = {
      json: () => this.text(),
      issues: () => this.issues.map(formatIssue),
      preview: () => {
        const p = this.preview.result;
        return p ? { layer: p.layer, day: p.field.day, peak: p.peak, range: p.range } : null;
      },
      previewError: () => this.preview.error,
      selected: () => this.design.selected,
    };
  }

  // ---- building the panel ----
  private build(): WindPanel['el'] {
    const r = this.root;
    const note = $new('span', { className: 'wd-note', id: 'wd-note' });
    const undo = button('Undo', 'wd-undo', 'Undo the last change (Ctrl+Z)');
    const redo = button('Redo', 'wd-redo', 'Redo (Ctrl+Shift+Z or Ctrl+Y)');
    const apply = button(
      'Apply and run',
      'wd-apply',
      'Start again from day 0 with this wind and the scenario panel\u2019s values, and run',
    );
    const save = button('Save scenario…', 'wd-save', 'Download the scenario with this wind as JSON');
    const clear = button('Remove all parts', 'wd-clear', 'Start from no wind at all (undo brings the parts back)');
    undo.addEventListener('click', () => this.undo());
    redo.addEventListener('click', () => this.redo());
    apply.addEventListener('click', () => void this.applyDesign());
    save.addEventListener('click', () => this.save());
    clear.addEventListener('click', () => this.edit({ kind: 'clear' }));
    r.append(
      $new(
        'div',
        { className: 'wd-head' },
        $new('h2', { textContent: 'Wind design' }),
        undo,
        redo,
        apply,
        save,
        clear,
        note,
      ),
    );

    // Adding parts.
    const [spacingLabel, spacing] = numberBox('wd-paint-spacing', '1', 'painted grid spacing', '°', 3);
    const adds = PATTERN_KINDS.map((k) => {
      const b = button(PATTERN_LABELS[k], `wd-add-${k}`, `Add a ${PATTERN_LABELS[k].toLowerCase()} part`);
      b.addEventListener('click', () => this.add(k));
      return b;
    });
    r.append(
      $new(
        'div',
        { className: 'row small wd-add' },
        $new('span', { textContent: 'Add a part:' }),
        ...adds,
        spacingLabel,
      ),
    );

    // Import.
    const file = $new('input', {
      type: 'file',
      id: 'wd-import',
      accept: '.csv,.nc,.cdf,text/csv,application/x-netcdf',
    });
    const q = $new('select', { id: 'wd-import-quantity' });
    q.add(new Option('stress, N m-2', 'stress'));
    q.add(new Option('wind, m s-1', 'wind'));
    const importMsg = $new('span', { id: 'wd-import-msg', className: 'field-msg' });
    file.addEventListener('change', async () => {
      const f = file.files?.[0];
      if (f) await this.importFile(f.name, () => pickedBytes(f, windFileKind(f.name)), q.value as 'stress' | 'wind');
      file.value = '';
    });
    r.append(
      $new(
        'div',
        { className: 'row small' },
        $new('label', { className: 'file-button' }, 'Import CSV or NetCDF…', file),
        $new('label', {}, 'values are ', q),
        importMsg,
      ),
    );

    const issues = $new('ul', { className: 'issues', id: 'wd-issues' });
    const parts = $new('ol', { className: 'wd-parts', id: 'wd-parts' });
    const editorHost = $new('div', { id: 'wd-editor-host' });
    const listCol = $new(
      'div',
      { className: 'wd-col' },
      $new('h3', { textContent: 'Parts (their stresses add up)' }),
      parts,
      issues,
    );
    const editCol = $new('div', { className: 'wd-col' }, $new('h3', { textContent: 'Selected part' }), editorHost);
    r.append(
      $new(
        'div',
        { className: 'wd-grid' },
        listCol,
        editCol,
        $new('div', { className: 'wd-col' }, this.toolsBox.el, this.preview.el, this.point.el),
      ),
    );

    // Undo and redo from the keyboard anywhere in the panel or on the tool canvas.
    const keys = (ev: KeyboardEvent) => {
      if (!(ev.ctrlKey || ev.metaKey)) return;
      const k = ev.key.toLowerCase();
      if (
        (ev.target as HTMLElement).tagName === 'TEXTAREA' ||
        ((ev.target as HTMLElement).tagName === 'INPUT' && (ev.target as HTMLInputElement).type === 'text')
      )
        return; // the box's own undo
      if (k === 'z' && !ev.shiftKey) this.undo();
      else if ((k === 'z' && ev.shiftKey) || k === 'y') this.redo();
      else return;
      ev.preventDefault();
    };
    r.addEventListener('keydown', keys);
    document.addEventListener('keydown', (ev) => {
      if (ev.target === this.tools.canvas) keys(ev);
    });
    return { note, undo, redo, apply, spacing, importMsg, issues, parts, editorHost };
  }

  // ---- the design ----
  /** A scenario was opened or loaded: the panel shows its wind (a new file starts a new history). */
  setScenario(json: Json): void {
    const another = scenarioKeyOf(json) !== this.design.scenarioKey;
    this.design = reduceDesign(this.design, { kind: 'load', scenario: json });
    this.point.startIn(this.basin());
    this.preview.offerDay(liveliestDay(this.design.wind, this.runDays(), this.seed()), another);
    this.changed({ rebuild: true });
  }

  /** The scenario with the designed wind, as JSON. */
  compose(): Json {
    return withWind(this.host.baseScenario(), this.design.wind);
  }

  text(): string {
    return `${JSON.stringify(this.compose(), null, 2)}\n`;
  }

  private basin(): BasinBox {
    return basinOf(this.host.baseScenario());
  }

  private runDays(): number {
    return runDaysOf(this.host.baseScenario());
  }

  private seed(): string {
    return seedOf(this.host.baseScenario());
  }

  /** The next state of the design, then the panel redrawn to it. */
  private dispatch(action: DesignAction, opts: { rebuild: boolean }): void {
    const before = this.design;
    this.design = reduceDesign(before, action);
    if (this.design !== before) this.changed(opts);
  }

  /** A change of the part list, with an undo step. */
  private edit(e: ListEdit): void {
    this.dispatch({ kind: 'edit', edit: e }, { rebuild: true });
  }

  private add(kind: PatternKind): void {
    let spacing = Number(this.el.spacing.value);
    if (kind === 'painted' && !(spacing >= 0.05 && spacing <= 10)) {
      this.toolsBox.say(
        `painted grid spacing must be a number of degrees between 0.05 and 10 (got '${this.el.spacing.value}')`,
      );
      return;
    }
    if (!Number.isFinite(spacing)) spacing = 1;
    const part = newPart(kind, this.basin(), spacing);
    this.edit({ kind: 'append', parts: [part] });
    // The tool that goes with the new part, so the next drag on the map shapes it.
    const tool = toolFor(part);
    if (tool) this.chooseTool(tool);
  }

  private select(k: number, part: WindPart): void {
    this.dispatch({ kind: 'select', index: k }, { rebuild: true });
    const tool = toolFor(part);
    if (tool && this.tools.mode !== 'off' && this.tools.mode !== 'point') this.chooseTool(tool);
  }

  private chooseTool(mode: ToolMode): void {
    this.toolsBox.show(mode);
    this.tools.setMode(mode);
  }

  private undo(): void {
    this.dispatch({ kind: 'undo' }, { rebuild: true });
  }

  private redo(): void {
    this.dispatch({ kind: 'redo' }, { rebuild: true });
  }

  // ---- showing it ----
  /** After any change: summaries at once, validation and preview on the next frame. */
  private changed(opts: { rebuild: boolean }): void {
    if (opts.rebuild) {
      renderPartsList(this.el.parts, this.design, {
        edit: (e) => this.edit(e),
        select: (k, part) => this.select(k, part),
      });
      this.renderEditor();
    } else updatePartSummaries(this.el.parts, this.design);
    this.el.undo.disabled = !canUndo(this.design);
    this.el.redo.disabled = !canRedo(this.design);
    this.el.note.textContent = notApplied(this.design)
      ? 'Not applied yet: the run on screen still uses its own wind.'
      : '';
    this.queueRefresh();
  }

  private queueRefresh(): void {
    this.refreshQueue.request();
  }

  /** Validate the composed scenario, show the messages, recompute the preview and the plots. */
  private refresh(): void {
    const json = this.compose();
    const r = validateScenario(json);
    this.issues = r.ok ? [] : r.errors;
    // The forcing the engine would build from it (formulas compiled and evaluated on the grid): a
    // scenario that validates but whose wind cannot be built is not runnable either.
    const forcing = r.ok ? forcingProblem(json) : null;
    if (forcing) this.issues = [forcing];
    const runnable = r.ok && !forcing;
    const routed = routeIssues(this.issues, this.design.selected, this.design.wind.parts.length);
    if (this.editor && this.design.selected !== null) this.editor.showIssues(routed.editor);
    this.el.issues.replaceChildren(...routed.elsewhere.map((i) => $new('li', { textContent: formatIssue(i) })));
    this.el.parts
      .querySelectorAll<HTMLElement>('li')
      .forEach((li, k) => li.classList.toggle('invalid', routed.invalid[k] ?? false));
    this.el.apply.disabled = !runnable;
    this.el.apply.title = runnable
      ? 'Start again from day 0 with this wind and the scenario panel\u2019s values, and run'
      : 'Not runnable yet: see the marked part';
    this.editor?.redrawPlot();
    this.preview.update(runnable, () => this.compose());
    this.point.update(runnable);
    this.tools.draw();
  }

  private renderEditor(): void {
    const k = this.design.selected;
    if (k === null || !this.design.wind.parts[k]) {
      this.editor = null;
      this.el.editorHost.replaceChildren($new('p', { className: 'hint', textContent: 'Select a part to edit it.' }));
      return;
    }
    this.editor = partEditor(this.design.wind.parts[k], {
      basin: this.basin(),
      runDays: this.runDays(),
      seed: this.seed(),
      index: k,
      markDay: () => this.modelDay,
      change: (part, { record, rebuild }) => this.dispatch({ kind: 'set-part', index: k, part, record }, { rebuild }),
    });
    this.el.editorHost.replaceChildren(this.editor.el);
  }

  /** Called by the page's draw: draws the preview if it is on. True when it drew. */
  drawOnMap(): boolean {
    if (!this.preview.active) return false;
    const ok = this.preview.drawOnMap();
    this.tools.draw();
    return ok;
  }

  /** The model day on screen, for the plots' markers. */
  setModelDay(day: number): void {
    if (day === this.modelDay) return;
    this.modelDay = day;
    this.editor?.redrawMarker();
    this.point.setModelDay(day);
  }

  /** Map layout changed: keep the tool canvas over the map. */
  layout(): void {
    this.tools.draw();
  }

  // ---- import, apply, save ----
  async importFile(
    name: string,
    bytes: Uint8Array | (() => Promise<Uint8Array>),
    quantity: 'stress' | 'wind',
  ): Promise<void> {
    const msg = this.el.importMsg;
    try {
      const series = readGridded(name, typeof bytes === 'function' ? await bytes() : bytes);
      const { parts, notes } = partsFromSeries(series, name, quantity, this.basin());
      this.edit({ kind: 'append', parts: parts as WindPart[] });
      msg.classList.remove('field-msg');
      msg.textContent = `${name}: ${series.nLon} x ${series.nLat} points stored in the scenario as ${parts.length === 1 ? 'a painted part' : `${parts.length} painted parts`}${notes.length ? `; ${notes.join('; ')}` : ''}.`;
    } catch (e) {
      msg.classList.add('field-msg');
      msg.textContent =
        e instanceof ImportError ? `Refused: ${e.message}` : `Refused: ${name}: ${(e as Error).message}`;
    }
  }

  private async applyDesign(): Promise<void> {
    const r = validateScenario(this.compose());
    const forcing = r.ok ? forcingProblem(this.compose()) : null;
    if (!r.ok || forcing) {
      this.host.message(
        `The wind design is not applied:\n${(r.ok ? [forcing!].map(formatIssue) : issueListLines(r.errors)).join('\n')}`,
      );
      return;
    }
    if (await this.host.apply(this.text(), this.host.fileName()))
      this.dispatch({ kind: 'applied' }, { rebuild: false });
  }

  private save(): void {
    const json = this.compose();
    const r = validateScenario(json);
    if (!r.ok) {
      this.host.message(`The scenario is not saved; fix these first:\n${issueListLines(r.errors).join('\n')}`);
      return;
    }
    const opened = this.host.openedScenario();
    const edited = this.host.valuesEdited() || JSON.stringify(windOf(opened)) !== JSON.stringify(this.design.wind);
    const named = savedName(json, opened, edited);
    const stem =
      String(named.name ?? 'scenario')
        .toLowerCase()
        .replace(/[^a-z0-9]+/g, '-')
        .replace(/^-|-$/g, '') || 'scenario';
    download(`${JSON.stringify(named, null, 2)}\n`, `${stem}.json`, 'application/json');
    if (named !== json)
      this.host.message(
        `Saved the edited scenario as ${stem}.json, named '${String(named.name)}' (the file it came from keeps its name).`,
        'info',
      );
  }
}

/**
 * The scenario as it is saved: an edited scenario that still has the name of the file it came
 * from gets "(edited)" added, so the download is named after the edited run, not the original.
 * The same object when nothing was edited or the name was changed already.
 */
export function savedName(json: Json, opened: Json, edited: boolean): Json {
  if (!edited || json.name !== opened.name) return json;
  const base = typeof json.name === 'string' && json.name ? json.name : 'scenario';
  return { ...json, name: `${base} (edited)` };
}
