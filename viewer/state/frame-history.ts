// Frames of a run, kept for scrubbing back while the run goes on. The number kept follows from a
// memory budget the user chooses; when it is full the older frames are thinned, not dropped.

import type { Frame } from '../../worker/protocol.ts';

export interface KeptFrame {
  day: number;
  step: number;
  fields: Frame['fields'];
  bytes: number;
}

export function frameBytes(fields: Frame['fields']): number {
  let b = 0;
  for (const a of Object.values(fields)) if (a) b += a.byteLength;
  return b;
}

/** How many frames of a given size fit in a budget (at least one: the one on screen). */
export function framesInBudget(budgetBytes: number, bytesPerFrame: number): number {
  if (!(bytesPerFrame > 0)) return 1;
  return Math.max(1, Math.floor(budgetBytes / bytesPerFrame));
}

/** "41 MB", "820 kB": sizes the way a user reads them (decimal units, as disks and files). */
export function formatBytes(bytes: number): string {
  if (bytes >= 1e9) return `${(bytes / 1e9).toFixed(bytes >= 1e10 ? 0 : 1)} GB`;
  if (bytes >= 1e6) return `${(bytes / 1e6).toFixed(bytes >= 1e7 ? 0 : 1)} MB`;
  if (bytes >= 1e3) return `${Math.round(bytes / 1e3)} kB`;
  return `${bytes} B`;
}

/**
 * Frames kept for the time slider. While the budget lasts every frame is kept. When it is full
 * the older frames are thinned (every other one goes, oldest first kept) and from then on a frame
 * is kept only when it is at least `spacing` days after the one before, so the slider always
 * reaches back to the start of the run at an even, coarser spacing; the newest frame is always
 * there (it is the one on screen while the run goes).
 */
export class FrameHistory {
  private items: KeptFrame[] = [];
  private capacity = 1;
  private bytesEach = 0;
  private budget: number;
  /** Days between kept frames once thinned; 0 while every frame is kept. */
  private gap = 0;

  constructor(budgetBytes: number) {
    this.budget = budgetBytes;
  }

  get length(): number {
    return this.items.length;
  }

  get maxFrames(): number {
    return this.capacity;
  }

  get budgetBytes(): number {
    return this.budget;
  }

  /** Days between kept frames since the history was thinned; 0 if it never was. */
  get spacing(): number {
    return this.gap;
  }

  /** Bytes held now. */
  get bytes(): number {
    return this.items.length * this.bytesEach;
  }

  /** What the budget buys at the current frame size, for the page to show. */
  describe(): string {
    if (this.bytesEach === 0) return `budget ${formatBytes(this.budget)}`;
    const kept = `keeping ${this.capacity} frames = ${formatBytes(this.capacity * this.bytesEach)}`;
    return this.gap > 0 ? `${kept}, thinned to one every ${formatDays(this.gap)} to reach back to the start` : kept;
  }

  clear(): void {
    this.items = [];
    this.bytesEach = 0;
    this.capacity = 1;
    this.gap = 0;
  }

  setBudget(budgetBytes: number): void {
    this.budget = budgetBytes;
    if (this.bytesEach > 0) {
      this.capacity = framesInBudget(budgetBytes, this.bytesEach);
      this.fit();
    }
  }

  push(frame: { day: number; step: number; fields: Frame['fields'] }): void {
    const bytes = frameBytes(frame.fields);
    if (bytes !== this.bytesEach) {
      // Every frame of a run has the same fields; a new size means a new run.
      this.clear();
      this.bytesEach = bytes;
      this.capacity = framesInBudget(this.budget, bytes);
    }
    const kept: KeptFrame = { day: frame.day, step: frame.step, fields: frame.fields, bytes };
    const n = this.items.length;
    // Once thinned, the newest frame takes the place of the previous newest, unless that one is a
    // spacing past the frame before it: then it stays, as the next kept frame.
    if (this.gap > 0 && n >= 2 && this.items[n - 1].day - this.items[n - 2].day < this.gap - 1e-9)
      this.items[n - 1] = kept;
    else this.items.push(kept);
    this.fit();
  }

  /** Frame i, 0 the oldest kept, length - 1 the latest. */
  at(i: number): KeptFrame | null {
    return i >= 0 && i < this.items.length ? this.items[i] : null;
  }

  latest(): KeptFrame | null {
    return this.at(this.items.length - 1);
  }

  /** Index of the kept frame nearest to a day. */
  nearest(day: number): number {
    let best = -1;
    let dist = Infinity;
    for (let i = 0; i < this.items.length; i++) {
      const d = Math.abs(this.items[i].day - day);
      if (d < dist) {
        dist = d;
        best = i;
      }
    }
    return best;
  }

  /** Thin until the frames fit: keep the oldest and every other one after it, and the newest. */
  private fit(): void {
    while (this.items.length > this.capacity) {
      if (this.capacity < 3) {
        // Too small to thin: the newest frames only.
        this.items = this.items.slice(this.items.length - this.capacity);
        continue;
      }
      const n = this.items.length;
      const span = this.items[n - 1].day - this.items[0].day;
      const thinned = this.items.filter((_, i) => i % 2 === 0 || i === n - 1);
      this.items = thinned;
      this.gap = Math.max(2 * this.gap, span / Math.max(1, thinned.length - 1));
    }
  }
}

/** "16 days", "0.5 day": a spacing the way the page states days. */
function formatDays(d: number): string {
  const r = d >= 10 ? Math.round(d) : Math.round(d * 10) / 10;
  return `${r} ${r === 1 ? 'day' : 'days'}`;
}
