// The run library in the page: save the run on screen (name, notes, snapshot interval with the
// size shown first), the list of saved runs (rename, notes, delete with undo, duplicate as a new
// scenario, export as CF-NetCDF, import a Pycno NetCDF by picker or drop, report, open), the
// opened run's view and the comparison of two runs. The library itself is viewer/library/store.ts.

import { latLabel, lonLabel } from '../../model/display/coordinates.ts';
import type { RunData } from '../../model/io/run-data.ts';
import { toNetcdf } from '../../model/io/run-export.ts';
import { runReport } from '../../model/report/report.ts';
import { formatBytes } from '../state/frame-history.ts';
import { LibraryError, RunLibrary, estimateSize, type SavedRunMeta } from '../library/store.ts';
import type { LoadedScenario, OutputSample } from '../../worker/protocol.ts';
import { CompareView, type CompareChoice } from '../compare/compare-view.ts';
import { button, el, shortDate } from './dom.ts';
import { download, fileSafe } from '../files.ts';
import { pickedBytes } from '../picked-file.ts';
import { LiveRun, snapshotChoices } from './live-run.ts';
import { RunView } from './run-view.ts';
import { SummaryView } from './summary-view.ts';
import { isSummaryFile, readSummary, SummaryFileError } from '../../model/ensemble/summary-read.ts';

export interface LibraryHost {
  /** Ask the engine for full fields in every k-th output sample. */
  setSampleFields(every: number): Promise<void>;
  /** Validate and load a scenario text into the scenario panel and the engine. */
  openScenario(text: string, fileName: string): Promise<void>;
  message(text: string, kind?: 'error' | 'info'): void;
  /** Output interval of the run on screen, days (for the snapshot choices' labels). */
  outputEveryDays(): number;
}

/** Snapshot fields the page keeps for saving the run on screen. */
const LIVE_BUDGET = 160e6;

/**
 * The size a saved run aims at by default: the first choice of the save form whose estimate is
 * at most this, so a browser's storage holds dozens of runs (the user can still keep every map).
 */
export const DEFAULT_SAVE_BYTES = 16e6;

/** The default snapshot interval among the choices: the finest one within DEFAULT_SAVE_BYTES, else the coarsest. */
export function defaultSnapshotChoice(choices: readonly number[], size: (every: number) => number): number {
  return choices.find((k) => size(k) <= DEFAULT_SAVE_BYTES) ?? choices[choices.length - 1];
}

function summaryLine(m: SavedRunMeta): string {
  const s = m.summary;
  const b = s.basin;
  const parts = [
    s.scenarioName,
    `${lonLabel(b.lonWest)}–${lonLabel(b.lonEast)}, ${latLabel(b.latSouth)}–${latLabel(b.latNorth)} at ${b.resolution}`,
    `g′ ${s.reducedGravity} m s-2, H ${s.layerThickness} m, friction ${s.frictionDays === null ? 'none' : `${s.frictionDays} days`}, ${s.dynamics}`,
    s.windParts.length ? `wind: ${s.windParts.join('; ')}` : 'no wind',
    `days ${+m.firstDay.toFixed(2)}–${+m.lastDay.toFixed(2)}, ${m.records} records, ${m.snapshots} maps (every ${m.snapshotEvery})`,
  ];
  return parts.join(' · ');
}

