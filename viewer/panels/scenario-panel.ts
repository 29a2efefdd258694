// The scenario panel: pick a shipped scenario or open a file, edit the physics and time values,
// see each value checked by the scenario validator (its message at the field) and the derived
// numbers follow as you type. The page only calls the validator and the derived-number functions.

import { issueListLines } from '../../model/scenario/errors.ts';
import {
  derivedNumbers,
  resolveScenario,
  validateScenario,
  validateScenarioText,
  type DerivedNumbers,
  type ScenarioIssue,
} from '../../model/scenario/index.ts';
import { scenarioRunRefusal } from '../../model/scenario/run-size.ts';
import { scenarioSchema, type SchemaNode } from '../../model/scenario/schema.ts';
import { formatValue } from './colour-bar.ts';

export interface ParamSpec {
  path: string;
  label: string;
  units: string;
  /** What an empty box means, if anything. */
  empty?: null | 'auto';
  emptyText?: string;
  /** A choice of words instead of a text box (the first is the default). */
  choices?: readonly string[];
}

export const PARAMS: ParamSpec[] = [
  { path: 'physics.reducedGravity', label: 'Reduced gravity g\u2032', units: 'm s-2' },
  { path: 'physics.layerThickness', label: 'Layer thickness H', units: 'm' },
  { path: 'physics.frictionDays', label: 'Friction time', units: 'days', empty: null, emptyText: 'empty: no friction' },
  { path: 'physics.viscosity', label: 'Viscosity A', units: 'm2 s-1' },
  { path: 'time.days', label: 'Run length', units: 'days' },
  { path: 'time.outputEveryDays', label: 'Output interval', units: 'days' },
  {
    path: 'time.dtSeconds',
    label: 'Time step dt',
    units: 's',
    empty: 'auto',
    emptyText: 'empty or "auto": from the stability limit',
  },
  {
    path: 'numerics.precision',
    label: 'Precision',
    units: '',
    choices: ['float64', 'float32'],
    emptyText: 'float32: half the memory traffic, about 1e-7 relative round-off',
  },
];

type Json = Record<string, unknown>;

function schemaAt(path: string): SchemaNode | undefined {
  let node: SchemaNode | undefined = scenarioSchema;
  for (const key of path.split('.')) node = node?.properties?.[key];
  return node;
}

/** "> 0, <= 1" from the schema's bounds at a path (the number branch of a oneOf). */
export function rangeText(path: string): string {
  let n = schemaAt(path);
  if (n?.oneOf) n = (n.oneOf as SchemaNode[]).find((b) => b.type === 'number') ?? n;
  if (!n) return '';
  const parts: string[] = [];
  if (n.exclusiveMinimum !== undefined) parts.push(`> ${n.exclusiveMinimum}`);
  if (n.minimum !== undefined) parts.push(`>= ${n.minimum}`);
  if (n.maximum !== undefined) parts.push(`<= ${n.maximum}`);
  if (n.exclusiveMaximum !== undefined) parts.push(`< ${n.exclusiveMaximum}`);
  return parts.join(', ');
}

export function getPath(obj: Json, path: string): unknown {
  let o: unknown = obj;
  for (const k of path.split('.')) o = o && typeof o === 'object' ? (o as Json)[k] : undefined;
  return o;
}

export function setPath(obj: Json, path: string, value: unknown): void {
  const keys = path.split('.');
  let o = obj;
  for (const k of keys.slice(0, -1)) {
    if (!o[k] || typeof o[k] !== 'object') o[k] = {};
    o = o[k] as Json;
  }
  const last = keys[keys.length - 1];
  if (value === undefined) delete o[last];
  else o[last] = value;
}

/** What a text box means: a number when it reads as one, else the text (the validator says why). */
export function readBox(text: string, spec: ParamSpec): unknown {
  if (spec.choices) return text;
  const t = text.trim();
  if (t === '' || (spec.empty === 'auto' && t === 'auto')) return spec.empty === undefined ? '' : spec.empty;
  const n = Number(t);
  return Number.isFinite(n) && /^[-+0-9.eE]+$/.test(t) ? n : t;
}

export interface PanelResult {
  valid: boolean;
  issues: ScenarioIssue[];
  derived: DerivedNumbers | null;
}

/** Validate an edited scenario and derive its numbers: pure, shared by the panel and the tests. */
export function checkEdited(json: Json): PanelResult {
  const r = validateScenario(json);
  if (!r.ok) return { valid: false, issues: r.errors, derived: null };
  const resolved = resolveScenario(r.scenario);
  const derived = derivedNumbers(resolved);
  // A run the engine would refuse (above the caps on steps or output; the page asks for no more) is
  // said here already, with the same words, and cannot be applied.
  const refusal = scenarioRunRefusal(resolved, {}, derived);
  if (refusal) return { valid: false, issues: [{ path: 'time', message: refusal }], derived };
  return { valid: true, issues: [], derived };
}

