// Undo and redo by snapshots: cheap to reason about, and a design is small enough (a painted grid
// of a few thousand numbers) that keeping a hundred copies costs little.

export class History<T> {
  private past: T[] = [];
  private future: T[] = [];

  constructor(
    private readonly copy: (v: T) => T,
    private readonly limit = 100,
  ) {}

  /** Remember `current` before it changes. A new change forgets what could be redone. */
  record(current: T): void {
    this.past.push(this.copy(current));
    if (this.past.length > this.limit) this.past.shift();
    this.future = [];
  }

  /** The state before the last change, or null; `current` moves to the redo list. */
  undo(current: T): T | null {
    const prev = this.past.pop();
    if (prev === undefined) return null;
    this.future.push(this.copy(current));
    return prev;
  }

  redo(current: T): T | null {
    const next = this.future.pop();
    if (next === undefined) return null;
    this.past.push(this.copy(current));
    return next;
  }

  get canUndo(): boolean {
    return this.past.length > 0;
  }

  get canRedo(): boolean {
    return this.future.length > 0;
  }

  clear(): void {
    this.past = [];
    this.future = [];
  }
}
