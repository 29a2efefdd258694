// The nonlinear step's rows on WebAssembly SIMD (source: wasm/nonlinear.as.ts, in the same module
// as the linear rows): the layout of the step's fields and tables in a module's memory, and
// WasmNonlinearRows, the row kernel the nonlinear schedule drives. One thread runs it on a memory
// of its own (wasmNonlinearParts); the latitude strips run the shared build on one shared memory
// (model/parallel/wasm-strips.ts), each thread with a ring of its own in it. The results are
// bit-identical to the TypeScript rows (test/kernels/nonlinear-rows.test.ts) and to nonlinearStep.

import { bytesOf, type Precision } from '../precision.ts';
import type { FieldArray } from '../state.ts';
import { heapBaseOf, rowsWasmModule } from './linear-wasm.ts';
import type { NonlinearFields, NonlinearRowCoefficients, NonlinearRowGrid, NonlinearRows } from './nonlinear-rows.ts';

interface NonlinearExports {
  nlSetGrid(nx: number, ny: number, W: number): void;
  nlSetScalars(
    dt: number,
    H: number,
    gp: number,
    rho0: number,
    hMin: number,
    entrainRate: number,
    freeSlip: number,
    idx: number,
    idy: number,
    idx2: number,
    idy2: number,
  ): void;
  nlSetTables(
    fCorner: number,
    spongeH: number,
    spongeV: number,
    oceanBits: number,
    coastU: number,
    coastV: number,
  ): void;
  nlSetRing(U: number, V: number, q: number, B: number): void;
  nlSetFields(...pointers: number[]): void;
  nlParams(r: number, A: number, a0: number, a1: number, a2: number): void;
  nlPre(cur: number, j: number): void;
  nlOut(cur: number, j: number): void;
}

type Pair = [number, number];

/** Where the nonlinear step's fields, fixed arrays, tables and rings sit in a module's memory (byte offsets). */
export interface NonlinearWasmLayout {
  u: Pair;
  v: Pair;
  h: Pair;
  du: Pair;
  dv: Pair;
  dh: Pair;
  taux: number;
  tauy: number;
  spongeSums: Pair;
  /** 64-bit masks per cell: all bits set over ocean, none on land and in the halo. */
  oceanBits: number;
  coastU: number;
  coastV: number;
  /** fCorner (ny + 1), spongeH (ny), spongeV (ny + 1). */
  tables: [number, number, number];
  /** One ring (U, V, q, B: 3 W doubles each) per thread. */
  rings: Array<[number, number, number, number]>;
}

const align = (p: number) => (p + 63) & ~63;

/** Lay a nonlinear step out above the module's heap base, with `threads` rings, values of `value` bytes; returns the layout and the bytes it needs. */
export function layOutNonlinear(
  heapBase: number,
  grid: { ny: number; W: number; size: number },
  threads: number,
  value: 4 | 8 = 8,
): { layout: NonlinearWasmLayout; bytes: number } {
  let at = align(heapBase);
  const take = (bytes: number) => {
    const p = at;
    at = align(at + bytes);
    return p;
  };
  const f = () => take(grid.size * value);
  const pair = (): Pair => [f(), f()];
  const { ny, W } = grid;
  const ring = () => take(3 * W * value);
  const layout: NonlinearWasmLayout = {
    u: pair(),
    v: pair(),
    h: pair(),
    du: pair(),
    dv: pair(),
    dh: pair(),
    taux: f(),
    tauy: f(),
    spongeSums: [take(8 * (ny + 1)), take(8 * (ny + 1))],
    oceanBits: f(),
    coastU: f(),
    coastV: f(),
    tables: [take(value * (ny + 1)), take(value * ny), take(value * (ny + 1))],
    rings: Array.from({ length: threads }, () => [ring(), ring(), ring(), ring()] as [number, number, number, number]),
  };
  if (at > 65536 * 65536)
    throw new RangeError(`the grid needs ${at} bytes, more than a 32-bit WebAssembly memory holds`);
  return { layout, bytes: at };
}

