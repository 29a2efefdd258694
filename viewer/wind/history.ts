// Undo and redo by snapshots: cheap to reason about, and a design is small enough (a painted grid
// of a few thousand numbers) that keeping a hundred copies costs little. A timeline is a value:
// each function returns a new one and leaves its arguments alone. Snapshots are copies, so a caller
// that later changes the current value in place (painting does) cannot change the past.

export interface Timeline<T> {
  readonly past: readonly T[];
  readonly future: readonly T[];
}

export const HISTORY_LIMIT = 100;

export function emptyTimeline<T>(): Timeline<T> {
  return { past: [], future: [] };
}

/** Remember `current` before it changes. A new change forgets what could be redone. */
export function recorded<T>(t: Timeline<T>, current: T, limit = HISTORY_LIMIT): Timeline<T> {
  return { past: [...t.past, structuredClone(current)].slice(-limit), future: [] };
}

/** The value before the last change and the timeline after going back, or null; `current` moves to the redo list. */
export function undone<T>(t: Timeline<T>, current: T): { value: T; timeline: Timeline<T> } | null {
  if (!t.past.length) return null;
  return {
    value: t.past[t.past.length - 1],
    timeline: { past: t.past.slice(0, -1), future: [...t.future, structuredClone(current)] },
  };
}

export function redone<T>(t: Timeline<T>, current: T): { value: T; timeline: Timeline<T> } | null {
  if (!t.future.length) return null;
  return {
    value: t.future[t.future.length - 1],
    timeline: { past: [...t.past, structuredClone(current)], future: t.future.slice(0, -1) },
  };
}
