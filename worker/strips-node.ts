// Strip workers for the linear step in Node: worker_threads running worker/strip-node-entry.ts.

import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { StripHost } from '../model/parallel/team.ts';

export function nodeStripHost(): StripHost {
  return {
    cores: availableParallelism(),
    spawn() {
      const w = new Worker(new URL('./strip-worker-node.mjs', import.meta.url), { name: 'pycno-strip' });
      return {
        postMessage: (m) => w.postMessage(m),
        onMessage: (l) => w.on('message', l),
        onError: (l) => {
          w.on('error', l);
          w.on('exit', (code) => l(new Error(`the strip worker exited with code ${code}`)));
        },
        terminate: () => w.terminate(),
        unref: () => w.unref(),
      };
    },
  };
}
