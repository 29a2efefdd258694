// The page's one door to the engine. The engine runs in a dedicated Web Worker behind comlink
// (worker/browser-entry.ts); frames come back through a callback with their buffers transferred.
// Only this file knows how the engine is reached, so the rest of the page depends on
// worker/protocol.ts alone.
//
// A worker that dies (ended by the browser for memory, crashed, closed) fires no event here and
// leaves every comlink call unanswered. The worker holds a Web Lock while it lives
// (worker/life-lock.ts); when the page is granted that lock the worker is gone: `lost` is called
// once, calls waiting on the worker end (see EngineLostError), and restart() starts a new one.

import * as Comlink from 'comlink';
import { watchLifeLock, type PageEngineApi } from '../worker/life-lock.ts';
import type { EngineError, EngineReport, EngineStatus, Frame, LoadedScenario, LoadResult } from '../worker/protocol.ts';
import type { StateChecksum } from '../worker/state-checksum.ts';

export interface EngineHandlers {
  frame(f: Frame): void;
  status(s: EngineStatus, report: EngineReport | null): void;
  /** A run that stopped by itself (a blow-up, an internal failure). Load failures reject load(). */
  error(e: EngineError): void;
  /** The engine's worker no longer exists; called once per worker. */
  lost(): void;
}

export interface EngineClient {
  /** Resolves with the loaded scenario (its day-0 frame follows), or rejects with an EngineError (EngineLostError when the worker is gone). */
  load(text: string, fileName: string): Promise<LoadedScenario>;
  // The controls below do nothing once the worker is gone: the page has said so already.
  start(): Promise<void>;
  pause(): Promise<void>;
  stepOutput(): Promise<void>;
  /** Model days per wall-clock second, or 'max'. */
  setSpeed(daysPerSecond: number | 'max'): Promise<void>;
  /** End the run and go back to its start; the day-0 frame follows. */
  stop(): Promise<void>;
  /** Sample one more Hovmoller latitude from the next output on. */
  addSection(lat: number): Promise<AddSectionResult>;
  /** Full fields in every `every`-th output sample from now on (0: none), for recording the run. */
  setSampleFields(every: number): Promise<void>;
  /** SHA-256 of the engine's u, v, h bits (worker/state-checksum.ts); rejects with EngineLostError when the worker is gone. */
  stateChecksum(): Promise<StateChecksum | null>;
  /** True from the moment the worker is known to be gone until restart(). */
  readonly lost: boolean;
  /** End the current worker (dead or alive) and start a new one with no scenario loaded. */
  restart(): void;
  terminate(): void;
}

type AddSectionResult = { ok: true; index: number; rowLat: number } | { ok: false; message: string };

/** Thrown when the browser cannot start a module worker. */
export class NoWorkerError extends Error {
  override name = 'NoWorkerError';
}

/** What a call to a worker that is gone ends with. */
export class EngineLostError extends Error {
  override name = 'EngineLostError';
  constructor() {
    super('the model engine has stopped: its worker is gone');
  }
}

interface Connection {
  worker: Worker;
  api: Comlink.Remote<PageEngineApi>;
  lost: boolean;
  retired: boolean;
  /** Rejects with EngineLostError when the worker is found gone; never resolves. */
  gone: Promise<never>;
  stopWatch(): void;
}

export function connectEngine(handlers: EngineHandlers): EngineClient {
  if (typeof Worker === 'undefined') throw new NoWorkerError('this browser has no Web Workers');
  let lastFailure = '';

  const open = (): Connection => {
    let worker: Worker;
    try {
      worker = new Worker(new URL('../worker/browser-entry.ts', import.meta.url), {
        type: 'module',
        name: 'pycno-engine',
      });
    } catch (e) {
      throw new NoWorkerError(e instanceof Error ? e.message : String(e));
    }
    let markGone: (e: Error) => void = () => {};
    const gone = new Promise<never>((_, reject) => (markGone = reject));
    gone.catch(() => {}); // only ever raced against calls
    const c: Connection = {
      worker,
      api: Comlink.wrap<PageEngineApi>(worker),
      lost: false,
      retired: false,
      gone,
      stopWatch: () => {},
    };
    worker.addEventListener('error', (ev) =>
      handlers.error({
        kind: 'internal',
        message: `the engine stopped: ${ev.message || 'the worker failed to start'}`,
      }),
    );
    const onStatus = (r: EngineReport) => {
      handlers.status(r.status, r);
      // Report a failure once, when the run enters it; a failed load answers through load() instead.
      const key = r.status === 'failed' && r.error ? `${r.error.kind}:${r.error.message}` : '';
      if (key && key !== lastFailure) handlers.error(r.error!);
      lastFailure = key;
    };
    void c.api.subscribe(
      Comlink.proxy((f: Frame) => handlers.frame(f)),
      Comlink.proxy(onStatus),
    );
    void c.api.lifeLock().then((name) => {
      if (!name || c.retired) return;
      const stop = watchLifeLock(name, () => {
        if (c.lost || c.retired) return;
        c.lost = true;
        markGone(new EngineLostError());
        handlers.lost();
      });
      if (stop) c.stopWatch = stop;
    });
    return c;
  };

  let conn = open();

  /** A call to the current worker that ends with EngineLostError instead of waiting forever. */
  const call = <T>(f: (api: Comlink.Remote<PageEngineApi>) => Promise<T>): Promise<T> => {
    const c = conn;
    if (c.lost) return Promise.reject(new EngineLostError());
    return Promise.race([f(c.api), c.gone]);
  };
  /** The same for a control whose answer nobody waits for: once the worker is gone it does nothing. */
  const quiet = <T>(f: (api: Comlink.Remote<PageEngineApi>) => Promise<T>): Promise<void> =>
    call(f).then(
      () => undefined,
      (e: unknown) => {
        if (!(e instanceof EngineLostError)) throw e;
      },
    );
  const sendCurrent = async () => {
    const f = await call((api) => api.currentFrame());
    if (f) handlers.frame(f);
  };
  const retire = () => {
    conn.retired = true;
    conn.stopWatch();
    conn.worker.terminate();
  };

  return {
    async load(text, fileName) {
      const r = await call<LoadResult>((api) => api.load(text, fileName));
      if (!r.ok) throw r.error;
      await sendCurrent();
      return r.scenario;
    },
    start: () => quiet((api) => api.start()),
    pause: () => quiet((api) => api.pause()),
    stepOutput: () => quiet((api) => api.stepOutput()),
    setSpeed: (s) => quiet((api) => api.setSpeed(s)),
    stop: async () => {
      await quiet((api) => api.stop());
      if (!conn.lost)
        await sendCurrent().catch((e: unknown) => {
          if (!(e instanceof EngineLostError)) throw e;
        });
    },
    addSection: (lat) =>
      call<AddSectionResult>((api) => api.addSection(lat)).catch((e: unknown) => {
        if (e instanceof EngineLostError)
          return { ok: false as const, message: 'the model engine has stopped; restart it first' };
        throw e;
      }),
    setSampleFields: (every) => quiet((api) => api.setSampleFields(every)),
    stateChecksum: () => call((api) => api.stateChecksum()),
    get lost() {
      return conn.lost;
    },
    restart() {
      retire();
      lastFailure = '';
      conn = open();
    },
    terminate: retire,
  };
}
