// The engine's API as the page (through comlink) or a Node host sees it: plain data in and out,
// frames pushed to a callback with their buffers transferred. Both entries expose this object.

import type { Engine } from './engine.ts';
import type { LoadOptions } from './run-plan.ts';
import type { EngineReport, Frame, LoadResult } from './protocol.ts';
import { stateChecksum, type StateChecksum } from './state-checksum.ts';

export interface EngineApi {
  load(text: string, fileName: string, options?: Omit<LoadOptions, 'reader' | 'onSpinup'>): Promise<LoadResult>;
  start(): void;
  pause(): void;
  stepOutput(): Promise<EngineReport>;
  setSpeed(daysPerSecond: number | 'max'): void;
  stop(): Promise<EngineReport>;
  status(): EngineReport;
  /** The current state as a frame (fresh buffers, transferred), or null before a load. */
  currentFrame(): Frame | null;
  /** Frames and status changes go to these callbacks (pass Comlink.proxy functions). */
  subscribe(onFrame: (frame: Frame) => void, onStatus?: (report: EngineReport) => void): void;
  /** Resolves when the run is not running (after pause, end, stop or failure). */
  idle(): Promise<EngineReport>;
  /** Sample one more Hovmoller latitude from the next output on. */
  addSection(lat: number): ReturnType<Engine['addSection']>;
  /** Full fields in every `every`-th output sample (0: none); see Engine.setSampleFields. */
  setSampleFields(every: number): void;
  /** SHA-256 of the loaded run's u, v and h bits now (worker/state-checksum.ts), or null before a load. */
  stateChecksum(): StateChecksum | null;
}

/** Wrap an engine; `send` marks a value's buffers for transfer (Comlink.transfer). */
export function engineApi(
  engine: Engine,
  send: <T>(value: T, transfer: ArrayBuffer[]) => T,
  readerFor?: LoadOptions['reader'],
): EngineApi {
  let unsubscribe: Array<() => void> = [];
  return {
    load: (text, fileName, options = {}) => engine.load(text, fileName, { ...options, reader: readerFor }),
    start: () => engine.start(),
    pause: () => engine.pause(),
    stepOutput: () => engine.stepOutput(),
    setSpeed: (s) => engine.setSpeed(s),
    stop: () => engine.stop(),
    status: () => engine.status(),
    currentFrame: () => {
      const f = engine.currentFrame();
      return f
        ? send(
            f,
            Object.values(f.fields).map((a) => a!.buffer as ArrayBuffer),
          )
        : null;
    },
    subscribe(onFrame, onStatus) {
      for (const u of unsubscribe) u();
      unsubscribe = [engine.onFrame((frame, transfer) => void onFrame(send(frame, transfer)))];
      if (onStatus) unsubscribe.push(engine.onStatus((r) => void onStatus(r)));
    },
    idle: () => engine.idle(),
    addSection: (lat) => engine.addSection(lat),
    setSampleFields: (every) => engine.setSampleFields(every),
    stateChecksum: () => (engine.model ? stateChecksum(engine.model.state) : null),
  };
}