export class ScenarioPanel {
  /** The file as loaded (what the run on screen uses) and the edited copy. */
  private base: Json = {};
  edited: Json = {};
  /** The scenario as it was opened (a shipped file, a file, a saved run's copy), before any edit. */
  opened: Json = {};
  fileName = 'scenario.json';
  private boxes = new Map<string, HTMLInputElement | HTMLSelectElement>();
  private msgs = new Map<string, HTMLElement>();
  lastCheck: PanelResult = { valid: false, issues: [], derived: null };

  constructor(
    private readonly form: HTMLFormElement,
    private readonly derivedList: HTMLElement,
    private readonly otherIssues: HTMLUListElement,
    private readonly restartNote: HTMLElement,
    private readonly applyButton: HTMLButtonElement,
  ) {
    for (const spec of PARAMS) {
      const wrap = document.createElement('div');
      wrap.className = 'param';
      wrap.dataset.path = spec.path;
      const label = document.createElement('label');
      const name = document.createElement('span');
      name.textContent = spec.label;
      const box = spec.choices ? choiceBox(spec.choices) : textBox();
      box.name = spec.path;
      const unit = document.createElement('span');
      unit.className = 'unit';
      unit.textContent = spec.units;
      label.append(name, box, unit);
      const hint = document.createElement('div');
      hint.className = 'range-hint';
      hint.textContent = [rangeText(spec.path), spec.emptyText].filter(Boolean).join('; ');
      const msg = document.createElement('div');
      msg.className = 'field-msg';
      msg.id = `msg-${spec.path.replace('.', '-')}`;
      box.setAttribute('aria-describedby', msg.id);
      wrap.append(label, hint, msg);
      this.form.append(wrap);
      this.boxes.set(spec.path, box);
      this.msgs.set(spec.path, msg);
      box.addEventListener('input', () => this.onEdit());
      if (spec.choices) box.addEventListener('change', () => this.onEdit());
    }
    this.form.addEventListener('submit', (e) => e.preventDefault());
  }

  /** Show a scenario file's values (it becomes the run's scenario). */
  setScenario(json: Json, fileName: string): void {
    this.opened = structuredClone(json);
    this.base = structuredClone(json);
    this.edited = structuredClone(json);
    this.fileName = fileName;
    for (const spec of PARAMS) {
      const v = getPath(json, spec.path);
      const box = this.boxes.get(spec.path)!;
      if (spec.choices) {
        box.value = typeof v === 'string' && spec.choices.includes(v) ? v : spec.choices[0];
        continue;
      }
      box.value = v === undefined || v === null ? (spec.empty === 'auto' ? 'auto' : '') : String(v);
      if (v === undefined && spec.empty === undefined && box instanceof HTMLInputElement) box.placeholder = 'default';
    }
    this.onEdit();
  }

  /** Check a file's text before it goes to the engine: the same messages the command line prints. */
  static checkText(text: string, fileName: string): { ok: true; json: Json } | { ok: false; lines: string[] } {
    const r = validateScenarioText(text, fileName);
    // The capped list the command line prints too (errors.ts issueListLines).
    if (!r.ok) return { ok: false, lines: issueListLines(r.errors) };
    return { ok: true, json: JSON.parse(text) as Json };
  }

  /** The edited scenario as text, for the engine. */
  text(): string {
    return JSON.stringify(this.edited, null, 2);
  }

  changed(): boolean {
    return this.changedFrom(this.base);
  }

  /** Whether the boxes' values differ from a scenario's (the run's base, or the file as opened). */
  changedFrom(other: Json): boolean {
    // A value absent from the file reads as what its empty box means ("auto", no friction).
    const norm = (v: unknown, s: ParamSpec) =>
      JSON.stringify(v === undefined ? (s.choices ? s.choices[0] : s.empty === undefined ? null : s.empty) : v);
    return PARAMS.some((s) => norm(getPath(other, s.path), s) !== norm(getPath(this.edited, s.path), s));
  }

  private onEdit(): void {
    for (const spec of PARAMS) {
      const raw = this.boxes.get(spec.path)!.value;
      const v = readBox(raw, spec);
      // Leaving an optional box empty (or a choice at its default) falls back to the file's own value or the default.
      if ((v === '' || (spec.choices && v === spec.choices[0])) && getPath(this.base, spec.path) === undefined)
        setPath(this.edited, spec.path, undefined);
      else setPath(this.edited, spec.path, v);
    }
    const check = checkEdited(this.edited);
    this.lastCheck = check;
    const shown = new Set<ScenarioIssue>();
    for (const spec of PARAMS) {
      const mine = check.issues.filter((i) => i.path === spec.path || i.path.startsWith(`${spec.path}.`));
      mine.forEach((i) => shown.add(i));
      const msg = this.msgs.get(spec.path)!;
      msg.textContent = mine.map((i) => i.message).join('; ');
      const wrap = msg.parentElement!;
      wrap.classList.toggle('invalid', mine.length > 0);
      this.boxes.get(spec.path)!.setAttribute('aria-invalid', String(mine.length > 0));
    }
    this.otherIssues.replaceChildren(
      ...issueListLines(check.issues.filter((i) => !shown.has(i))).map((line) => {
        const li = document.createElement('li');
        li.textContent = line;
        return li;
      }),
    );
    this.restartNote.hidden = !this.changed();
    this.applyButton.disabled = !check.valid;
    this.showDerived(check.derived);
  }

