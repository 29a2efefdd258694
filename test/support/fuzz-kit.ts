// The fuzzers' shared rules. A case passes when it gives a valid result or a clear error: an error
// the hosts treat as bad input (InputError and its kin, the parsers' own error classes), with a
// message that is not empty and not an echo of a huge input. It fails on anything else (TypeError,
// RangeError, an "internal error"), and when it takes longer than CASE_BOUND_MS: a guard against
// hangs, not a speed target, so it is generous.
//
// Seeds: each fuzzer has a fixed default seed so CI is repeatable; PYCNO_FUZZ_SEED=<n> replays or
// explores another sequence (PYCNO_FUZZ_SEED=random picks one). The seed in use is printed.

import { mkdirSync, writeFileSync } from 'node:fs';
import fc from 'fast-check';
import { ForcingError } from '../../model/forcing/errors.ts';
import { toEngineError } from '../../worker/engine.ts';

/** Per-case time bound, ms: a hang guard (the slowest legitimate case takes a few ms). */
export const CASE_BOUND_MS = 2000;
/** Longest acceptable error message: a message that echoes a megabyte of input is no message. */
export const MAX_MESSAGE = 4000;

export function fuzzSeed(name: string, fallback: number): number {
  const env = process.env.PYCNO_FUZZ_SEED;
  const seed = env === 'random' ? (Date.now() ^ (Math.random() * 2 ** 31)) | 0 : env ? Number(env) : fallback;
  console.log(`fuzz ${name}: seed ${seed} (replay with PYCNO_FUZZ_SEED=${seed})`);
  return seed;
}

export interface Tally {
  tried: number;
  accepted: number;
  refused: number;
  slowestMs: number;
}

export const tallies: Record<string, Tally> = {};

export function tally(name: string): Tally {
  tallies[name] ??= { tried: 0, accepted: 0, refused: 0, slowestMs: 0 };
  return tallies[name];
}

/** Why an outcome is not acceptable, or null when it is. */
export function judge(error: unknown): string | null {
  if (error === undefined) return null;
  const e = toEngineError(error);
  const name = error instanceof Error ? error.name : typeof error;
  // The run library's reader has its own class, shown by the page as it is.
  if (name === 'RunFileError' || error instanceof ForcingError) e.kind = 'input';
  if (e.kind !== 'input') return `${name} (not a clear input error): ${e.message.slice(0, 300)}`;
  if (e.message.trim() === '') return `${name} with an empty message`;
  if (e.message.length > MAX_MESSAGE)
    return `${name} with a ${e.message.length}-character message: ${e.message.slice(0, 200)}...`;
  if (/\[object Object\]|undefined is not|cannot read properties/i.test(e.message))
    return `${name} with a message that leaks an internal failure: ${e.message.slice(0, 300)}`;
  return null;
}

/** Run one case; returns the problem (for fast-check to shrink on) or null. */
export function runCase(name: string, fn: () => void, input?: string | Uint8Array): string | null {
  const t = tally(name);
  t.tried++;
  const t0 = performance.now();
  let error: unknown;
  try {
    fn();
  } catch (e) {
    error = e;
  }
  const ms = performance.now() - t0;
  t.slowestMs = Math.max(t.slowestMs, ms);
  if (error === undefined) t.accepted++;
  else t.refused++;
  const problem = ms > CASE_BOUND_MS ? `took ${ms.toFixed(0)} ms (bound ${CASE_BOUND_MS} ms)` : judge(error);
  // PYCNO_FUZZ_DUMP=dir keeps slow or failing inputs as files, to look at and to keep as regressions.
  const dump = process.env.PYCNO_FUZZ_DUMP;
  if (dump && input !== undefined && (problem || ms > 200)) {
    mkdirSync(dump, { recursive: true });
    writeFileSync(`${dump}/${name}-${t.tried}-${ms.toFixed(0)}ms.${typeof input === 'string' ? 'txt' : 'bin'}`, input);
    if (problem) writeFileSync(`${dump}/${name}-${t.tried}.why`, problem);
  }
  return problem;
}

export async function runCaseAsync(name: string, fn: () => Promise<void>): Promise<string | null> {
  const t = tally(name);
  t.tried++;
  const t0 = performance.now();
  let error: unknown;
  try {
    await fn();
  } catch (e) {
    error = e;
  }
  const ms = performance.now() - t0;
  t.slowestMs = Math.max(t.slowestMs, ms);
  if (error === undefined) t.accepted++;
  else t.refused++;
  if (ms > CASE_BOUND_MS) return `took ${ms.toFixed(0)} ms (bound ${CASE_BOUND_MS} ms)`;
  return judge(error);
}

export function printTally(name: string): void {
  const t = tally(name);
  console.log(
    `fuzz ${name}: ${t.tried} inputs, ${t.accepted} accepted, ${t.refused} refused with a clear error, slowest ${t.slowestMs.toFixed(1)} ms`,
  );
}

/** fc.assert with a printed seed and a counterexample that prints in full. */
export function check<T>(
  name: string,
  seed: number,
  runs: number,
  arb: fc.Arbitrary<T>,
  problem: (x: T) => string | null,
  show: (x: T) => string = (x) => JSON.stringify(x)?.slice(0, 2000) ?? String(x),
): void {
  fc.assert(
    fc.property(arb, (x) => {
      const p = problem(x);
      // Which fuzz and seed, so the failure can be run again (PYCNO_FUZZ_SEED=<seed>).
      if (p) throw new Error(`fuzz ${name} (seed ${seed}): ${p}\ninput: ${show(x)}`);
    }),
    { seed, numRuns: runs, endOnFailure: false },
  );
}

/** Values of every JSON type, hostile ones included. */
export function hostileValue(): fc.Arbitrary<unknown> {
  const deep = fc.integer({ min: 50, max: 800 }).map((d) => {
    let v: unknown = 1;
    for (let k = 0; k < d; k++) v = k % 2 ? [v] : { a: v };
    return v;
  });
  return fc.oneof(
    fc.constant(null),
    fc.boolean(),
    fc.integer(),
    fc.constantFrom(0, -0, 1e308, -1e308, 5e-324, 2 ** 53, -(2 ** 31), 1e21, 0.1, -1, 4294967296),
    fc.double({ noNaN: true, noDefaultInfinity: true }),
    fc.string({ maxLength: 20 }),
    fc.constantFrom(
      '',
      'NaN',
      'Infinity',
      '__proto__',
      'constructor',
      'toString',
      '\u0000',
      '\ud800',
      '1e999',
      'auto',
      'rest',
      'linear',
    ),
    fc.integer({ min: 1000, max: 200_000 }).map((n) => 'x'.repeat(n)),
    fc.array(fc.integer(), { maxLength: 5 }),
    fc.integer({ min: 1000, max: 100_000 }).map((n) => new Array(n).fill(0)),
    fc.constant({}),
    fc.constant([]),
    fc.constant(JSON.parse('{"__proto__": {"polluted": 1}, "constructor": {"prototype": 1}}')),
    deep,
  );
}
