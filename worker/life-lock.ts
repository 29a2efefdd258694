// How the page learns that its engine worker is gone. A worker that is terminated, closes itself
// or is killed by the browser fires no event in the page, and comlink calls to it simply never
// answer. So the worker holds a Web Lock for as long as it lives; the page asks for the same lock
// once the worker has it, and is granted it exactly when the worker's context is destroyed (the
// browser releases every lock a dead context held). No timer is involved, so a worker busy with a
// long computation is never taken for dead.

import type { EngineApi } from './api.ts';

/** The page engine's API: the shared one plus the lock handshake. */
export interface PageEngineApi extends EngineApi {
  /** Resolves with the lock's name once the worker holds it; null where there are no Web Locks. */
  lifeLock(): Promise<string | null>;
}

interface LockManagerLike {
  request(
    name: string,
    options: { signal?: AbortSignal },
    callback: () => Promise<unknown> | unknown,
  ): Promise<unknown>;
}

function lockManager(): LockManagerLike | null {
  const locks = (globalThis.navigator as { locks?: LockManagerLike } | undefined)?.locks;
  return locks && typeof locks.request === 'function' ? locks : null;
}

/** Worker side: take a lock of a fresh name and never give it back while the worker lives. */
export function holdLifeLock(): Promise<string | null> {
  const locks = lockManager();
  if (!locks) return Promise.resolve(null);
  const name = `pycno-engine-alive-${crypto.randomUUID()}`;
  return new Promise((resolve) => {
    locks
      .request(name, {}, () => {
        resolve(name);
        return new Promise(() => {});
      })
      .catch(() => resolve(null));
  });
}

/**
 * Page side: call `gone` when the worker that holds `name` no longer exists. Returns a function
 * that stops watching (for a worker the page ends itself). False where there are no Web Locks.
 */
export function watchLifeLock(name: string, gone: () => void): (() => void) | false {
  const locks = lockManager();
  if (!locks) return false;
  const stop = new AbortController();
  locks
    .request(name, { signal: stop.signal }, () => {
      if (!stop.signal.aborted) gone();
    })
    .catch(() => {
      /* aborted: the page retired this worker itself */
    });
  return () => stop.abort();
}