export class LibraryPage {
  private lib: RunLibrary | null = null;
  private readonly live = new LiveRun(LIVE_BUDGET);
  private liveStatus = '';
  private metas: SavedRunMeta[] = [];
  private prepared: RunData | null = null;
  private readonly cache = new Map<string, RunData>();
  private readonly view: RunView;
  private readonly summaryView = new SummaryView();
  private readonly compareView: CompareView;
  private readonly list = el('ul', { id: 'lib-list', className: 'lib-list' });
  private readonly undoBar = el('div', { id: 'lib-undo', className: 'lib-undo' });
  private readonly panelMsg = el('p', { id: 'lib-msg', className: 'lib-msg', role: 'status' });
  private readonly saveBtn = button('Save this run…', {
    id: 'lib-save-open',
    title: 'Save the run on screen in the library',
  });
  private readonly saveForm = el('form', { id: 'lib-save-form', className: 'lib-save', hidden: true });
  private readonly saveName = el('input', { id: 'lib-save-name', type: 'text', size: 30, autocomplete: 'off' });
  private readonly saveNotes = el('textarea', { id: 'lib-save-notes', rows: 2, cols: 30 });
  private readonly saveEvery = el('select', { id: 'lib-save-every', 'aria-label': 'snapshot interval' });
  private readonly saveWhat = el('p', { id: 'lib-save-what', className: 'hint' });
  private readonly saveMsg = el('p', { id: 'lib-save-msg', className: 'field-msg', role: 'alert' });
  private readonly storageLine = el('p', { id: 'lib-storage', className: 'hint' });
  private readonly importInput = el('input', {
    id: 'lib-import',
    type: 'file',
    accept: '.nc,application/x-netcdf,application/netcdf',
  });
  ready = false;

  constructor(
    private readonly root: HTMLElement,
    compareRoot: HTMLElement,
    private readonly host: LibraryHost,
  ) {
    this.view = new RunView((t, k) => this.say(t, k));
    this.compareView = new CompareView({ runFor: (v) => this.runFor(v), say: (t, k) => this.say(t, k) });
    this.build();
    compareRoot.append(el('h2', {}, 'Compare two runs'), this.compareView.root);
    void this.host.setSampleFields(1);
    void this.openLibrary();
    (window as unknown as { __pycnoLibrary: unknown }).__pycnoLibrary = {
      ready: () => this.ready,
      runs: () =>
        this.metas.map((m) => ({
          id: m.id,
          name: m.name,
          notes: m.notes,
          sizeBytes: m.sizeBytes,
          snapshots: m.snapshots,
          records: m.records,
          frictionDays: m.summary.frictionDays,
        })),
      live: () => ({
        records: this.live.length,
        lastDay: this.live.lastDay,
        keptEvery: this.live.keptEvery,
        snapshots: this.live.snapshotCount(),
      }),
      compare: () => this.compareView.state,
      viewWaves: () => this.view.lastWaves,
      viewShown: () => this.view.shown,
      summary: () => this.summaryView.state,
    };
  }

  // ---- the run on screen ----
  runStarted(r: LoadedScenario): void {
    this.live.reset(r);
    this.prepared = null;
    this.saveForm.hidden = true;
    void this.host.setSampleFields(1);
    this.updateSaveButton();
  }

  sample(s: OutputSample): void {
    const every = this.live.add(s);
    if (every !== null) {
      void this.host.setSampleFields(every);
      this.liveStatus = `The page keeps a map of every ${every} output intervals of this run (memory limit ${formatBytes(this.live.budget)}).`;
    }
    if (this.live.length === 1 || every !== null) this.updateSaveButton();
  }

  /** The maps the page keeps of the run on screen (for a probe added later), and how often. */
  keptMaps(): { days: number[]; maps: Array<Partial<Record<string, Float32Array>>>; every: number } {
    return { ...this.live.keptMaps(), every: this.live.keptEvery };
  }

  private updateSaveButton(): void {
    this.saveBtn.disabled = this.live.length === 0 || this.lib === null;
    this.saveBtn.title =
      this.live.length === 0
        ? 'Run the model first: there is no output to save yet'
        : 'Save the run on screen in the library';
    const hint = this.root.querySelector('#lib-live-note');
    if (hint) hint.textContent = this.liveStatus;
  }

