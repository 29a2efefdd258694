// Start the engine in a Node worker thread and talk to it with comlink, as the page does.

import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { Worker } from 'node:worker_threads';
import type { EngineApi } from './api.ts';

export interface EngineThread {
  api: Comlink.Remote<EngineApi>;
  close(): Promise<void>;
}

export function startEngineThread(): EngineThread {
  const worker = new Worker(new URL('./node-worker.mjs', import.meta.url));
  const api = Comlink.wrap<EngineApi>(nodeEndpoint(worker));
  return {
    api,
    async close() {
      api[Comlink.releaseProxy]();
      await worker.terminate();
    },
  };
}
