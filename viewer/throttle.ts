// How often the page redraws. Drawing is coalesced to one call per animation frame (FrameQueue);
// the slow panels (the Hovmoller diagram, the probe chart) are throttled on top of that (Throttle):
// at most once per gap, with one trailing call so the last frame of a burst is always shown.

type Timer = ReturnType<typeof setTimeout>;

export class Throttle {
  private last = -Infinity;
  private timer: Timer | null = null;

  constructor(
    private readonly gapMs: number,
    private readonly action: () => void,
    private readonly clock: () => number = () => performance.now(),
  ) {}

  /** Run now when the gap since the last run has passed (or `now`), else once when it has. */
  request(now = false): void {
    const t = this.clock();
    if (now || t - this.last >= this.gapMs) this.fire();
    // A little after the gap ends, so the trailing run is never early by a rounding of the clock.
    else if (this.timer === null) this.timer = setTimeout(() => this.fire(), this.gapMs - (t - this.last) + 10);
  }

  /** The next request runs at once (something outside the throttled stream changed). */
  release(): void {
    this.last = -Infinity;
  }

  private fire(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.last = this.clock();
    this.action();
  }
}

/** Requests until the next animation frame become one call. */
export class FrameQueue {
  private queued = false;

  constructor(
    private readonly action: () => void,
    private readonly nextFrame: (f: () => void) => void = (f) => requestAnimationFrame(f),
  ) {}

  request(): void {
    if (this.queued) return;
    this.queued = true;
    this.nextFrame(() => {
      this.queued = false;
      this.action();
    });
  }
}