  // ---- building ----
  private build(): void {
    const saveGo = button('Save', { id: 'lib-save', type: 'submit' });
    const saveCancel = button('Cancel', { id: 'lib-save-cancel' });
    this.saveForm.append(
      el('div', { className: 'row' }, el('label', {}, 'Name ', this.saveName)),
      el('div', { className: 'row' }, el('label', { className: 'lib-notes-label' }, 'Notes ', this.saveNotes)),
      el('div', { className: 'row' }, el('label', {}, 'Maps kept ', this.saveEvery)),
      this.saveWhat,
      el('div', { className: 'row' }, saveGo, saveCancel),
      this.saveMsg,
    );
    this.saveForm.addEventListener('submit', (ev) => {
      ev.preventDefault();
      void this.save();
    });
    saveCancel.addEventListener('click', () => {
      this.saveForm.hidden = true;
      this.prepared = null;
    });
    this.saveEvery.addEventListener('change', () => this.describeSave());
    this.saveBtn.disabled = true;
    this.saveBtn.addEventListener('click', () => this.openSaveForm());
    this.importInput.addEventListener('change', async () => {
      const f = this.importInput.files?.[0];
      this.importInput.value = '';
      if (f) await this.importFile(f);
    });
    const drop = el(
      'div',
      { id: 'lib-drop', className: 'lib-drop' },
      el('label', { className: 'file-button' }, 'Import NetCDF…', this.importInput),
      el('span', { className: 'hint' }, 'or drop a Pycno run file or sweep summary (.nc) here'),
    );
    // A file dropped on the library goes to the library, not to the scenario loader of the page.
    this.root.addEventListener('dragover', (ev) => {
      ev.preventDefault();
      ev.stopPropagation();
      this.root.classList.add('lib-dropping');
    });
    this.root.addEventListener('dragleave', (ev) => {
      if (ev.target === this.root) this.root.classList.remove('lib-dropping');
    });
    this.root.addEventListener('drop', (ev) => {
      ev.preventDefault();
      ev.stopPropagation();
      this.root.classList.remove('lib-dropping');
      document.body.classList.remove('dropping');
      const f = ev.dataTransfer?.files?.[0];
      if (f) void this.importFile(f);
    });
    this.root.append(
      el('h2', {}, 'Saved runs'),
      el(
        'div',
        { className: 'lib-grid' },
        el(
          'div',
          { className: 'lib-side' },
          el('div', { className: 'row' }, this.saveBtn, drop),
          el('p', { id: 'lib-live-note', className: 'hint' }),
          this.saveForm,
          this.storageLine,
          this.panelMsg,
          this.undoBar,
          this.summaryView.root,
          this.list,
        ),
        this.view.root,
      ),
    );
  }

  private say(text: string, kind: 'error' | 'info' = 'error'): void {
    this.panelMsg.textContent = text;
    this.panelMsg.classList.toggle('bad', kind === 'error');
    this.host.message(text, kind);
  }

  private async openLibrary(): Promise<void> {
    try {
      this.lib = await RunLibrary.open();
    } catch (e) {
      this.say((e as Error).message);
      this.list.replaceChildren(
        el('li', { className: 'hint' }, 'The run library is not available in this browser window.'),
      );
      return;
    }
    await this.refresh();
    this.updateSaveButton();
    this.ready = true;
  }

  // ---- saving ----
  private openSaveForm(): void {
    const run = this.live.toRunData();
    if (!run) {
      this.say('Nothing to save yet: run the model first.', 'info');
      return;
    }
    this.prepared = run;
    this.saveName.value = `${run.name}, day ${+run.days[run.days.length - 1].toFixed(1)}`;
    this.saveNotes.value = '';
    this.saveMsg.textContent = '';
    const per = this.host.outputEveryDays();
    const choices = snapshotChoices(this.live.keptEvery, run.days.length);
    this.saveEvery.replaceChildren(
      ...choices.map((k) => {
        const kept = run.snapshots.filter((s) => s.index % k === 0).length;
        return new Option(
          `every ${+(k * per).toFixed(3)} days: ${kept} maps, about ${formatBytes(estimateSize(run, k))}`,
          String(k),
        );
      }),
    );
    this.saveEvery.value = String(defaultSnapshotChoice(choices, (k) => estimateSize(run, k)));
    this.describeSave();
    this.saveForm.hidden = false;
    this.saveName.focus();
  }

