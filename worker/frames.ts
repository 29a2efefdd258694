// Frames: the latest full fields of the run with every output sample since the previous frame,
// published to the listeners at a bounded rate (at most maxFramesPerSecond, and at most a fifth
// of the time: on a big grid building the fields costs as much as stepping), each listener with
// buffers of its own to transfer.

import type { FieldName } from '../model/diagnostics/fields.ts';
import type { EngineHost } from './pacing.ts';
import type { Frame, OutputSample } from './protocol.ts';
import type { RunPlan } from './run-plan.ts';

export type FrameListener = (frame: Frame, transfer: ArrayBuffer[]) => void;

/** Frames are spaced at least this many times their own cost apart (at most a fifth of the time). */
const FRAME_SHARE = 5;

export class FramePublisher {
  private readonly listeners = new Set<FrameListener>();
  private pending: OutputSample[] = [];
  private lastFrameAt = -Infinity;
  /** Wall-clock cost of building and posting a frame, smoothed (ms). */
  private costMs = 0;

  constructor(
    private readonly host: EngineHost,
    private readonly intervalMs: number,
  ) {}

  /** A listener of frames as they are published; returns an unsubscribe function. */
  add(listener: FrameListener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  get listening(): boolean {
    return this.listeners.size > 0;
  }

  get hasPending(): boolean {
    return this.pending.length > 0;
  }

  /** A sample for the next frame; samples wait for a frame only when someone listens. */
  queue(sample: OutputSample): void {
    if (this.listening) this.pending.push(sample);
  }

  /** Forget the samples not yet sent (a new load, a reset). */
  drop(): void {
    this.pending = [];
  }

  /** Publish now when the rate allows. */
  maybePublish(run: RunPlan): void {
    const interval = Math.max(this.intervalMs, FRAME_SHARE * this.costMs);
    if (this.host.now() - this.lastFrameAt >= interval) this.publish(run, false);
  }

  publish(run: RunPlan, finished: boolean): void {
    const start = this.host.now();
    this.lastFrameAt = start;
    if (this.listeners.size === 0) {
      this.pending = [];
      return;
    }
    const frame = makeFrame(run, this.pending, finished);
    this.pending = [];
    const listeners = [...this.listeners];
    listeners.forEach((l, k) => {
      // Each listener gets its own buffers when there are several: a transfer detaches them.
      const f = k === 0 ? frame : cloneFrame(frame);
      l(f, transferList(f));
    });
    const cost = this.host.now() - start;
    this.costMs = this.costMs === 0 ? cost : 0.8 * this.costMs + 0.2 * cost;
  }
}

/** A frame of the run's model now, in fresh buffers. */
export function makeFrame(run: RunPlan, samples: OutputSample[], finished: boolean): Frame {
  const { model, fields } = run;
  const n = model.grid.nx * model.grid.ny;
  const out: Partial<Record<FieldName, Float32Array>> = {};
  for (const f of fields) out[f] = model.field(f, new Float32Array(n)) as Float32Array;
  return { day: model.day, step: model.state.steps, fields: out, integrals: model.integrals(), samples, finished };
}

/** The ArrayBuffers of a frame's typed arrays, for postMessage / Comlink.transfer. */
export function transferList(frame: Frame): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  for (const a of Object.values(frame.fields)) if (a) out.push(a.buffer as ArrayBuffer);
  for (const s of frame.samples) {
    for (const a of s.hovmoller) out.push(a.buffer as ArrayBuffer);
    for (const a of s.probeValues) out.push(a.buffer as ArrayBuffer);
    if (s.fields) for (const a of Object.values(s.fields)) if (a) out.push(a.buffer as ArrayBuffer);
  }
  return out;
}

function cloneFrame(f: Frame): Frame {
  const fields: Frame['fields'] = {};
  for (const [k, a] of Object.entries(f.fields)) fields[k as FieldName] = a!.slice();
  return {
    ...f,
    fields,
    integrals: { ...f.integrals },
    samples: f.samples.map((s) => ({
      ...s,
      integrals: { ...s.integrals },
      hovmoller: s.hovmoller.map((a) => a.slice()),
      probeValues: s.probeValues.map((a) => a.slice()),
      ...(s.fields
        ? { fields: Object.fromEntries(Object.entries(s.fields).map(([k, a]) => [k, a!.slice()])) as Frame['fields'] }
        : {}),
    })),
  };
}
