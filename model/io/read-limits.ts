// How much of each kind of input file is read at most. A file is measured before it is read and
// refused when it is larger, so that a wrong path (a 1.5 GB log, /dev/zero) never ties up the
// command line or the page; the readers (worker/files-node.ts, the page's file picker) read no
// more than this many bytes. The numbers are in docs/reliability.md, "Inputs with limits".

const MiB = 1024 * 1024;
const GiB = 1024 * MiB;

export interface ReadLimit {
  /** Largest file accepted, bytes. */
  maxBytes: number;
  /** What the file is, for messages: "a scenario file". */
  what: string;
  /** What to do about a file that is too large, after "; ". */
  advice: string;
}

export const READ_LIMITS = {
  /** The scenario reader's own limit is 16 M characters (model/scenario/parse.ts); UTF-8 has at least one byte per character. */
  scenario: { maxBytes: 16 * MiB, what: 'a scenario file', advice: 'put large wind data in a CSV or NetCDF wind file' },
  /** A 1-degree global grid of daily winds for a year as text is about 60 MB. */
  csvWind: {
    maxBytes: 64 * MiB,
    what: 'a CSV wind file',
    advice: 'use NetCDF for larger wind data, or cut the file to the basin and the run',
  },
  /** Gridded NetCDF winds and restart (or run output) starts. */
  netcdfInput: {
    maxBytes: 1 * GiB,
    what: 'a NetCDF input file',
    advice: 'cut the file to the basin and the days of the run (e.g. with cdo or ncks)',
  },
  /** Run outputs read back: rerun, compare, report, and the page's run import. */
  runFile: {
    maxBytes: 2 * GiB,
    what: 'a run file',
    advice:
      'compare or report a shorter run, or save fewer fields (output.fields) or fewer records (time.outputEveryDays)',
  },
} as const satisfies Record<string, ReadLimit>;

export type ReadKind = keyof typeof READ_LIMITS;

/** "1.50 GiB", "12.0 MiB", "830 bytes": sizes in messages. */
export function sizeText(n: number): string {
  if (n >= GiB) return `${(n / GiB).toFixed(2)} GiB`;
  if (n >= MiB) return `${(n / MiB).toFixed(1)} MiB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${n} bytes`;
}

/** The message for a file of `size` bytes over its limit, or null when it fits. */
export function tooLarge(size: number, limit: ReadLimit): string | null {
  if (size <= limit.maxBytes) return null;
  return `the file is ${sizeText(size)}; ${limit.what} is read only up to ${sizeText(limit.maxBytes)} (${limit.advice})`;
}
