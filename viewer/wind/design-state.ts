// The wind designer's state and every change to it, without the DOM: the design (the scenario's
// wind section), the selected part, what the running scenario has applied, and the undo timeline;
// a reducer takes a state and an action and returns the next state. Also what the panel derives
// from it: where each validator issue goes (the editor of the selected part, or the list under the
// parts), the day worth previewing, and the basin, length and seed of the edited scenario.
// The panel (wind-panel.ts) only renders this and turns clicks into actions; tests run it in Node.

import type { WindPart } from '../../model/forcing/spec.ts';
import type { ScenarioIssue } from '../../model/scenario/errors.ts';
import { deletePart, duplicatePart, movePart, setEnabled, windOf, type BasinBox, type WindSection } from './design.ts';
import { dayAxis, partSeries } from './envelope-plot.ts';
import { emptyTimeline, recorded, redone, undone, type Timeline } from './history.ts';

type Json = Record<string, unknown>;

export interface DesignState {
  readonly wind: WindSection;
  readonly selected: number | null;
  /** The wind as the running scenario has it (JSON text), to tell the user what is not applied yet. */
  readonly appliedText: string;
  /** Which scenario the timeline belongs to (its name and basin): another one starts afresh. */
  readonly scenarioKey: string;
  readonly timeline: Timeline<WindSection>;
}

/** A change of the part list; each is one undo step. */
export type ListEdit =
  | { kind: 'append'; parts: WindPart[] }
  | { kind: 'clear' }
  | { kind: 'enable'; index: number; on: boolean }
  | { kind: 'move'; index: number; by: -1 | 1 }
  | { kind: 'duplicate'; index: number }
  | { kind: 'delete'; index: number };

export type DesignAction =
  /** A scenario was opened or loaded: its wind becomes the design and counts as applied. */
  | { kind: 'load'; scenario: Json }
  | { kind: 'edit'; edit: ListEdit }
  | { kind: 'select'; index: number }
  /** One part replaced (the editor, the map tools); `record` makes it an undo step of its own. */
  | { kind: 'set-part'; index: number; part: WindPart; record: boolean }
  /** An undo step before a gesture whose changes follow as set-part without record (a drag, a stroke). */
  | { kind: 'record' }
  | { kind: 'undo' }
  | { kind: 'redo' }
  /** The engine took the design. */
  | { kind: 'applied' };

export function emptyDesign(): DesignState {
  return { wind: { parts: [] }, selected: null, appliedText: '', scenarioKey: '', timeline: emptyTimeline() };
}

/** The key that tells one scenario from another for the undo timeline. */
export function scenarioKeyOf(scenario: Json): string {
  return JSON.stringify([scenario.name, scenario.basin]);
}

export function reduceDesign(s: DesignState, a: DesignAction): DesignState {
  switch (a.kind) {
    case 'load': {
      const key = scenarioKeyOf(a.scenario);
      const wind = windOf(a.scenario);
      return {
        wind,
        selected: wind.parts.length ? 0 : null,
        appliedText: JSON.stringify(wind),
        scenarioKey: key,
        timeline: key === s.scenarioKey ? s.timeline : emptyTimeline(),
      };
    }
    case 'edit': {
      const { parts, select } = applyEdit(s.wind.parts, a.edit, s.wind.parts.length);
      const wind = { ...structuredClone(s.wind), parts };
      const n = parts.length;
      const selected =
        select !== null && select >= 0 && select < n ? select : n ? Math.min(s.selected ?? 0, n - 1) : null;
      return { ...s, wind, selected, timeline: recorded(s.timeline, s.wind) };
    }
    case 'select':
      return a.index >= 0 && a.index < s.wind.parts.length ? { ...s, selected: a.index } : s;
    case 'set-part': {
      if (a.index < 0 || a.index >= s.wind.parts.length) return s;
      const wind = { ...s.wind, parts: s.wind.parts.map((p, k) => (k === a.index ? a.part : p)) };
      return { ...s, wind, timeline: a.record ? recorded(s.timeline, s.wind) : s.timeline };
    }
    case 'record':
      return { ...s, timeline: recorded(s.timeline, s.wind) };
    case 'undo':
    case 'redo': {
      const r = a.kind === 'undo' ? undone(s.timeline, s.wind) : redone(s.timeline, s.wind);
      if (!r) return s;
      const n = r.value.parts.length;
      const selected = s.selected !== null && s.selected >= n ? (n ? n - 1 : null) : s.selected;
      return { ...s, wind: r.value, selected, timeline: r.timeline };
    }
    case 'applied':
      return { ...s, appliedText: JSON.stringify(s.wind) };
  }
}

