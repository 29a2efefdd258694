// How many strip threads a run gets, in either mode. 'auto' is one thread per available core, but
// only where a strip keeps enough work to hide the barriers (AUTO_MIN_CELLS_PER_STRIP cells; set
// for the linear step's three barriers a step, so ample for the nonlinear step's one barrier and
// heavier cells), and only where the strips were measured to beat the one-thread step. Over a model on WebAssembly the strips run
// the WebAssembly kernel too (wasm-strips.ts): 2 of them were 1.4 times one WebAssembly thread on
// 2 free cores, so they follow the per-core rule. Where only the TypeScript strips can run, 2 of
// them barely beat (free cores) or lose to (loaded cores) one WebAssembly thread, so 'auto' wants
// at least AUTO_MIN_CORES_OVER_WASM cores (docs/performance.md, "Multi-core").

import { InputError } from '../errors.ts';

export type ThreadsOption = number | 'auto';

/** More threads than this are refused: no machine we target has more cores for one run. */
export const MAX_THREADS = 64;
/** Below this many cells per strip the barriers cost more than the strip's work saves. */
export const AUTO_MIN_CELLS_PER_STRIP = 40_000;
/** Cores 'auto' needs before TypeScript strips replace the one-thread WebAssembly step. */
export const AUTO_MIN_CORES_OVER_WASM = 4;

export interface ThreadChoice {
  threads: number;
  /** Why the count differs from the one asked for, or how 'auto' chose; null when as asked. */
  notice: string | null;
}

/** Check the option itself (before any grid is known); throws InputError naming the option. */
export function checkThreadsOption(t: unknown, where = 'threads'): ThreadsOption {
  if (t === 'auto') return t;
  if (typeof t !== 'number' || !Number.isInteger(t) || t < 1 || t > MAX_THREADS) {
    throw new InputError(
      `must be a whole number from 1 to ${MAX_THREADS}, or 'auto' (got ${JSON.stringify(t)})`,
      where,
    );
  }
  return t;
}

/**
 * singleKernel: what runs the step on one thread ('wasm' makes 'auto' want more cores);
 * stripKernel: what the strips would run ('ts' under a 'wasm' single kernel wants more cores).
 */
export function chooseThreads(
  requested: ThreadsOption,
  grid: { nx: number; ny: number },
  cores: number,
  singleKernel: 'ts' | 'wasm' = 'ts',
  stripKernel: 'ts' | 'wasm' = 'ts',
): ThreadChoice {
  checkThreadsOption(requested);
  if (requested === 1) return { threads: 1, notice: null };
  if (requested === 'auto') {
    const coreWord = `${cores} core${cores === 1 ? '' : 's'} for strips`;
    if (singleKernel === 'wasm' && stripKernel === 'ts' && cores < AUTO_MIN_CORES_OVER_WASM) {
      return {
        threads: 1,
        notice: `threads auto: 1 (${coreWord}: the one-thread WebAssembly step is faster than ${cores} TypeScript strips)`,
      };
    }
    const byWork = Math.floor((grid.nx * grid.ny) / AUTO_MIN_CELLS_PER_STRIP);
    const threads = Math.max(1, Math.min(cores, grid.ny, byWork, MAX_THREADS));
    return {
      threads,
      notice: `threads auto: ${threads} (${coreWord}, ${grid.nx} x ${grid.ny} cells, at least ${AUTO_MIN_CELLS_PER_STRIP} cells a strip)`,
    };
  }
  if (requested > grid.ny) {
    return {
      threads: grid.ny,
      notice: `threads ${requested} clamped to ${grid.ny}: the grid has ${grid.ny} rows and a strip needs at least one`,
    };
  }
  return { threads: requested, notice: null };
}
