// How many strip threads a run gets. 'auto' is one thread per available core, but only where a
// strip keeps enough work to hide the barriers (AUTO_MIN_CELLS_PER_STRIP cells), and only where
// the strips were measured to beat the one-thread step. Over a model on WebAssembly the strips run
// the WebAssembly kernel too (wasm-strips.ts; the TypeScript rows where that module does not
// work), and on this 2-core machine neither 2 TypeScript nor 2 WebAssembly strips beat the
// one-thread WebAssembly step (docs/performance.md, "Multi-core"), so with WebAssembly at hand
// 'auto' wants at least AUTO_MIN_CORES_OVER_WASM cores. A count asked for is always honoured.

import { InputError } from '../errors.ts';

export type ThreadsOption = number | 'auto';

/** More threads than this are refused: no machine we target has more cores for one run. */
export const MAX_THREADS = 64;
/** Below this many cells per strip the barriers cost more than the strip's work saves. */
export const AUTO_MIN_CELLS_PER_STRIP = 40_000;
/** Cores 'auto' needs before strips replace the one-thread WebAssembly step (not measured faster below). */
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
    throw new InputError(`must be a whole number from 1 to ${MAX_THREADS}, or 'auto' (got ${JSON.stringify(t)})`, where);
  }
  return t;
}

/**
 * singleKernel: what runs the step on one thread ('wasm' makes 'auto' want more cores);
 * stripKernel: what the strips would run (only changes the wording of the notice).
 */
export function chooseThreads(
  requested: ThreadsOption,
  grid: { nx: number; ny: number },
  mode: 'linear' | 'nonlinear',
  cores: number,
  singleKernel: 'ts' | 'wasm' = 'ts',
  stripKernel: 'ts' | 'wasm' = 'ts',
): ThreadChoice {
  checkThreadsOption(requested);
  const asked = requested === 'auto' ? 'auto' : String(requested);
  if (requested === 1) return { threads: 1, notice: null };
  if (mode === 'nonlinear') {
    return { threads: 1, notice: `threads ${asked}: the nonlinear scheme runs on one thread (only the linear step is split into strips)` };
  }
  if (requested === 'auto') {
    const coreWord = `${cores} core${cores === 1 ? '' : 's'}`;
    if (singleKernel === 'wasm' && cores < AUTO_MIN_CORES_OVER_WASM) {
      const strips = stripKernel === 'wasm' ? 'WebAssembly' : 'TypeScript';
      return { threads: 1, notice: `threads auto: 1 (${coreWord}: the one-thread WebAssembly step is not slower than ${cores} ${strips} strips)` };
    }
    const byWork = Math.floor((grid.nx * grid.ny) / AUTO_MIN_CELLS_PER_STRIP);
    const threads = Math.max(1, Math.min(cores, grid.ny, byWork, MAX_THREADS));
    return { threads, notice: `threads auto: ${threads} (${coreWord}, ${grid.nx} x ${grid.ny} cells, at least ${AUTO_MIN_CELLS_PER_STRIP} cells a strip)` };
  }
  if (requested > grid.ny) {
    return { threads: grid.ny, notice: `threads ${requested} clamped to ${grid.ny}: the grid has ${grid.ny} rows and a strip needs at least one` };
  }
  return { threads: requested, notice: null };
}