/** Copy the ocean masks, coast terms and row tables into a module's memory at the layout's places (float32: c already rounded). */
export function fillNonlinearTables(
  buf: ArrayBufferLike,
  g: NonlinearRowGrid,
  c: NonlinearRowCoefficients,
  at: NonlinearWasmLayout,
  precision: Precision = 'float64',
): void {
  const size = g.maskU.length;
  const f64 = (p: number, n: number) =>
    precision === 'float32' ? new Float32Array(buf, p, n) : new Float64Array(buf, p, n);
  // a mask as wide as a value: one 32-bit word per cell in float32, two in double
  const words = bytesOf(precision) / 4;
  const bits = new Int32Array(buf, at.oceanBits, words * size);
  for (let k = 0; k < size; k++) for (let w = 0; w < words; w++) bits[words * k + w] = g.oceanF[k] ? -1 : 0;
  f64(at.coastU, size).set(c.coastU);
  f64(at.coastV, size).set(c.coastV);
  f64(at.tables[0], g.ny + 1).set(c.fCorner);
  f64(at.tables[1], g.ny).set(c.spongeH);
  f64(at.tables[2], g.ny + 1).set(c.spongeV);
}

/** The step's fields as views of the module's memory (the sponge sums stay double). */
export function nonlinearFieldViews(
  buf: ArrayBufferLike,
  at: NonlinearWasmLayout,
  size: number,
  ny: number,
  precision: Precision = 'float64',
): NonlinearFields<FieldArray> {
  const f64 = (p: number): FieldArray =>
    precision === 'float32' ? new Float32Array(buf, p, size) : new Float64Array(buf, p, size);
  const pair = (p: Pair): [FieldArray, FieldArray] => [f64(p[0]), f64(p[1])];
  return {
    u: pair(at.u),
    v: pair(at.v),
    h: pair(at.h),
    du: pair(at.du),
    dv: pair(at.dv),
    dh: pair(at.dh),
    taux: f64(at.taux),
    tauy: f64(at.tauy),
    spongeSums: [new Float64Array(buf, at.spongeSums[0], ny + 1), new Float64Array(buf, at.spongeSums[1], ny + 1)],
  };
}

/** The WebAssembly nonlinear rows: one instance of the module on a laid-out, filled memory, with ring `ring`. */
export class WasmNonlinearRows implements NonlinearRows {
  readonly ny: number;
  private readonly x: NonlinearExports;

  constructor(
    module: WebAssembly.Module,
    memory: WebAssembly.Memory,
    at: NonlinearWasmLayout,
    ring: number,
    g: { nx: number; ny: number; W: number },
    c: NonlinearRowCoefficients,
  ) {
    this.ny = g.ny;
    this.x = new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as NonlinearExports;
    const x = this.x;
    x.nlSetGrid(g.nx, g.ny, g.W);
    x.nlSetScalars(c.dt, c.H, c.gp, c.rho0, c.hMin, c.entrainRate, c.freeSlip, c.idx, c.idy, c.idx2, c.idy2);
    x.nlSetTables(at.tables[0], at.tables[1], at.tables[2], at.oceanBits, at.coastU, at.coastV);
    const r = at.rings[ring];
    x.nlSetRing(r[0], r[1], r[2], r[3]);
    x.nlSetFields(...at.u, ...at.v, ...at.h, ...at.du, ...at.dv, ...at.dh, at.taux, at.tauy, ...at.spongeSums);
  }

  params(friction: number, viscosity: number, a0: number, a1: number, a2: number): void {
    this.x.nlParams(friction, viscosity, a0, a1, a2);
  }

  pre(cur: number, j: number): void {
    this.x.nlPre(cur, j);
  }

  out(cur: number, j: number): void {
    this.x.nlOut(cur, j);
  }
}

/** The one-thread WebAssembly nonlinear rows on a memory of their own, and the fields (views of it); float32: c already rounded. */
export function wasmNonlinearParts(
  g: NonlinearRowGrid,
  c: NonlinearRowCoefficients,
  precision: Precision = 'float64',
): { rows: WasmNonlinearRows; fields: NonlinearFields<FieldArray> } {
  const module = rowsWasmModule(false, precision);
  const size = g.maskU.length;
  const { layout, bytes } = layOutNonlinear(
    heapBaseOf(module, new WebAssembly.Memory({ initial: 1 })),
    { ny: g.ny, W: g.W, size },
    1,
    bytesOf(precision),
  );
  const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) + 1 });
  fillNonlinearTables(memory.buffer, g, c, layout, precision);
  return {
    rows: new WasmNonlinearRows(module, memory, layout, 0, g, c),
    fields: nonlinearFieldViews(memory.buffer, layout, size, g.ny, precision),
  };
}