  /**
   * The engine now runs `json` (applied from elsewhere, e.g. the wind designer): it becomes the
   * base, and the boxes keep what they hold, so a value typed while it loaded is not lost.
   */
  ranWith(json: Json): void {
    this.base = structuredClone(json);
    this.edited = structuredClone(json);
    this.onEdit();
  }

  revert(): void {
    this.setScenario(this.base, this.fileName);
  }

  /** After the engine accepted the edited scenario, it is the base. */
  commit(): void {
    this.base = structuredClone(this.edited);
    this.onEdit();
  }

  /** The coupled mode as the running model shows it (the page sets it from the engine's samples). */
  private coupledMode = 'measured as the run goes';

  /** Show the coupled mode measured so far in the derived numbers (kept across re-renders until the next run). */
  setCoupledMode(text: string): void {
    this.coupledMode = text;
    const dt = [...this.derivedList.querySelectorAll('dt')].find((e) => e.textContent === COUPLED_MODE_ROW);
    const dd = dt?.nextElementSibling;
    if (dd && dd.textContent !== text) dd.textContent = text;
  }

  private showDerived(d: DerivedNumbers | null): void {
    if (!d) {
      this.derivedList.replaceChildren(
        Object.assign(document.createElement('dd'), { textContent: 'fix the marked values to see them' }),
      );
      return;
    }
    const rows: Array<[string, string, boolean?]> = [
      ['Kelvin speed c = \u221a(g\u2032H)', `${formatValue(d.c)} m/s`],
      ['Equatorial radius L = \u221a(c/\u03b2)', `${formatValue(d.equatorialRadiusKm)} km`],
      ['Kelvin crossing time', `${formatValue(d.kelvinCrossingDays)} days`],
      [
        'Long Rossby speed c/3',
        `${formatValue(d.rossbySpeed)} m/s, crossing ${formatValue(d.rossbyCrossingDays)} days`,
      ],
      ['Grid', `${d.nx} \u00d7 ${d.ny} cells, ${formatValue(d.dxKm)} \u00d7 ${formatValue(d.dyKm)} km`],
      ['Time step dt', `${formatValue(d.dt)} s${d.dtIsAuto ? ' (auto)' : ''}`, d.dt > d.stability.dtMax],
      ['dt limit', `${formatValue(d.stability.dtMax)} s (${d.stability.limitingTerm})`],
      ['Western boundary layer', boundaryLayerText(d), !d.boundaryLayer.resolved],
      ['Steps, saved frames', `${d.steps.toLocaleString('en')}, ${d.outputs}`],
      ['Solver memory', `${(d.memoryBytes / 1e6).toFixed(1)} MB`],
    ];
    const a = d.answering;
    if (a) {
      rows.push(
        [
          'Answering wind',
          `${formatValue(a.strength)} m/s per K, every ${a.everySteps} steps (${formatValue(a.couplingDays)} days)`,
        ],
        ['Atmosphere radius \u221a(c\u2090/\u03b2)', `${formatValue(a.atmosphereRadiusKm)} km`],
        [
          'Kelvin, Rossby decay c\u2090/\u03b5, c\u2090/3\u03b5',
          `${formatValue(a.kelvinDecayKm)}, ${formatValue(a.rossbyDecayKm)} km`,
        ],
        ['SST relaxation 1/(w + \u03b5\u209c)', `${formatValue(a.sstRelaxationDays)} days`],
        [COUPLED_MODE_ROW, this.coupledMode],
      );
    }
    this.derivedList.replaceChildren(
      ...rows.flatMap(([k, v, bad]) => {
        const dt = document.createElement('dt');
        dt.textContent = k;
        const dd = document.createElement('dd');
        dd.textContent = v;
        if (bad) dd.classList.add('bad');
        return [dt, dd];
      }),
    );
    if (d.boundaryLayer.advice) {
      const advice = document.createElement('dd');
      advice.className = 'bad advice';
      advice.textContent = `Unresolved: ${d.boundaryLayer.advice}.`;
      this.derivedList.append(advice);
    }
  }
}

const COUPLED_MODE_ROW = 'Coupled mode (period, growth)';

function textBox(): HTMLInputElement {
  const box = document.createElement('input');
  box.type = 'text';
  box.inputMode = 'decimal';
  box.autocomplete = 'off';
  return box;
}

function choiceBox(choices: readonly string[]): HTMLSelectElement {
  const box = document.createElement('select');
  for (const c of choices) box.add(new Option(c, c));
  return box;
}

/** Munk and Stommel widths against dx (the wider one sets the layer), as the derived list shows them. */
function boundaryLayerText(d: DerivedNumbers): string {
  const b = d.boundaryLayer;
  if (!Number.isFinite(b.intervals)) return 'none (no beta effect)';
  const width = Math.max(b.munkKm, b.stommelKm);
  const by = b.munkKm >= b.stommelKm ? 'Munk' : 'Stommel';
  return `${formatValue(width)} km (${by}), ${b.intervals.toFixed(2)} \u00d7 dx`;
}
