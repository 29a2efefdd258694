// Progress of a run on stderr: a bar redrawn in place on a terminal; plain lines at most every
// few seconds (and at each tenth of the run) when stderr is a file or a pipe, so logs stay short.

export interface ProgressStream {
  write(s: string): unknown;
  isTTY?: boolean;
  columns?: number;
}

export class Progress {
  private readonly startWall: number;
  private lastLineAt = -Infinity;
  private lastTenth = -1;
  private drawn = false;

  constructor(
    private readonly out: ProgressStream,
    private readonly startDay: number,
    private readonly endDay: number,
    private readonly cells: number,
    private readonly dt: number,
    private readonly now: () => number = () => performance.now(),
  ) {
    this.startWall = now();
  }

  update(day: number): void {
    const t = this.now();
    const elapsed = (t - this.startWall) / 1000;
    const span = Math.max(1e-9, this.endDay - this.startDay);
    const frac = Math.min(1, Math.max(0, (day - this.startDay) / span));
    const daysPerSec = elapsed > 0 ? (day - this.startDay) / elapsed : 0;
    const cellRate = daysPerSec * (86400 / this.dt) * this.cells;
    const left = daysPerSec > 0 ? Math.max(0, this.endDay - day) / daysPerSec : NaN;
    const stats = `day ${day.toFixed(1)}/${this.endDay.toFixed(0)}  ${daysPerSec.toFixed(1)} days/s  ${formatRate(cellRate)} cell updates/s  ${Number.isFinite(left) ? `${formatDuration(left)} left` : ''}`;
    if (this.out.isTTY) {
      const width = Math.max(10, Math.min(40, (this.out.columns ?? 80) - stats.length - 10));
      const full = Math.round(frac * width);
      this.out.write(
        `\r[${'#'.repeat(full)}${'.'.repeat(width - full)}] ${(100 * frac).toFixed(0).padStart(3)}%  ${stats}\x1b[K`,
      );
      this.drawn = true;
      return;
    }
    const tenth = Math.floor(frac * 10);
    if (tenth > this.lastTenth && (t - this.lastLineAt > 2000 || tenth === 10)) {
      this.lastTenth = tenth;
      this.lastLineAt = t;
      this.out.write(`pycno: ${(100 * frac).toFixed(0)}%  ${stats}\n`);
    } else if (t - this.lastLineAt > 10_000) {
      this.lastLineAt = t;
      this.out.write(`pycno: ${(100 * frac).toFixed(0)}%  ${stats}\n`);
    }
  }

  /** End the bar's line so the next output starts on a fresh one. */
  done(): void {
    if (this.drawn) this.out.write('\n');
    this.drawn = false;
  }
}

export function formatRate(x: number): string {
  if (!Number.isFinite(x)) return '-';
  if (x >= 1e9) return `${(x / 1e9).toFixed(2)} G`;
  if (x >= 1e6) return `${(x / 1e6).toFixed(1)} M`;
  if (x >= 1e3) return `${(x / 1e3).toFixed(1)} k`;
  return x.toFixed(0);
}

export function formatDuration(seconds: number): string {
  if (seconds < 60) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} s`;
  const m = Math.floor(seconds / 60);
  if (m < 60) return `${m} min ${Math.round(seconds - 60 * m)} s`;
  return `${Math.floor(m / 60)} h ${m % 60} min`;
}

export function formatBytes(n: number): string {
  if (n >= 1024 ** 3) return `${(n / 1024 ** 3).toFixed(2)} GiB`;
  if (n >= 1024 ** 2) return `${(n / 1024 ** 2).toFixed(1)} MiB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${n} bytes`;
}
