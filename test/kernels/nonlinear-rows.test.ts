// The two row kernels of the nonlinear step hold the same arithmetic: every row function of the
// WebAssembly SIMD module (model/dynamics/wasm/nonlinear.as.ts) against the TypeScript rows
// (model/dynamics/nonlinear-rows.ts, and in float32 nonlinear-rows32.ts against the float32 build:
// 36, 37 and 38 columns put every remainder of four lanes into the scalar tails) on the same random
// fields and history, bit for bit, on every
// row of a basin with land (coasts in free and no slip), sponge rows, thin layers (entrainment and
// the stress depth floor), friction, viscosity and each order of the multistep weights. A change
// to one without the other fails here, row by row, before any step comparison would.

import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { buildCoefficients } from '../../model/dynamics/coefficients.ts';
import {
  AB_WEIGHTS,
  nonlinearFields,
  nonlinearFields32,
  nonlinearRowCoefficients,
  nonlinearRowGrid,
  TsNonlinearRows,
  type NonlinearFields,
  type NonlinearRows,
} from '../../model/dynamics/nonlinear-rows.ts';
import { roundNonlinearCoefficients, TsNonlinearRows32 } from '../../model/dynamics/nonlinear-rows32.ts';
import { wasmNonlinearParts } from '../../model/dynamics/nonlinear-wasm.ts';
import type { Precision } from '../../model/precision.ts';
import type { FieldArray } from '../../model/state.ts';
import { Grid } from '../../model/grid.ts';
import { referenceConfig } from '../../model/reference-kernel.ts';
import { sameBits } from '../support/bits.ts';

const FIELDS = ['u', 'v', 'h', 'du', 'dv', 'dh'] as const;

function setup(slip: 'free' | 'no', nx = 37, precision: Precision = 'float64') {
  // 37 columns: the v and h rows end in a scalar column; 36: the u rows and corner rows do
  const cfg = referenceConfig(nx, 30);
  cfg.basin.land = [...cfg.basin.land, { kind: 'rectangle', lonWest: 100, lonEast: 125, latSouth: 4, latNorth: 20 }];
  cfg.physics = {
    ...cfg.physics,
    mode: 'nonlinear',
    slip,
    friction: 1 / (20 * 86400),
    viscosity: 3000,
    layerThickness: 60,
    entrainment: { minThickness: 45, time: 86400 },
  };
  const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
  const c = buildCoefficients(grid, cfg.physics, 900);
  const g = nonlinearRowGrid(grid);
  const exact = nonlinearRowCoefficients(grid, c, cfg.physics);
  if (precision === 'float32') {
    const nc = roundNonlinearCoefficients(exact);
    const tsFields = nonlinearFields32(grid);
    const ts = new TsNonlinearRows32(g, nc, tsFields);
    const { rows: wasm, fields: wasmFields } = wasmNonlinearParts(g, nc, precision);
    return { cfg, grid, ts, tsFields: tsFields as NonlinearFields<FieldArray>, wasm, wasmFields };
  }
  const tsFields = nonlinearFields(grid);
  const ts = new TsNonlinearRows(g, exact, tsFields);
  const { rows: wasm, fields: wasmFields } = wasmNonlinearParts(g, exact);
  return { cfg, grid, ts, tsFields: tsFields as NonlinearFields<FieldArray>, wasm, wasmFields };
}

/** The same random values in both field sets (thicknesses down to 40 m below H = 60 m), land at 0, as the model's. */
function fill(grid: Grid, seed: string, a: NonlinearFields<FieldArray>, b: NonlinearFields<FieldArray>): void {
  const rnd = seedrandom(seed);
  const put = (x: FieldArray, y: FieldArray, scale: number, mask: Float64Array | Uint8Array, offset = 0) => {
    for (let k = 0; k < x.length; k++) x[k] = y[k] = mask[k] ? offset + scale * (2 * rnd() - 1) : 0;
  };
  for (const n of [0, 1]) {
    put(a.u[n], b.u[n], 0.8, grid.maskU);
    put(a.v[n], b.v[n], 0.4, grid.maskV);
    put(a.h[n], b.h[n], 30, grid.ocean, -10);
    put(a.du[n], b.du[n], 1e-5, grid.maskU);
    put(a.dv[n], b.dv[n], 1e-5, grid.maskV);
    put(a.dh[n], b.dh[n], 1e-4, grid.ocean);
  }
  put(a.taux, b.taux, 0.1, grid.maskU);
  put(a.tauy, b.tauy, 0.05, grid.maskV);
}

