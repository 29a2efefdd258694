// Restart equivalence: 2N steps straight = N steps, restart file, read back, N more, bit for bit,
// for both schemes, with random bursts on, through the same path a user takes (a second scenario
// with initial.kind = "restart" naming the file). The bursts are drawn up front from the seed, so
// the continuing run rebuilds the same forcing from its scenario; the test proves it does.

import { describe, expect, it } from 'vitest';
import { readRestart, writeRestart } from '../../model/io/restart.ts';
import { buildPrepared, loadInputs, mapReader, parseScenario } from '../../model/scenario/load-inputs.ts';
import type { State } from '../../model/state.ts';
import { withBursts } from '../support/trust-kit.ts';

const bitsEqual = (a: Float64Array | Float32Array, b: Float64Array | Float32Array) =>
  Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

function sameState(a: State, b: State): string[] {
  const bad: string[] = [];
  for (const k of ['u', 'v', 'h'] as const) if (!bitsEqual(a[k], b[k])) bad.push(k);
  for (const k of ['du', 'dv', 'dh'] as const)
    for (const n of [0, 1]) if (!bitsEqual(a.history[k][n], b.history[k][n])) bad.push(`${k}[${n}]`);
  if (a.time !== b.time) bad.push('time');
  if (a.steps !== b.steps) bad.push('steps');
  if (a.historyCount !== b.historyCount) bad.push('historyCount');
  return bad;
}

const TEXT = withBursts();

async function continued(sets: string[], n: number) {
  const first = parseScenario(TEXT, '/runs/first.json', ['basin.resolution=0.5', 'time.days=8', ...sets]);
  const straight = buildPrepared(first, await loadInputs(first, mapReader(new Map()))).model;
  straight.advance(2 * n);

  const half = buildPrepared(first, await loadInputs(first, mapReader(new Map())));
  half.model.advance(n);
  const bytes = await writeRestart(half.model, { scenarioJson: first.scenarioJson });
  // The continuation is another scenario file, as a user writes it.
  const sc = JSON.parse(TEXT);
  sc.initial = { kind: 'restart', path: 'half.nc' };
  const cont = parseScenario(JSON.stringify(sc), '/runs/cont.json', ['basin.resolution=0.5', 'time.days=8', ...sets]);
  const inputs = await loadInputs(cont, mapReader(new Map([['/runs/half.nc', bytes]])));
  const built = buildPrepared(cont, inputs);
  built.model.advance(n);
  return { straight, half, cont: built, bytes };
}

describe('restart equivalence (2N = N + restart + N)', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    for (const update of ['0', '6']) {
      it(`${mode}, bursts on, wind refreshed ${update === '0' ? 'every step' : 'every 6 hours'}`, async () => {
        // N odd and not a multiple of the wind interval or the health-check period.
        const n = 37;
        const r = await continued([`physics.dynamics=${mode}`, `wind.updateHours=${update}`], n);
        expect(r.half.bursts.length).toBeGreaterThan(0);
        // The same bursts, drawn again from the seed by the continuing run.
        expect(r.cont.bursts).toEqual(r.half.bursts);
        // A burst is on at the restart time or after it, so the forcing matters for the second half.
        const day = r.half.model.day;
        expect(r.half.bursts.some((b) => b.start + b.duration > day && b.start < r.straight.day)).toBe(true);
        expect(sameState(r.cont.model.state, r.straight.state)).toEqual([]);
        if (mode === 'nonlinear') expect(readRestart(r.bytes, r.half.model.grid).historyCount).toBe(2);
        // Not a run at rest: the comparison compares something.
        expect(r.straight.state.h.some((x) => x !== 0)).toBe(true);
      });
    }
  }

  it('a restart read under another seed rebuilds other bursts, and the loading says so', async () => {
    const first = parseScenario(TEXT, '/runs/first.json', ['basin.resolution=0.5']);
    const half = buildPrepared(first, await loadInputs(first, mapReader(new Map()))).model;
    half.advance(10);
    const bytes = await writeRestart(half, { scenarioJson: first.scenarioJson });
    const sc = JSON.parse(TEXT);
    sc.initial = { kind: 'restart', path: 'half.nc' };
    sc.seed = 99;
    const cont = parseScenario(JSON.stringify(sc), '/runs/cont.json', ['basin.resolution=0.5']);
    const inputs = await loadInputs(cont, mapReader(new Map([['/runs/half.nc', bytes]])));
    expect(inputs.notes.join('\n')).toMatch(
      /half\.nc was written by a run with other wind or seed \(seed 11, now 99\)/,
    );
  });
});
