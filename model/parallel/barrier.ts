// A reusable barrier for the threads of a strip team over one Int32Array in a SharedArrayBuffer:
// a count of arrivals and a generation number. The last to arrive resets the count, bumps the
// generation and wakes the sleepers. Waiters first spin a little (a step's phases are short, and
// a futex wake costs tens of microseconds), then sleep with Atomics.wait.

export const BARRIER_WORDS = 2;
const GENERATION = 0;
const COUNT = 1;

export class BarrierTimeout extends Error {
  override name = 'BarrierTimeout';
}

export class Barrier {
  /**
   * @param cells Int32Array over a SharedArrayBuffer; words offset and offset + 1 are this barrier's.
   * @param parties threads that must arrive before any goes on.
   * @param spins Atomics.load polls before sleeping.
   */
  constructor(
    private readonly cells: Int32Array,
    private readonly offset: number,
    private readonly parties: number,
    private readonly spins = 4000,
  ) {}

  /** Arrive and wait for the others; timeoutMs bounds the sleep (throws BarrierTimeout). */
  arrive(timeoutMs = Infinity): void {
    const a = this.cells;
    const g = this.offset + GENERATION;
    const gen = Atomics.load(a, g);
    if (Atomics.add(a, this.offset + COUNT, 1) === this.parties - 1) {
      Atomics.store(a, this.offset + COUNT, 0);
      Atomics.add(a, g, 1);
      Atomics.notify(a, g);
      return;
    }
    for (let n = 0; n < this.spins; n++) if (Atomics.load(a, g) !== gen) return;
    const deadline = timeoutMs === Infinity ? Infinity : Date.now() + timeoutMs;
    while (Atomics.load(a, g) === gen) {
      const left = deadline - Date.now();
      if (left <= 0) throw new BarrierTimeout(`a strip barrier waited more than ${timeoutMs} ms for the other threads`);
      Atomics.wait(a, g, gen, left === Infinity ? undefined : left);
    }
  }
}
