// The dedicated Web Worker: the engine exposed with comlink. The page creates it with
//   new Worker(new URL('../worker/browser-entry.ts', import.meta.url), { type: 'module' })
// and wraps it with Comlink.wrap<PageEngineApi>(worker).

import * as Comlink from 'comlink';
import { engineApi } from './api.ts';
import { Engine } from './engine.ts';
import { browserStripHost } from './strips-browser.ts';
import { holdLifeLock, type PageEngineApi } from './life-lock.ts';

// A page cannot open paths, but the shipped scenarios travel with it: a scenario that starts
// from another one's spin-up (trade relaxation from trade spin-up) finds it here by file name.
const shipped = new Map(
  Object.entries(
    import.meta.glob('../configs/*.json', { eager: true, query: '?raw', import: 'default' }) as Record<string, string>,
  ).map(([path, text]) => [path.split('/').pop()!, text]),
);

// The linear step in latitude strips on nested workers where the page is cross-origin isolated
// ('auto': one per core on grids large enough to gain), else on this worker alone (said in the
// run's notes).
function pageEngine(): Engine {
  const host = browserStripHost();
  return new Engine({
    strips: {
      host,
      threads: 'auto',
      hostMissing:
        'the page is not cross-origin isolated (no COOP/COEP headers), so it has no shared memory for strip workers',
    },
  });
}

async function readShipped(path: string): Promise<Uint8Array> {
  const text = shipped.get(path.split('/').pop() ?? path);
  if (text === undefined) {
    throw new Error(
      `the page can read only the shipped scenario files (${[...shipped.keys()].join(', ')}); run this scenario from the command line, or replace the file reference by a shipped one`,
    );
  }
  return new TextEncoder().encode(text);
}

// Held from the first moment, so the page can tell when this worker is gone (worker/life-lock.ts).
const alive = holdLifeLock();
const api: PageEngineApi = {
  ...engineApi(pageEngine(), (value, transfer) => Comlink.transfer(value, transfer), readShipped),
  lifeLock: () => alive,
};
Comlink.expose(api);
