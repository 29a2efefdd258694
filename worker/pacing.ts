// Wall-clock services the engine needs, kept apart so tests can drive it with a fake clock, and
// the slice-size rule: enough steps for about `sliceMs` of work, learnt from measured step times.

export interface EngineHost {
  /** Wall-clock time, ms. */
  now(): number;
  /** Wait this long; sleep(0) yields one macrotask so that control messages are handled. */
  sleep(ms: number): Promise<void>;
}

/** A macrotask yield: setImmediate in Node, a MessageChannel in a browser worker (setTimeout(0) is clamped to 4 ms there). */
function macrotaskYield(): () => Promise<void> {
  if (typeof setImmediate === 'function') return () => new Promise((r) => setImmediate(r));
  if (typeof MessageChannel === 'function') {
    const channel = new MessageChannel();
    const waiting: Array<() => void> = [];
    channel.port1.onmessage = () => waiting.shift()?.();
    return () =>
      new Promise((r) => {
        waiting.push(r);
        channel.port2.postMessage(0);
      });
  }
  return () => new Promise((r) => setTimeout(r, 0));
}

export function realHost(): EngineHost {
  const yieldNow = macrotaskYield();
  const clock = typeof performance !== 'undefined' ? () => performance.now() : () => Date.now();
  return {
    now: clock,
    sleep: (ms) => (ms > 0 ? new Promise((r) => setTimeout(r, ms)) : yieldNow()),
  };
}

/** Learns the cost of a step and proposes slice sizes near a target duration. */
export class SlicePlanner {
  private msPerStep = NaN;

  constructor(
    readonly sliceMs = 15,
    readonly maxSteps = 100_000,
  ) {}

  /** Steps for the next slice. */
  next(): number {
    if (!(this.msPerStep > 0)) return Number.isNaN(this.msPerStep) ? 1 : this.maxSteps;
    return Math.max(1, Math.min(this.maxSteps, Math.floor(this.sliceMs / this.msPerStep)));
  }

  /** Record a slice of `steps` that took `ms`; a moving average smooths out hiccups. */
  measured(steps: number, ms: number): void {
    if (steps <= 0) return;
    const sample = Math.max(0, ms) / steps;
    this.msPerStep = Number.isNaN(this.msPerStep) ? sample : 0.7 * this.msPerStep + 0.3 * sample;
  }

  get stepMs(): number {
    return this.msPerStep;
  }
}