/** The new part list and the part to select after an edit. */
function applyEdit(parts: WindPart[], e: ListEdit, n: number): { parts: WindPart[]; select: number | null } {
  switch (e.kind) {
    case 'append':
      return { parts: [...parts, ...structuredClone(e.parts)], select: n };
    case 'clear':
      return { parts: [], select: null };
    case 'enable':
      return { parts: parts.map((p, k) => (k === e.index ? setEnabled(p, e.on) : p)), select: e.index };
    case 'move':
      return { parts: movePart(parts, e.index, e.by), select: e.index + e.by };
    case 'duplicate':
      return { parts: duplicatePart(parts, e.index), select: e.index + 1 };
    case 'delete':
      return { parts: deletePart(parts, e.index), select: Math.max(0, e.index - 1) };
  }
}

export const canUndo = (s: DesignState): boolean => s.timeline.past.length > 0;
export const canRedo = (s: DesignState): boolean => s.timeline.future.length > 0;
/** True while the design differs from the wind of the run on screen. */
export const notApplied = (s: DesignState): boolean => JSON.stringify(s.wind) !== s.appliedText;

// ---- where the validator's issues go ----

export type PartIssue = ScenarioIssue & {
  /** The path inside the part, dotted ("source.shape.lon", "window.0"). */ rel: string;
};

export interface RoutedIssues {
  /** The selected part's issues, for its editor (empty when none is selected). */
  editor: PartIssue[];
  /** Issues of the other parts and of the rest of the scenario, for the list under the parts. */
  elsewhere: ScenarioIssue[];
  /** For each part, whether it has an issue. */
  invalid: boolean[];
}

const partPath = (k: number) => `wind.parts[${k}]`;
const under = (path: string, pre: string) => path === pre || path.startsWith(`${pre}.`) || path.startsWith(`${pre}[`);

export function routeIssues(
  issues: readonly ScenarioIssue[],
  selected: number | null,
  partCount: number,
): RoutedIssues {
  const wind = issues.filter((i) => i.path.startsWith('wind'));
  const pre = selected === null ? null : partPath(selected);
  const editor =
    pre === null
      ? []
      : wind
          .filter((i) => under(i.path, pre))
          .map((i) => ({
            ...i,
            rel: i.path
              .slice(pre.length)
              .replace(/^\./, '')
              .replace(/\[(\d+)\]/g, '.$1')
              .replace(/^\./, ''),
          }));
  const elsewhere = issues.filter((i) => pre === null || !under(i.path, pre));
  const invalid = Array.from({ length: partCount }, (_, k) => wind.some((i) => under(i.path, partPath(k))));
  return { editor, elsewhere, invalid };
}

// ---- what the design needs from the edited scenario ----

export function basinOf(scenario: Json): BasinBox {
  const b = (scenario.basin ?? {}) as Partial<BasinBox>;
  return { lonWest: b.lonWest ?? 0, lonEast: b.lonEast ?? 1, latSouth: b.latSouth ?? -1, latNorth: b.latNorth ?? 1 };
}

/** The run's length in days as written, 100 while it is not a positive number. */
export function runDaysOf(scenario: Json): number {
  const d = Number((scenario.time as Json | undefined)?.days);
  return Number.isFinite(d) && d > 0 ? d : 100;
}

export function seedOf(scenario: Json): string {
  return String(scenario.seed ?? 0);
}

/** The day when the parts' time factors add up to the most: a preview day that shows something. */
export function liveliestDay(wind: WindSection, runDays: number, seed: string): number {
  const days = dayAxis(runDays, 120);
  const total = days.map(() => 0);
  wind.parts.forEach((p, k) => {
    if (p.enabled === false) return;
    try {
      partSeries(p, days, seed, k).values.forEach((v, n) => (total[n] += Math.abs(v)));
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
