// The page's one door to the engine. The engine runs in a dedicated Web Worker behind comlink
// (worker/browser-entry.ts); frames come back through a callback with their buffers transferred.
// Only this file knows how the engine is reached, so the rest of the page depends on
// worker/protocol.ts alone.

import * as Comlink from 'comlink';
import type { EngineApi } from '../worker/api.ts';
import type { EngineError, EngineReport, EngineStatus, Frame, LoadedScenario } from '../worker/protocol.ts';

export interface EngineHandlers {
  frame(f: Frame): void;
  status(s: EngineStatus, report: EngineReport | null): void;
  /** A run that stopped by itself (a blow-up, an internal failure). Load failures reject load(). */
  error(e: EngineError): void;
}

export interface EngineClient {
  /** Resolves with the loaded scenario (its day-0 frame follows), or rejects with an EngineError. */
  load(text: string, fileName: string): Promise<LoadedScenario>;
  start(): Promise<void>;
  pause(): Promise<void>;
  stepOutput(): Promise<void>;
  /** Model days per wall-clock second, or 'max'. */
  setSpeed(daysPerSecond: number | 'max'): Promise<void>;
  /** End the run and go back to its start; the day-0 frame follows. */
  stop(): Promise<void>;
  /** Sample one more Hovmoller latitude from the next output on. */
  addSection(lat: number): Promise<{ ok: true; index: number; rowLat: number } | { ok: false; message: string }>;
  /** Full fields in every `every`-th output sample from now on (0: none), for recording the run. */
  setSampleFields(every: number): Promise<void>;
  terminate(): void;
}

/** Thrown when the browser cannot start a module worker. */
export class NoWorkerError extends Error {
  override name = 'NoWorkerError';
}

export function connectEngine(handlers: EngineHandlers): EngineClient {
  if (typeof Worker === 'undefined') throw new NoWorkerError('this browser has no Web Workers');
  let worker: Worker;
  try {
    worker = new Worker(new URL('../worker/browser-entry.ts', import.meta.url), { type: 'module', name: 'pycno-engine' });
  } catch (e) {
    throw new NoWorkerError(e instanceof Error ? e.message : String(e));
  }
  worker.addEventListener('error', (ev) => handlers.error({ kind: 'internal', message: `the engine stopped: ${ev.message || 'the worker failed to start'}` }));
  const api = Comlink.wrap<EngineApi>(worker);
  let lastFailure = '';
  const onStatus = (r: EngineReport) => {
    handlers.status(r.status, r);
    // Report a failure once, when the run enters it; a failed load answers through load() instead.
    const key = r.status === 'failed' && r.error ? `${r.error.kind}:${r.error.message}` : '';
    if (key && key !== lastFailure) handlers.error(r.error!);
    lastFailure = key;
  };
  void api.subscribe(
    Comlink.proxy((f: Frame) => handlers.frame(f)),
    Comlink.proxy(onStatus),
  );
  const sendCurrent = async () => {
    const f = await api.currentFrame();
    if (f) handlers.frame(f);
  };
  return {
    async load(text, fileName) {
      const r = await api.load(text, fileName);
      if (!r.ok) throw r.error;
      await sendCurrent();
      return r.scenario;
    },
    start: () => api.start(),
    pause: () => api.pause(),
    stepOutput: async () => {
      await api.stepOutput();
    },
    setSpeed: (s) => api.setSpeed(s),
    stop: async () => {
      await api.stop();
      await sendCurrent();
    },
    addSection: (lat) => api.addSection(lat),
    setSampleFields: (every) => api.setSampleFields(every),
    terminate: () => worker.terminate(),
  };
}
