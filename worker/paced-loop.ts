// The paced loop: steps the run in slices sized by the slice planner, never past the next output
// record or the run's end, and, with a speed cap, never ahead of "speed" model days per
// wall-clock second (it waits instead of spinning). At every record it has the engine take its
// sample; between slices it lets the engine publish a frame and yields to the host.

import { DAY } from '../model/config.ts';
import type { EngineHost, SlicePlanner } from './pacing.ts';
import { nextRecordStep, type RunPlan } from './run-plan.ts';

/** What the loop asks of the engine that runs it. */
export interface LoopEngine {
  /** True while this loop should go on (not retired by a newer one, not paused from outside). */
  live(): boolean;
  /** The run has no sample yet: the initial one comes first. */
  needsFirstSample(): boolean;
  /** Take the output sample (and record) of the state now. */
  sample(): Promise<void>;
  /** A frame, when the rate allows. */
  maybePublish(): void;
  /** The loop ended by itself: paused at a record (stepping by output), or at the run's end. */
  stopped(how: 'paused' | 'finished'): void;
  /** A step failed (a blow-up, a bad state). */
  failed(e: unknown): void;
  /** The loop left because live() said so (a pause or a newer loop). */
  left(): void;
}

export class PacedLoop {
  /** Model days per wall-clock second, or 'max'. */
  speed: number | 'max' = 'max';
  /** Pause at the next record (stepping by output). */
  pauseAtSample = false;
  private anchorWall = 0;
  private anchorDay = 0;

  constructor(
    private readonly host: EngineHost,
    private readonly planner: SlicePlanner,
  ) {}

  /** The speed cap counts from here: this wall-clock moment, this model day. */
  anchor(day: number): void {
    this.anchorWall = this.host.now();
    this.anchorDay = day;
  }

  async run(run: RunPlan, engine: LoopEngine): Promise<void> {
    const { model, endStep } = run;
    if (engine.needsFirstSample()) {
      await engine.sample();
      if (this.pauseAtSample) {
        // The initial sample is a step of its own when stepping from the start.
        this.pauseAtSample = false;
        engine.stopped('paused');
        return;
      }
    }
    while (engine.live()) {
      const steps = model.state.steps;
      if (steps >= endStep) {
        engine.stopped('finished');
        return;
      }
      const nextSample = nextRecordStep(run, steps);
      let n = Math.min(this.planner.next(), endStep - steps, nextSample - steps);
      if (this.speed !== 'max') {
        const allowedDay = this.anchorDay + (this.speed * (this.host.now() - this.anchorWall)) / 1000;
        const ahead = Math.floor(((allowedDay - model.day) * DAY) / model.dt);
        if (ahead < 1) {
          // Ahead of the speed cap: wait (a frame may still be due) instead of spinning.
          engine.maybePublish();
          const waitMs = Math.min(
            50,
            ((model.day - allowedDay) / this.speed) * 1000 + (model.dt / DAY / this.speed) * 1000,
          );
          await this.host.sleep(Math.max(1, waitMs));
          continue;
        }
        n = Math.min(n, ahead);
      }
      const t0 = this.host.now();
      try {
        model.advance(n);
      } catch (e) {
        engine.failed(e);
        return;
      }
      this.planner.measured(n, this.host.now() - t0);
      if (model.state.steps === nextSample) {
        await engine.sample();
        if (this.pauseAtSample) {
          this.pauseAtSample = false;
          if (model.state.steps < endStep) {
            engine.stopped('paused');
            return;
          }
        }
      }
      if (model.state.steps >= endStep) continue;
      engine.maybePublish();
      await this.host.sleep(0);
    }
    engine.left();
  }
}
