// The page's one throttle: at most one run per gap, a trailing run so the last request of a burst
// is never lost, `now` and release() for changes that must show at once; and the per-frame queue.

import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { FrameQueue, Throttle } from '../../viewer/throttle.ts';

describe('Throttle', () => {
  let t = 0;
  const clock = () => t;
  beforeEach(() => {
    vi.useFakeTimers();
    t = 1000;
  });
  afterEach(() => vi.useRealTimers());
  const advance = (ms: number) => {
    t += ms;
    vi.advanceTimersByTime(ms);
  };

  it('runs the first request at once, then at most once per gap, with one trailing run', () => {
    const runs: number[] = [];
    const th = new Throttle(250, () => runs.push(t), clock);
    th.request();
    expect(runs).toEqual([1000]);
    // A burst of requests inside the gap: nothing now, one run after the gap.
    for (let k = 0; k < 10; k++) {
      advance(20);
      th.request();
    }
    expect(runs).toEqual([1000]);
    advance(300);
    expect(runs.length).toBe(2);
    expect(runs[1]).toBeGreaterThanOrEqual(1250);
    // Quiet: no more runs without requests.
    advance(2000);
    expect(runs.length).toBe(2);
    // Past the gap a request runs at once again.
    th.request();
    expect(runs.length).toBe(3);
    expect(runs[2]).toBe(t);
  });

  it('runs at once when asked to or after release(), and the pending trailing run is dropped', () => {
    const runs: number[] = [];
    const th = new Throttle(200, () => runs.push(t), clock);
    th.request();
    advance(50);
    th.request(); // schedules a trailing run
    advance(10);
    th.request(true);
    expect(runs).toEqual([1000, 1060]);
    advance(1000);
    expect(runs).toEqual([1000, 1060]); // the trailing run went with the immediate one
    th.request();
    expect(runs.length).toBe(3);
    advance(10);
    th.release();
    th.request();
    expect(runs.length).toBe(4);
  });
});

describe('FrameQueue', () => {
  it('turns the requests before the next frame into one call', () => {
    const frames: Array<() => void> = [];
    let calls = 0;
    const q = new FrameQueue(
      () => calls++,
      (f) => frames.push(f),
    );
    q.request();
    q.request();
    q.request();
    expect([frames.length, calls]).toEqual([1, 0]);
    frames.shift()!();
    expect(calls).toBe(1);
    q.request();
    expect(frames.length).toBe(1);
  });
});
