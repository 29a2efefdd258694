// The dedicated Web Worker: the engine exposed with comlink. The page creates it with
//   new Worker(new URL('../worker/browser-entry.ts', import.meta.url), { type: 'module' })
// and wraps it with Comlink.wrap<EngineApi>(worker).

import * as Comlink from 'comlink';
import { engineApi } from './api.ts';
import { Engine } from './engine.ts';

const api = engineApi(new Engine(), (value, transfer) => Comlink.transfer(value, transfer));
Comlink.expose(api);
