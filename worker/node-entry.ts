// The same engine API in a Node worker thread, through comlink's Node adapter. Files named in a
// scenario (wind data, restarts, spin-ups) are read from the file system.

import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { parentPort } from 'node:worker_threads';
import { engineApi } from './api.ts';
import { Engine } from './engine.ts';
import { nodeReader } from './files-node.ts';

if (!parentPort) throw new Error('worker/node-entry.ts runs in a worker thread (see worker/node-host.ts)');
const api = engineApi(new Engine(), (value, transfer) => Comlink.transfer(value, transfer), nodeReader);
Comlink.expose(api, nodeEndpoint(parentPort));
