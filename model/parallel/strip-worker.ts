// The worker side of a strip team, host-neutral: the Node and browser entries hand it their
// first message and a way to reply. After "ready" the worker talks only through shared memory:
// it waits at the "go" barrier, runs the round's command, and returns when told to stop.

import { Barrier } from './barrier.ts';
import { CMD, CURRENT, STEP, STOP, type StripInit, type StripReply } from './strip-protocol.ts';
import { stripBack, stripBulk, stripEdge, stripFront, type StripFields } from './strip-schedule.ts';

export function isStripInit(m: unknown): m is StripInit {
  return typeof m === 'object' && m !== null && (m as { kind?: unknown }).kind === 'strip-init';
}

/** Run a strip until the leader says stop (blocks the thread: it has nothing else to do). */
export function runStrip(init: StripInit, reply: (r: StripReply) => void): void {
  const { grid: g, coefficients: c, fields, control, params, rows, edgePhase } = init;
  const barrier = new Barrier(control, 0, init.parties, init.spins);
  const sets: StripFields[] = [0, 1].map((cur) => ({
    accelX: fields.accelX,
    accelY: fields.accelY,
    u: fields.u[cur],
    v: fields.v[cur],
    h: fields.h,
    un: fields.u[1 - cur],
    vn: fields.v[1 - cur],
  }));
  reply({ kind: 'strip-ready' });
  for (let round = 0; ; round++) {
    barrier.arrive();
    const cmd = Atomics.load(control, CMD + (round % 2));
    if (cmd === STOP) return;
    if (cmd !== STEP) continue;
    const f = sets[Atomics.load(control, CURRENT)];
    const r = params[0];
    const A = params[1];
    stripFront(g, c, r, A, f, rows);
    barrier.arrive();
    stripBulk(g, c, r, A, f, rows);
    barrier.arrive();
    stripBack(g, c, f, rows);
    if (edgePhase) {
      barrier.arrive();
      stripEdge(g, c, f, rows);
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