  private describeSave(): void {
    const run = this.prepared;
    if (!run) return;
    const k = Number(this.saveEvery.value);
    this.saveWhat.textContent = `The run up to day ${+run.days[run.days.length - 1].toFixed(2)}: ${run.days.length} output records with every series in full, maps every ${k} records; about ${formatBytes(estimateSize(run, k))} in this browser.`;
  }

  private async save(): Promise<void> {
    const lib = this.lib;
    const run = this.prepared;
    if (!lib || !run) return;
    const name = this.saveName.value.trim();
    if (!name) {
      this.saveMsg.textContent = 'Name: give the run a name (it may not be empty).';
      this.saveName.focus();
      return;
    }
    this.saveMsg.textContent = 'saving…';
    try {
      // One transaction: on any failure (a full storage included) nothing is written.
      const meta = await lib.save(run, {
        snapshotEvery: Number(this.saveEvery.value),
        name,
        notes: this.saveNotes.value,
      });
      this.saveMsg.textContent = '';
      this.saveForm.hidden = true;
      this.prepared = null;
      this.say(`Saved '${meta.name}' (about ${formatBytes(meta.sizeBytes)}).`, 'info');
      await this.refresh();
    } catch (e) {
      this.saveMsg.textContent = (e as Error).message;
      this.host.message((e as Error).message);
    }
  }

  // ---- the list ----
  private async refresh(): Promise<void> {
    if (!this.lib) return;
    this.metas = await this.lib.list();
    for (const id of [...this.cache.keys()]) if (!this.metas.some((m) => m.id === id)) this.cache.delete(id);
    this.list.replaceChildren(
      ...(this.metas.length
        ? this.metas.map((m) => this.item(m))
        : [el('li', { className: 'hint' }, 'No saved runs yet. Run a scenario and save it, or import a run file.')]),
    );
    void this.showStorage();
    const choices: CompareChoice[] = this.metas.map((m) => ({
      value: m.id,
      label: `${m.name} (saved ${shortDate(m.savedAt)})`,
    }));
    choices.push({ value: 'live', label: 'the run on screen (live)' });
    this.compareView.setChoices(choices);
  }

  /** What the saved runs take, and what the browser says is left for this page. */
  private async showStorage(): Promise<void> {
    const used = this.metas.reduce((sum, m) => sum + m.sizeBytes, 0);
    const runs = `${this.metas.length} saved ${this.metas.length === 1 ? 'run' : 'runs'}, about ${formatBytes(used)}`;
    let left = 'the browser does not say how much space is left';
    try {
      const est = await navigator.storage?.estimate?.();
      if (est && typeof est.quota === 'number' && typeof est.usage === 'number') {
        left = `this page uses ${formatBytes(est.usage)} of the browser's storage, about ${formatBytes(Math.max(0, est.quota - est.usage))} left`;
        this.storageLine.dataset.usage = String(est.usage);
        this.storageLine.dataset.left = String(Math.max(0, est.quota - est.usage));
      }
    } catch {
      /* left unknown */
    }
    this.storageLine.dataset.used = String(used);
    this.storageLine.textContent = `Storage: ${runs}; ${left}.`;
  }

