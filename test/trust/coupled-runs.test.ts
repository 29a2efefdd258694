// A coupled run is as reproducible as any other: with strength 0 it is the uncoupled run to the
// bit; a restart continues it bit for bit (its SST anomaly in the restart file, its wind answered
// again from it); every kernel (TypeScript, WebAssembly, latitude strips) gives the same bits; and
// the answer enters the one stress field all of them read.

import { afterAll, describe, expect, it } from 'vitest';
import { readRestart, writeRestart } from '../../model/io/restart.ts';
import type { Model } from '../../model/model.ts';
import { buildPrepared, loadInputs, mapReader, parseScenario } from '../../model/scenario/load-inputs.ts';
import { readFileSync } from 'node:fs';
import { nodeStripHost } from '../../worker/strips-node.ts';
import { sameBits } from '../support/bits.ts';

const TEXT = readFileSync('configs/coupled-oscillation.json', 'utf8');
/** A small, fast, strongly coupled version: 1 degree cells, couplings every 3 steps, SST from the start, zonal advection on. */
/** The answering part off, and with it its output fields. */
const OFF = ['wind.parts[1].enabled=false', 'output.fields=["h_anom","u_surf","v_surf","taux","tauy"]'];
const SMALL = [
  'basin.resolution=1',
  'physics.viscosity=32000',
  'time.days=40',
  'wind.parts[0].envelope.start=0',
  'wind.parts[1].everySteps=3',
  'wind.parts[1].strength=40',
  'wind.parts[1].sst.initial=0.5',
  'wind.parts[1].sst.meanGradient=-1.5',
];

function built(sets: string[]): Model {
  const p = parseScenario(TEXT, '/runs/coupled.json', [...SMALL, ...sets]);
  return buildPrepared(p, { files: new Map(), notes: [] }).model;
}

function differences(a: Model, b: Model, withSst = true): string[] {
  const bad: string[] = [];
  for (const k of ['u', 'v', 'h'] as const) if (!sameBits(a.state[k], b.state[k])) bad.push(k);
  if (!sameBits(a.taux, b.taux)) bad.push('taux');
  if (!sameBits(a.tauy, b.tauy)) bad.push('tauy');
  if (
    withSst &&
    ((a.state.sst === null) !== (b.state.sst === null) || (a.state.sst && !sameBits(a.state.sst, b.state.sst!)))
  )
    bad.push('sst');
  if (a.state.steps !== b.state.steps || a.state.time !== b.state.time) bad.push('clock');
  return bad;
}

describe('coupled runs, bit for bit', () => {
  for (const mode of ['linear', 'nonlinear'] as const) {
    it(`${mode}: strength 0 gives the run without the answering part, to the bit`, () => {
      const off = built([`physics.dynamics=${mode}`, ...OFF]);
      const zero = built([`physics.dynamics=${mode}`, 'wind.parts[1].strength=0']);
      off.advance(200);
      zero.advance(200);
      expect(differences(off, zero, false)).toEqual([]);
      expect(off.state.sst).toBeNull();
      // The coupled machinery ran all along: the SST moved (it relaxes toward the thermocline's).
      expect(zero.state.sst!.some((x) => x !== 0)).toBe(true);
      expect(zero.state.sst!.some((x, k) => Math.abs(x - 0.5 * zero.state.sst![k]) > 1e-6)).toBe(true);
      // And a coupled run is another run: the answer changes the ocean.
      const on = built([`physics.dynamics=${mode}`]);
      on.advance(200);
      expect(sameBits(on.state.h, off.state.h)).toBe(false);
      expect(off.state.h.some((x) => x !== 0)).toBe(true);
    });
  }

  for (const mode of ['linear', 'nonlinear'] as const) {
    for (const n of [37, 36]) {
      it(`${mode}: 2N steps = N steps, restart file, N more (N = ${n}, couplings every 3 steps)`, async () => {
        const sets = [`physics.dynamics=${mode}`];
        const straight = built(sets);
        straight.advance(2 * n);
        const half = built(sets);
        half.advance(n);
        const first = parseScenario(TEXT, '/runs/coupled.json', [...SMALL, ...sets]);
        const bytes = await writeRestart(half, { scenarioJson: first.scenarioJson });
        expect(readRestart(bytes, half.grid).sst).not.toBeNull();
        const sc = JSON.parse(TEXT);
        sc.initial = { kind: 'restart', path: 'half.nc' };
        const cont = parseScenario(JSON.stringify(sc), '/runs/cont.json', [...SMALL, ...sets]);
        const inputs = await loadInputs(cont, mapReader(new Map([['/runs/half.nc', bytes]])));
        const model = buildPrepared(cont, inputs).model;
        model.advance(n);
        expect(differences(model, straight)).toEqual([]);
        expect(straight.state.sst!.some((x) => Math.abs(x) > 1e-3)).toBe(true);
      });
    }
  }

  it("a restart file without an SST anomaly (an uncoupled run) starts the coupling from the part's initial SST", async () => {
    const plain = built(OFF);
    plain.advance(10);
    const bytes = await writeRestart(plain, {});
    const state = readRestart(bytes, plain.grid);
    expect(state.sst).toBeNull();
    const coupled = built([]);
    const fromPlain = buildPrepared(parseScenario(TEXT, '/runs/c.json', SMALL), {
      files: new Map(),
      notes: [],
      startState: state,
    }).model;
    expect(Math.max(...fromPlain.state.sst!)).toBeCloseTo(Math.max(...coupled.state.sst!), 12);
  });
});

describe('coupled runs on every kernel', () => {
  const models: Model[] = [];
  afterAll(async () => {
    for (const m of models) await m.close();
  });

  it('TypeScript, WebAssembly and two latitude strips give the same bits', async () => {
    const p = parseScenario(TEXT, '/runs/coupled.json', SMALL);
    const { Model } = await import('../../model/model.ts');
    const { buildWindStress } = await import('../../model/forcing/wind.ts');
    const { Grid } = await import('../../model/grid.ts');
    const { equatorialBeta } = await import('../../model/theory.ts');
    const r = p.resolved;
    const make = (kernel: 'ts' | 'wasm', threads = 1) => {
      const grid = new Grid(r.model.basin, r.model.physics.earthRadius);
      const { stress } = buildWindStress(grid, r.wind, { seed: String(r.seed), beta: equatorialBeta(r.model.physics) });
      const m = new Model(r.model, { wind: stress, kernel, threads });
      models.push(m);
      return m;
    };
    const ts = make('ts');
    const wasm = make('wasm');
    const strips = make('ts', 2);
    const choice = await strips.startThreads({ ...nodeStripHost(), cores: 4 });
    expect(choice.threads).toBe(2);
    expect(ts.kernel).toBe('ts');
    expect(wasm.kernel).toBe('wasm');
    for (const m of [ts, wasm, strips]) m.advance(151);
    expect(differences(wasm, ts)).toEqual([]);
    expect(differences(strips, ts)).toEqual([]);
    expect(strips.threads).toBe(2);
  });
});
