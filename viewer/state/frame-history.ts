// The last frames of a run, kept for scrubbing back while the run goes on. The number kept
// follows from a memory budget the user chooses; the oldest frame goes first.

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

export class FrameHistory {
  private items: (KeptFrame | null)[] = [];
  private head = 0; // index of the oldest frame
  private count = 0;
  private capacity = 1;
  private bytesEach = 0;
  private budget: number;

  constructor(budgetBytes: number) {
    this.budget = budgetBytes;
  }

  get length(): number {
    return this.count;
  }

  get maxFrames(): number {
    return this.capacity;
  }

  get budgetBytes(): number {
    return this.budget;
  }

  /** Bytes held now. */
  get bytes(): number {
    return this.count * this.bytesEach;
  }

  /** What the budget buys at the current frame size, for the page to show. */
  describe(): string {
    if (this.bytesEach === 0) return `budget ${formatBytes(this.budget)}`;
    return `keeping ${this.capacity} frames = ${formatBytes(this.capacity * this.bytesEach)}`;
  }

  clear(): void {
    this.items = [];
    this.head = 0;
    this.count = 0;
    this.bytesEach = 0;
    this.capacity = 1;
  }

  setBudget(budgetBytes: number): void {
    this.budget = budgetBytes;
    if (this.bytesEach > 0) this.resize(framesInBudget(budgetBytes, this.bytesEach));
  }

  push(frame: { day: number; step: number; fields: Frame['fields'] }): void {
    const bytes = frameBytes(frame.fields);
    if (bytes !== this.bytesEach) {
      // Every frame of a run has the same fields; a new size means a new run.
      this.clear();
      this.bytesEach = bytes;
      this.resize(framesInBudget(this.budget, bytes));
    }
    const kept: KeptFrame = { day: frame.day, step: frame.step, fields: frame.fields, bytes };
    if (this.count < this.capacity) {
      this.items[(this.head + this.count) % this.capacity] = kept;
      this.count++;
    } else {
      this.items[this.head] = kept;
      this.head = (this.head + 1) % this.capacity;
    }
  }

  /** Frame i, 0 the oldest kept, length - 1 the latest. */
  at(i: number): KeptFrame | null {
    if (i < 0 || i >= this.count) return null;
    return this.items[(this.head + i) % this.capacity];
  }

  latest(): KeptFrame | null {
    return this.at(this.count - 1);
  }

  /** Index of the kept frame nearest to a day. */
  nearest(day: number): number {
    let best = -1;
    let dist = Infinity;
    for (let i = 0; i < this.count; i++) {
      const d = Math.abs(this.at(i)!.day - day);
      if (d < dist) {
        dist = d;
        best = i;
      }
    }
    return best;
  }

  private resize(capacity: number): void {
    const kept: KeptFrame[] = [];
    for (let i = 0; i < this.count; i++) kept.push(this.at(i)!);
    const keep = kept.slice(Math.max(0, kept.length - capacity));
    this.capacity = capacity;
    this.items = new Array<KeptFrame | null>(capacity).fill(null);
    keep.forEach((f, i) => (this.items[i] = f));
    this.head = 0;
    this.count = keep.length;
  }
}