  private item(m: SavedRunMeta): HTMLLIElement {
    const name = el('strong', { className: 'lib-name' }, m.name);
    const li = el(
      'li',
      { className: 'lib-item', 'data-id': m.id, 'data-name': m.name },
      el(
        'div',
        { className: 'lib-item-head' },
        name,
        el('span', { className: 'lib-date' }, `saved ${shortDate(m.savedAt)}`),
        el('span', { className: 'lib-size' }, formatBytes(m.sizeBytes)),
      ),
      el('div', { className: 'lib-summary' }, summaryLine(m)),
    );
    if (m.notes) li.append(el('div', { className: 'lib-notes' }, m.notes));
    const act = (text: string, cls: string, f: () => Promise<void>, title = '') => {
      const b = button(text, { className: cls, title });
      b.addEventListener(
        'click',
        () => void f().catch((e: unknown) => this.say(`'${m.name}': ${(e as Error).message}`)),
      );
      return b;
    };
    const edit = el('div', { className: 'lib-edit' });
    li.append(
      el(
        'div',
        { className: 'row small lib-actions' },
        act('Open', 'lib-open', () => this.open(m)),
        act(
          'Compare…',
          'lib-compare',
          async () => this.compareWith(m),
          'Compare this run (B) with the next older one (A)',
        ),
        act('Rename', 'lib-rename', async () => this.editText(edit, m, 'name')),
        act('Notes', 'lib-notes-edit', async () => this.editText(edit, m, 'notes')),
        act(
          'Duplicate as scenario',
          'lib-duplicate',
          () => this.duplicate(m),
          'Load this run\u2019s scenario into the scenario panel as a new scenario',
        ),
        act('Export NetCDF', 'lib-export', () => this.exportRun(m)),
        act('Report', 'lib-report', () => this.report(m), 'Download the one-page report (HTML)'),
        act('Delete', 'lib-delete', () => this.remove(m)),
      ),
      edit,
    );
    return li;
  }

  private editText(host: HTMLElement, m: SavedRunMeta, what: 'name' | 'notes'): void {
    const input =
      what === 'name'
        ? el('input', {
            type: 'text',
            value: m.name,
            size: 30,
            className: 'lib-rename-input',
            'aria-label': `new name of ${m.name}`,
          })
        : el('textarea', {
            value: m.notes,
            rows: 3,
            cols: 40,
            className: 'lib-notes-input',
            'aria-label': `notes of ${m.name}`,
          });
    const ok = button(what === 'name' ? 'Save name' : 'Save notes', { className: 'lib-edit-ok' });
    const cancel = button('Cancel');
    const msg = el('span', { className: 'field-msg' });
    host.replaceChildren(input, ok, cancel, msg);
    input.focus();
    cancel.addEventListener('click', () => host.replaceChildren());
    const commit = async () => {
      try {
        if (what === 'name') await this.lib!.rename(m.id, input.value);
        else await this.lib!.setNotes(m.id, input.value);
        await this.refresh();
      } catch (e) {
        msg.textContent = (e as Error).message;
      }
    };
    ok.addEventListener('click', () => void commit());
    input.addEventListener('keydown', (ev) => {
      const k = ev as KeyboardEvent;
      if (k.key === 'Enter' && (what === 'name' || k.ctrlKey)) void commit();
      if (k.key === 'Escape') host.replaceChildren();
    });
  }

  private async get(id: string): Promise<RunData> {
    let r = this.cache.get(id);
    if (!r) {
      r = await this.lib!.get(id);
      // A few opened runs stay at hand for comparing; the library holds them all anyway.
      if (this.cache.size >= 4) this.cache.delete(this.cache.keys().next().value!);
      this.cache.set(id, r);
    }
    return r;
  }

  private async open(m: SavedRunMeta): Promise<void> {
    this.view.show(await this.get(m.id), m.name);
  }

  private compareWith(m: SavedRunMeta): void {
    const k = this.metas.findIndex((x) => x.id === m.id);
    const older = this.metas[k + 1] ?? this.metas[k - 1];
    this.compareView.pick(older ? older.id : 'live', m.id);
    void this.compareView.compare();
    this.compareView.root.scrollIntoView({ block: 'start' });
  }

  private async runFor(value: string): Promise<{ run: RunData; label: string } | null> {
    if (value === 'live') {
      const run = this.live.toRunData();
      if (!run) {
        this.say('The run on screen has no output yet: press Run first, or pick a saved run.');
        return null;
      }
      return { run, label: `the run on screen (${run.name}, to day ${+run.days[run.days.length - 1].toFixed(1)})` };
    }
    const m = this.metas.find((x) => x.id === value);
    if (!m) {
      this.say('That saved run is no longer in the library.');
      return null;
    }
    try {
      return { run: await this.get(value), label: m.name };
    } catch (e) {
      this.say((e as Error).message);
      return null;
    }
  }

