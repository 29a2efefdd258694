// The two row kernels of the linear step hold the same arithmetic: every row function of the
// WebAssembly SIMD module (model/dynamics/wasm/rows.as.ts) against the TypeScript reference rows
// (model/dynamics/linear.ts; in float32 the float32 build against linear-rows32.ts, on 36, 37 and
// 38 columns so that the fused sweep's four-lane remainder takes every length) on the same random
// fields, bit for bit, on every row of a basin with
// land, no-slip coasts (so the coast terms take part), sponge rows, friction and viscosity. A
// change to one without the other fails here, row by row, before any step comparison would.

import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { buildCoefficients } from '../../model/dynamics/coefficients.ts';
import {
  TsRows,
  stepFields,
  stepFields32,
  type LinearRows,
  type StepFields,
} from '../../model/dynamics/linear-rows.ts';
import { roundRowCoefficients, TsRows32 } from '../../model/dynamics/linear-rows32.ts';
import {
  fieldViews,
  fillTables,
  heapBaseOf,
  layOut,
  rowsWasmModule,
  WasmRows,
} from '../../model/dynamics/linear-wasm.ts';
import { bytesOf, type Precision } from '../../model/precision.ts';
import type { FieldArray } from '../../model/state.ts';
import { Grid } from '../../model/grid.ts';
import { referenceConfig } from '../../model/reference-kernel.ts';
import { sameBits } from '../support/bits.ts';

function setup(nx: number, precision: Precision) {
  const cfg = referenceConfig(nx, 30); // odd columns: the SIMD rows' scalar tail is used
  cfg.physics = { ...cfg.physics, slip: 'no', friction: 1 / (20 * 86400), viscosity: 3000 };
  const grid = new Grid(cfg.basin, cfg.physics.earthRadius);
  const exact = buildCoefficients(grid, cfg.physics, 9000);
  const c = precision === 'float32' ? roundRowCoefficients(exact) : exact;
  const module = rowsWasmModule(false, precision);
  const { layout, bytes } = layOut(
    heapBaseOf(module, new WebAssembly.Memory({ initial: 1 })),
    grid,
    c,
    bytesOf(precision),
  );
  const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) + 1 });
  fillTables(memory.buffer, grid, c, layout, precision);
  const wasm: LinearRows = new WasmRows(module, memory, layout, grid, c);
  const wasmFields = fieldViews(memory.buffer, layout, grid.size, precision);
  let ts: LinearRows;
  let tsFields: StepFields<FieldArray>;
  if (precision === 'float32') {
    const f = stepFields32(grid);
    ts = new TsRows32(grid, c, f);
    tsFields = f;
  } else {
    const f = stepFields(grid);
    ts = new TsRows(grid, c, f);
    tsFields = f;
  }
  return { cfg, grid, ts, tsFields, wasm, wasmFields };
}

/** The same random values (m/s and m scale) in both field sets; land faces and cells hold 0, as the model's do. */
function fill(grid: Grid, seed: string, a: StepFields<FieldArray>, b: StepFields<FieldArray>): void {
  const rnd = seedrandom(seed);
  const put = (x: FieldArray, y: FieldArray, scale: number, mask: Float64Array | Uint8Array) => {
    for (let k = 0; k < x.length; k++) x[k] = y[k] = mask[k] ? scale * (2 * rnd() - 1) : 0;
  };
  for (const n of [0, 1]) {
    put(a.u[n], b.u[n], 0.5, grid.maskU);
    put(a.v[n], b.v[n], 0.3, grid.maskV);
  }
  put(a.h, b.h, 20, grid.ocean);
  put(a.accelX, b.accelX, 1e-6, grid.maskU);
  put(a.accelY, b.accelY, 1e-6, grid.maskV);
}

function same(a: StepFields<FieldArray>, b: StepFields<FieldArray>): boolean {
  return [0, 1].every((n) => sameBits(a.u[n], b.u[n]) && sameBits(a.v[n], b.v[n])) && sameBits(a.h, b.h);
}

for (const [nx, precision] of [
  [37, 'float64'],
  [36, 'float32'],
  [37, 'float32'],
  [38, 'float32'],
] as const) {
  describe(`WebAssembly rows against the TypeScript rows (${precision}, ${nx} columns)`, () => {
    const { cfg, grid, ts, tsFields, wasm, wasmFields } = setup(nx, precision);
    const ops: Array<{ name: keyof Omit<LinearRows, 'ny' | 'params'>; rows: number[] }> = [
      { name: 'u', rows: Array.from({ length: grid.ny }, (_, j) => j) },
      { name: 'v', rows: Array.from({ length: grid.ny + 1 }, (_, j) => j) },
      { name: 'fused', rows: Array.from({ length: grid.ny - 1 }, (_, j) => j + 1) },
      { name: 'h', rows: Array.from({ length: grid.ny }, (_, j) => j) },
      { name: 'sponge', rows: Array.from({ length: grid.ny + 1 }, (_, j) => j) },
    ];
    for (const op of ops) {
      it(`${op.name}: every row, both buffer sets, the same bits`, () => {
        let changed = 0;
        for (const cur of [0, 1]) {
          for (const j of op.rows) {
            fill(grid, `${op.name} ${cur} ${j}`, tsFields, wasmFields);
            const before = tsFields.h.slice();
            const unBefore = tsFields.u[1 - cur].slice();
            const vnBefore = tsFields.v[1 - cur].slice();
            ts.params(cfg.physics.friction, cfg.physics.viscosity);
            wasm.params(cfg.physics.friction, cfg.physics.viscosity);
            ts[op.name](cur, j);
            wasm[op.name](cur, j);
            expect(same(tsFields, wasmFields), `${op.name} row ${j}, cur ${cur}`).toBe(true);
            if (
              !sameBits(before, tsFields.h) ||
              !sameBits(unBefore, tsFields.u[1 - cur]) ||
              !sameBits(vnBefore, tsFields.v[1 - cur])
            )
              changed++;
          }
        }
        // the rows did work (a row of land or outside the sponge may leave everything as it was)
        expect(changed).toBeGreaterThan(op.rows.length / 2);
      });
    }
  });
}
