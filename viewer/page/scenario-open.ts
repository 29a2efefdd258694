// Opening a scenario: the shipped ones (vite's JSON import) in the picker, a file chosen or dropped
// on the page, and the library's "open". A scenario that does not validate gets the validator's own
// lines and the run on screen stays.

import { ScenarioPanel } from '../panels/scenario-panel.ts';
import { pickedScenarioText } from '../picked-file.ts';
import { $ } from './dom.ts';
import type { Page } from './page.ts';
import type { RunLifecycle } from './run-lifecycle.ts';

export interface ShippedScenario {
  file: string;
  json: Record<string, unknown>;
}

/** The scenarios in configs/, the westerly burst first. */
export function shippedScenarios(): ShippedScenario[] {
  const files = import.meta.glob('../../configs/*.json', { eager: true, import: 'default' }) as Record<
    string,
    Record<string, unknown>
  >;
  return Object.entries(files)
    .filter(([path]) => !path.endsWith('.schema.json'))
    .map(([path, json]) => ({ file: path.split('/').pop()!, json }))
    .sort((a, b) =>
      a.file === 'westerly-burst.json' ? -1 : b.file === 'westerly-burst.json' ? 1 : a.file.localeCompare(b.file),
    );
}

export class ScenarioOpener {
  constructor(
    private readonly page: Page,
    private readonly runs: RunLifecycle,
    private readonly shipped: ShippedScenario[],
  ) {}

  /** A picked or dropped scenario file: size and encoding checked as on the command line (picked-file.ts). */
  async openFile(file: File): Promise<void> {
    const r = await pickedScenarioText(file);
    if (r.ok) return this.open(r.text, file.name);
    this.page.notices.clear();
    this.page.notices.message(`${file.name}: ${r.message}`);
  }

  async open(text: string, fileName: string): Promise<void> {
    const { notices, panel, windPanel } = this.page;
    notices.clear();
    const check = ScenarioPanel.checkText(text, fileName);
    if (!check.ok) {
      // The validator's own lines, as `pycno check` prints them; the run on screen stays.
      notices.message(check.lines.join('\n'));
      return;
    }
    // The panels show the scenario before the engine has it, so a value typed the moment the
    // status says "ready to run" lands in a box that stays (never overwritten after the load).
    panel.setScenario(check.json, fileName);
    windPanel.setScenario(check.json);
    if (await this.runs.load(text, fileName)) {
      // Show an opened file in the picker too, so the panel never names the wrong scenario.
      const pick = $<HTMLSelectElement>('scenario-pick');
      if (!this.shipped.some((s) => s.file === fileName)) {
        pick.querySelector('option[data-opened]')?.remove();
        const o = new Option(`${String(check.json.name ?? fileName)} (opened ${fileName})`, `opened:${fileName}`);
        o.dataset.opened = '1';
        pick.append(o);
        pick.value = o.value;
      } else pick.value = fileName;
    }
  }

  openShipped(s: ShippedScenario): Promise<void> {
    return this.open(JSON.stringify(s.json, null, 2), s.file);
  }

  /** The picker, the file input and drag-and-drop onto the page. */
  wire(): void {
    const pick = $<HTMLSelectElement>('scenario-pick');
    pick.replaceChildren(
      ...this.shipped.map((s) => new Option(`${String(s.json.name ?? s.file)} (${s.file})`, s.file)),
    );
    pick.addEventListener('change', () => {
      const s = this.shipped.find((x) => x.file === pick.value);
      if (s) void this.openShipped(s);
    });
    $<HTMLInputElement>('scenario-file').addEventListener('change', async (ev) => {
      const input = ev.target as HTMLInputElement;
      const file = input.files?.[0];
      if (file) await this.openFile(file);
      input.value = '';
    });
    document.addEventListener('dragover', (ev) => {
      ev.preventDefault();
      document.body.classList.add('dropping');
    });
    document.addEventListener('dragleave', (ev) => {
      if (ev.target === document.documentElement || ev.target === document.body)
        document.body.classList.remove('dropping');
    });
    document.addEventListener('drop', async (ev) => {
      ev.preventDefault();
      document.body.classList.remove('dropping');
      const file = ev.dataTransfer?.files?.[0];
      if (file) await this.openFile(file);
    });
  }
}