  private async duplicate(m: SavedRunMeta): Promise<void> {
    const text = await this.lib!.duplicateScenario(m.id, `${m.summary.scenarioName || m.name} (copy of '${m.name}')`);
    await this.host.openScenario(text, `${fileSafe(m.name)}-copy.json`);
  }

  /** The CF-NetCDF file of a saved run, with its progress on the panel's message line. */
  private async exportRun(m: SavedRunMeta): Promise<void> {
    const say = (t: string) => {
      this.panelMsg.textContent = t;
      this.panelMsg.classList.remove('bad');
    };
    say(`Exporting '${m.name}': reading it from the library…`);
    const run = await this.get(m.id);
    const bytes = await toNetcdf(run, {
      progress: async (done, total) => {
        say(`Exporting '${m.name}': ${Math.round((100 * done) / total)} %`);
        this.panelMsg.dataset.progress = String(done / total);
        // Let the page draw the line (and stay responsive) between the steps.
        await new Promise((r) => setTimeout(r, 0));
      },
    });
    download(bytes, `${fileSafe(m.name)}.nc`, 'application/x-netcdf');
    const maps =
      run.snapshots.length === run.days.length
        ? `${run.snapshots.length} maps, one per record`
        : `${run.snapshots.length} kept maps on their own time axis map_time`;
    say(
      `Exported '${m.name}': ${fileSafe(m.name)}.nc, ${formatBytes(bytes.length)} (${maps}; the series of all ${run.days.length} records).`,
    );
    this.panelMsg.dataset.bytes = String(bytes.length);
  }

  private async report(m: SavedRunMeta): Promise<void> {
    download(
      runReport(await this.get(m.id), { source: `the run library ('${m.name}')` }),
      `${fileSafe(m.name)}-report.html`,
      'text/html',
    );
  }

  private async remove(m: SavedRunMeta): Promise<void> {
    await this.lib!.remove(m.id);
    if (this.view.shown === m.name) this.view.close();
    const undo = button('Undo', { className: 'lib-undo-btn' });
    const bar = el(
      'div',
      { className: 'lib-undo-row', 'data-id': m.id },
      `Deleted '${m.name}'. It can be brought back until the page is reloaded. `,
      undo,
    );
    undo.addEventListener('click', async () => {
      try {
        await this.lib!.undoRemove(m.id);
        bar.remove();
        await this.refresh();
      } catch (e) {
        this.say((e as Error).message);
      }
    });
    this.undoBar.append(bar);
    await this.refresh();
  }

  private async importFile(file: File): Promise<void> {
    let bytes: Uint8Array;
    try {
      // The command line's limits: a file over the run-file cap is refused before it is read.
      bytes = await pickedBytes(file, 'runFile');
    } catch (e) {
      this.say(`not opened: ${file.name}: ${(e as Error).message}`);
      return;
    }
    // A sweep summary (pycno sweep --gather) is shown, not saved: it holds no run.
    if (isSummaryFile(bytes)) {
      try {
        this.summaryView.show(readSummary(bytes, file.name), file.name);
        this.say(`Opened the sweep summary ${file.name}.`, 'info');
      } catch (e) {
        this.say(
          e instanceof SummaryFileError
            ? `not opened: ${e.message}`
            : `not opened: ${file.name}: ${(e as Error).message}`,
        );
      }
      return;
    }
    if (!this.lib) return;
    try {
      const meta = await this.lib.importNetcdf(bytes, file.name, {
        name: `${file.name.replace(/\.nc$/i, '')} (imported)`,
        notes: `imported from ${file.name}`,
      });
      this.say(`Imported '${meta.name}' from ${file.name}.`, 'info');
      await this.refresh();
    } catch (e) {
      // The reader's own message: what is wrong with the file and where.
      this.say(e instanceof LibraryError ? e.message : `not imported: ${file.name}: ${(e as Error).message}`);
    }
  }
}
