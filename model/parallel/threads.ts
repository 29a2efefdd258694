// How many strip threads a run gets. 'auto' is one thread per available core, but only where a
// strip keeps enough work to hide the barriers (AUTO_MIN_CELLS_PER_STRIP cells, measured in
// docs/performance.md "Multi-core"), and never more than MAX_THREADS.

import { InputError } from '../errors.ts';

export type ThreadsOption = number | 'auto';

/** More threads than this are refused: no machine we target has more cores for one run. */
export const MAX_THREADS = 64;
/** Below this many cells per strip the barriers cost more than the strip's work saves. */
export const AUTO_MIN_CELLS_PER_STRIP = 40_000;

export interface ThreadChoice {
  threads: number;
  /** Why the count differs from the one asked for, or how 'auto' chose; null when as asked. */
  notice: string | null;
}

/** Check the option itself (before any grid is known); throws InputError naming the option. */
export function checkThreadsOption(t: unknown, where = 'threads'): ThreadsOption {
  if (t === 'auto') return t;
  if (typeof t !== 'number' || !Number.isInteger(t) || t < 1 || t > MAX_THREADS) {
    throw new InputError(`must be a whole number from 1 to ${MAX_THREADS}, or 'auto' (got ${JSON.stringify(t)})`, where);
  }
  return t;
}

export function chooseThreads(requested: ThreadsOption, grid: { nx: number; ny: number }, mode: 'linear' | 'nonlinear', cores: number): ThreadChoice {
  checkThreadsOption(requested);
  const asked = requested === 'auto' ? 'auto' : String(requested);
  if (requested === 1) return { threads: 1, notice: null };
  if (mode === 'nonlinear') {
    return { threads: 1, notice: `threads ${asked}: the nonlinear scheme runs on one thread (only the linear step is split into strips)` };
  }
  if (requested === 'auto') {
    const byWork = Math.floor((grid.nx * grid.ny) / AUTO_MIN_CELLS_PER_STRIP);
    const threads = Math.max(1, Math.min(cores, grid.ny, byWork, MAX_THREADS));
    return {
      threads,
      notice: `threads auto: ${threads} (${cores} core${cores === 1 ? '' : 's'}, ${grid.nx} x ${grid.ny} cells, at least ${AUTO_MIN_CELLS_PER_STRIP} cells a strip)`,
    };
  }
  if (requested > grid.ny) {
    return { threads: grid.ny, notice: `threads ${requested} clamped to ${grid.ny}: the grid has ${grid.ny} rows and a strip needs at least one` };
  }
  return { threads: requested, notice: null };
}
