// The worker side of a strip team, host-neutral: the Node and browser entries hand it their
// first message and a way to reply. After "ready" the worker talks only through shared memory:
// it waits at the "go" barrier, runs the round's command (a step: its strip's phases, a barrier
// between each two), and returns when told to stop.

import { Barrier } from './barrier.ts';
import { STEP_PARAMS } from '../dynamics/field-binding.ts';
import { CMD, CURRENT, STEP, STOP, type StripInit, type StripReply } from './strip-protocol.ts';
import { stripStep } from './strip-kernel.ts';

export function isStripInit(m: unknown): m is StripInit {
  return typeof m === 'object' && m !== null && (m as { kind?: unknown }).kind === 'strip-init';
}

/** Run a strip until the leader says stop (blocks the thread: it has nothing else to do). */
export function runStrip(init: StripInit, reply: (r: StripReply) => void): void {
  const { control, params } = init;
  const rows = init.strips[init.strip];
  const barrier = new Barrier(control, 0, init.parties, init.spins);
  const k = stripStep(init.setup, init.strip);
  const phases = k.phases(init.strips);
  const slots = [params.subarray(0, STEP_PARAMS), params.subarray(STEP_PARAMS, 2 * STEP_PARAMS)];
  reply({ kind: 'strip-ready' });
  for (let round = 0; ; round++) {
    barrier.arrive();
    const slot = round % 2;
    const cmd = Atomics.load(control, CMD + slot);
    if (cmd === STOP) return;
    if (cmd !== STEP) continue;
    const cur = Atomics.load(control, CURRENT + slot);
    k.params(slots[slot]);
    for (let p = 0; p < phases; p++) {
      if (p > 0) barrier.arrive();
      k.phase(p, cur, rows);
    }
  }
}

/** Handle the first message; anything wrong is reported back rather than left to hang the leader. */
export function startStrip(m: unknown, reply: (r: StripReply) => void): void {
  if (!isStripInit(m)) {
    reply({ kind: 'strip-failed', message: 'the first message to a strip worker must be its strip-init' });
    return;
  }
  try {
    runStrip(m, reply);
  } catch (e) {
    reply({ kind: 'strip-failed', message: e instanceof Error ? e.message : String(e) });
  }
}
