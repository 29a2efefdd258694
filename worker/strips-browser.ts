// Strip workers for the linear step in the page: Web Workers started from the engine's own
// worker. Shared memory exists only when the page is cross-origin isolated (COOP/COEP headers,
// vite.config.ts); otherwise there is no host and the engine runs the step on its one worker.

import type { StripHost } from '../model/parallel/team.ts';

export function browserStripHost(): StripHost | null {
  if (!globalThis.crossOriginIsolated || typeof SharedArrayBuffer === 'undefined') return null;
  return {
    // One core is left to the page's own thread (drawing, input): with 'auto' the strips would
    // otherwise take every core while the page draws.
    cores: Math.max(1, (globalThis.navigator?.hardwareConcurrency ?? 1) - 1),
    spawn() {
      const w = new Worker(new URL('./strip-browser-entry.ts', import.meta.url), {
        type: 'module',
        name: 'pycno-strip',
      });
      return {
        postMessage: (m) => w.postMessage(m),
        onMessage: (l) => w.addEventListener('message', (e) => l(e.data)),
        onError: (l) =>
          w.addEventListener('error', (e) => l(new Error(e.message || 'the strip worker script failed to load'))),
        terminate: () => w.terminate(),
      };
    },
  };
}
