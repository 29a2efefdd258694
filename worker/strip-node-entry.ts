// One strip worker thread in Node (see model/parallel/strip-worker.ts): the first message is the
// strip, then the thread works through shared memory until told to stop, and exits.

import { parentPort } from 'node:worker_threads';
import { startStrip } from '../model/parallel/strip-worker.ts';

if (!parentPort) throw new Error('worker/strip-node-entry.ts runs in a worker thread (see worker/strips-node.ts)');
const port = parentPort;
port.once('message', (m) => {
  startStrip(m, (r) => port.postMessage(r));
  port.close();
});
