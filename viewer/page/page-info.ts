// What the tests (and a curious user in the console) can read as window.__pycno; the page never
// reads it back.

import type { EngineStatus } from '../../worker/protocol.ts';

export interface PageInfo {
  ready: boolean;
  status: EngineStatus;
  framesReceived: number;
  framesDrawn: number;
  lastDay: number;
  shownDay: number;
  /** Every error message the page showed, in order. */
  errors: string[];
  floatTextures: boolean;
  /** GPU uploads and WebGL draws, read by the page benchmark. */
  gpu?: unknown;
  /** What the time slider holds, read by the memory benchmark. */
  kept?: () => unknown;
  /** The checksum of the latest h_anom frame, to compare with a Node run. */
  hAnomChecksum?: () => unknown;
  /** The key arrows drawn last, with the longest arrow of each layer (the arrows' test). */
  arrows?: () => unknown;
  /** The engine's own SHA-256 of its u, v, h bits, to compare with the command line. */
  stateChecksum?: () => unknown;
}

export function publishPageInfo(): PageInfo {
  const info: PageInfo = {
    ready: false,
    status: 'empty',
    framesReceived: 0,
    framesDrawn: 0,
    lastDay: 0,
    shownDay: 0,
    errors: [],
    floatTextures: false,
  };
  (window as unknown as { __pycno: PageInfo }).__pycno = info;
  return info;
}
