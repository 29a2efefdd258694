// Shared by the engine and command-line tests: the tiny fixture and a fake wall clock.

import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { EngineHost } from '../../worker/pacing.ts';

export const FIXTURE = fileURLToPath(new URL('../fixtures/engine-tiny.json', import.meta.url));
export const FIXTURE_TEXT = readFileSync(FIXTURE, 'utf8');

/** Sets that make the fixture fail: a thin linear layer under a strong steady westerly outcrops. */
export const BLOW_UP_SETS = [
  'physics.layerThickness=20',
  'physics.surfaceLayer.depth=10',
  'physics.entrainment.minThickness=5',
  'wind.parts[0].source.x=3',
  'wind.parts[0].envelope={"kind":"constant"}',
  'time.days=20',
];

/** A clock that moves only when the engine sleeps or measures: `msPerCall` per now() call. */
export function fakeHost(msPerCall = 1): EngineHost & { t: number; sleeps: number } {
  const h = {
    t: 0,
    sleeps: 0,
    now() {
      h.t += msPerCall;
      return h.t;
    },
    async sleep(ms: number) {
      h.sleeps++;
      h.t += ms;
      await new Promise<void>((r) => setImmediate(r));
    },
  };
  return h;
}
