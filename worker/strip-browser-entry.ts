// One strip worker in the page (see model/parallel/strip-worker.ts): the first message is the
// strip, then it works through shared memory until told to stop, and closes itself.

import { startStrip } from '../model/parallel/strip-worker.ts';

const scope = globalThis as unknown as {
  onmessage: ((e: MessageEvent) => void) | null;
  postMessage(m: unknown): void;
  close(): void;
};
scope.onmessage = (e) => {
  scope.onmessage = null;
  startStrip(e.data, (r) => scope.postMessage(r));
  scope.close();
};
