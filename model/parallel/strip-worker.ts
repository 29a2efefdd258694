// The worker side of a strip team, host-neutral: the Node and browser entries hand it their
// first message and a way to reply. After "ready" the worker talks only through shared memory:
// it waits at the "go" barrier, runs the round's command, and returns when told to stop.

import { Barrier } from './barrier.ts';
import { CMD, CURRENT, STEP, STOP, type StripInit, type StripReply } from './strip-protocol.ts';
import { stripBack, stripBulk, stripEdge, stripFront } from '../dynamics/step-schedule.ts';
import { stripRows } from './strip-kernel.ts';

export function isStripInit(m: unknown): m is StripInit {
  return typeof m === 'object' && m !== null && (m as { kind?: unknown }).kind === 'strip-init';
}

/** Run a strip until the leader says stop (blocks the thread: it has nothing else to do). */
export function runStrip(init: StripInit, reply: (r: StripReply) => void): void {
  const { grid: g, coefficients: c, fields, control, params, rows, edgePhase } = init;
  const barrier = new Barrier(control, 0, init.parties, init.spins);
  const k = stripRows(g, c, fields, init.wasm);
  reply({ kind: 'strip-ready' });
  for (let round = 0; ; round++) {
    barrier.arrive();
    const cmd = Atomics.load(control, CMD + (round % 2));
    if (cmd === STOP) return;
    if (cmd !== STEP) continue;
    const cur = Atomics.load(control, CURRENT);
    k.params(params[0], params[1]);
    stripFront(k, cur, rows);
    barrier.arrive();
    stripBulk(k, cur, rows);
    barrier.arrive();
    stripBack(k, cur, rows);
    if (edgePhase) {
      barrier.arrive();
      stripEdge(k, cur, rows);
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