function same(a: NonlinearFields<FieldArray>, b: NonlinearFields<FieldArray>): string[] {
  const bad: string[] = [];
  for (const f of FIELDS) for (const n of [0, 1]) if (!sameBits(a[f][n], b[f][n])) bad.push(`${f}[${n}]`);
  for (const n of [0, 1]) if (!sameBits(a.spongeSums[n], b.spongeSums[n])) bad.push(`spongeSums[${n}]`);
  return bad;
}

function snapshot(f: NonlinearFields<FieldArray>): FieldArray[] {
  return FIELDS.flatMap((k) => [f[k][0].slice(), f[k][1].slice()]);
}

describe('WebAssembly nonlinear rows against the TypeScript rows', () => {
  for (const [slip, nx, precision] of [
    ['free', 37, 'float64'],
    ['no', 37, 'float64'],
    ['no', 36, 'float64'],
    ['free', 37, 'float32'],
    ['no', 38, 'float32'],
    ['no', 36, 'float32'],
  ] as const) {
    it(`every row, both buffer sets, every multistep order, the same bits (${precision}, ${slip} slip, ${nx} columns)`, () => {
      const { cfg, grid, ts, tsFields, wasm, wasmFields } = setup(slip, nx, precision);
      const { ny } = grid;
      const run = (k: NonlinearRows, cur: number, j: number) => {
        // the ring rows out(j) reads: pre of j - 1, j and j + 1 where they exist
        for (const jj of [j - 1, j, j + 1]) if (jj >= 0 && jj <= ny) k.pre(cur, jj);
        k.out(cur, j);
      };
      let changed = 0;
      let cases = 0;
      for (const weights of AB_WEIGHTS) {
        for (const cur of [0, 1]) {
          for (let j = 0; j <= ny; j++) {
            fill(grid, `${precision} ${slip} ${nx} ${weights[0]} ${cur} ${j}`, tsFields, wasmFields);
            const before = snapshot(tsFields);
            for (const k of [ts, wasm])
              k.params(cfg.physics.friction, cfg.physics.viscosity, weights[0], weights[1], weights[2]);
            run(ts, cur, j);
            run(wasm, cur, j);
            expect(same(tsFields, wasmFields), `row ${j}, cur ${cur}, weights ${weights}`).toEqual([]);
            const after = snapshot(tsFields);
            if (j < ny) {
              if (after.some((x, n) => !sameBits(x, before[n]))) changed++;
              cases++;
            }
          }
        }
      }
      // every row below the north wall wrote something (v row ny is the wall: v + 0 there)
      expect(changed).toBe(cases);
    });
  }

  it('the sponge rows report their sums, and a land row leaves its history at zero', () => {
    const { cfg, grid, ts, tsFields, wasm, wasmFields } = setup('no');
    fill(grid, 'sums', tsFields, wasmFields);
    for (const k of [ts, wasm]) k.params(cfg.physics.friction, cfg.physics.viscosity, ...AB_WEIGHTS[2]);
    for (const k of [ts, wasm]) {
      for (let j = 0; j <= grid.ny; j++) k.pre(0, j);
    }
    // rows 0..2 are sponge rows of the reference basin (10 rows at 30 rows tall)
    for (const k of [ts, wasm])
      for (const j of [0, 1, 2]) {
        k.pre(0, j);
        if (j + 1 <= grid.ny) k.pre(0, j + 1);
        if (j > 0) k.pre(0, j - 1);
        k.out(0, j);
      }
    expect(same(tsFields, wasmFields)).toEqual([]);
    for (const j of [0, 1, 2]) expect(Math.abs(tsFields.spongeSums[1][j])).toBeGreaterThan(0);
  });
});
