// The linear step's rows on WebAssembly SIMD (source: wasm/rows.as.ts): the module, the layout of
// a step's fields and tables in its memory, and WasmRows, the row kernel the step schedule drives.
// One thread runs it on a memory of its own (wasmLinearParts, for model/dynamics/stepper.ts); the latitude strips run the shared build
// on one shared memory (model/parallel/wasm-strips.ts). The results are bit-identical to the
// TypeScript rows (test/kernels/linear-rows.test.ts, linear-paths.test.ts). Compiling a module needs
// WebAssembly: under a Content Security Policy that is 'wasm-unsafe-eval' (no 'unsafe-eval', no
// eval or new Function anywhere).

import type { Grid } from '../grid.ts';
import type { StepCoefficients } from './coefficients.ts';
import type { RowCoefficients } from './linear.ts';
import type { LinearRows, StepFields } from './linear-rows.ts';
import type { FieldArray } from '../state.ts';
import { bytesOf, type Precision } from '../precision.ts';
import {
  ROWS32_SHARED_WASM_BASE64,
  ROWS32_WASM_BASE64,
  ROWS_SHARED_WASM_BASE64,
  ROWS_WASM_BASE64,
} from './wasm/rows-wasm.ts';

interface RowExports {
  heapBase(): number;
  setGrid(nx: number, ny: number, W: number): void;
  setScalars(
    dt: number,
    gpdx: number,
    gpdy: number,
    idx2: number,
    idy2: number,
    dtHdx: number,
    dtHdy: number,
    r: number,
    A: number,
  ): void;
  setTables(
    fS: number,
    fN: number,
    fV: number,
    sH: number,
    sV: number,
    ax: number,
    ay: number,
    mu: number,
    mv: number,
  ): void;
  setCoast(uStart: number, uIndex: number, uCoef: number, vStart: number, vIndex: number, vCoef: number): void;
  uRow(u: number, v: number, h: number, un: number, j: number): void;
  vRow(v: number, h: number, un: number, vn: number, j: number): void;
  fusedRow(u: number, v: number, h: number, un: number, vn: number, j: number): void;
  hRow(h: number, un: number, vn: number, j: number): void;
  spongeRow(vn: number, j: number): void;
}

const compiled = new Map<string, WebAssembly.Module>();
const SOURCES: Record<string, string> = {
  'own float64': ROWS_WASM_BASE64,
  'shared float64': ROWS_SHARED_WASM_BASE64,
  'own float32': ROWS32_WASM_BASE64,
  'shared float32': ROWS32_SHARED_WASM_BASE64,
};

/** The bytes of a base64 module text (atob exists in Node and in every worker). */
export function decodeBase64(b64: string): Uint8Array {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

/** The compiled row module (once per thread): on a memory of its own or on a shared imported one, in double or float32. */
export function rowsWasmModule(shared: boolean, precision: Precision = 'float64'): WebAssembly.Module {
  const key = `${shared ? 'shared' : 'own'} ${precision}`;
  let m = compiled.get(key);
  if (!m) {
    m = new WebAssembly.Module(decodeBase64(SOURCES[key]) as BufferSource);
    compiled.set(key, m);
  }
  return m;
}

/** A shared memory of the given 64 KiB pages (its maximum the same). */
export function sharedMemory(pages: number): WebAssembly.Memory {
  return new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
}

/** True where WebAssembly with SIMD can be compiled here. */
export function wasmAvailable(): boolean {
  try {
    rowsWasmModule(false);
    return true;
  } catch {
    return false;
  }
}

/** Where a step's fields, masks, row tables and coast lists sit in a module's memory (byte offsets). */
export interface WasmLayout {
  u: [number, number];
  v: [number, number];
  h: number;
  accelX: number;
  accelY: number;
  maskU: number;
  maskV: number;
  /** coriolisSouth, coriolisNorth, fV, spongeH, spongeV. */
  tables: [number, number, number, number, number];
  /** u then v coast lists: rowStart, index, coef each. */
  coast: [number, number, number, number, number, number];
}

const align = (p: number) => (p + 63) & ~63;

/** Lay a step out above the module's heap base, values of `value` bytes; returns the layout and the bytes it needs. */
export function layOut(
  heapBase: number,
  grid: { ny: number; size: number },
  c: Pick<StepCoefficients, 'coastU' | 'coastV'>,
  value: 4 | 8 = 8,
): { layout: WasmLayout; bytes: number } {
  let at = align(heapBase);
  const take = (bytes: number) => {
    const p = at;
    at = align(at + bytes);
    return p;
  };
  const f = () => take(grid.size * value);
  const { ny } = grid;
  const cu = c.coastU;
  const cv = c.coastV;
  const b = value;
  const layout: WasmLayout = {
    u: [f(), f()],
    v: [f(), f()],
    h: f(),
    accelX: f(),
    accelY: f(),
    maskU: f(),
    maskV: f(),
    tables: [take(b * ny), take(b * ny), take(b * (ny + 1)), take(b * ny), take(b * (ny + 1))],
    coast: [
      take(4 * cu.rowStart.length),
      take(4 * cu.index.length),
      take(b * cu.coef.length),
      take(4 * cv.rowStart.length),
      take(4 * cv.index.length),
      take(b * cv.coef.length),
    ],
  };
  if (at > 65536 * 65536)
    throw new RangeError(`the grid needs ${at} bytes, more than a 32-bit WebAssembly memory holds`);
  return { layout, bytes: at };
}

/** Copy the masks, row tables and coast lists into a module's memory at the layout's places (float32: c already rounded). */
export function fillTables(
  buf: ArrayBufferLike,
  grid: { ny: number; size: number; maskU: Float64Array; maskV: Float64Array },
  c: RowCoefficients,
  at: WasmLayout,
  precision: Precision = 'float64',
): void {
  const { ny, size } = grid;
  const f64 = (p: number, n: number) =>
    precision === 'float32' ? new Float32Array(buf, p, n) : new Float64Array(buf, p, n);
  const i32 = (p: number, n: number) => new Int32Array(buf, p, n);
  f64(at.maskU, size).set(grid.maskU);
  f64(at.maskV, size).set(grid.maskV);
  const t = at.tables;
  f64(t[0], ny).set(c.coriolisSouth);
  f64(t[1], ny).set(c.coriolisNorth);
  f64(t[2], ny + 1).set(c.fV);
  f64(t[3], ny).set(c.spongeH);
  f64(t[4], ny + 1).set(c.spongeV);
  const k = at.coast;
  const cu = c.coastU;
  const cv = c.coastV;
  i32(k[0], cu.rowStart.length).set(cu.rowStart);
  i32(k[1], cu.index.length).set(cu.index);
  f64(k[2], cu.coef.length).set(cu.coef);
  i32(k[3], cv.rowStart.length).set(cv.rowStart);
  i32(k[4], cv.index.length).set(cv.index);
  f64(k[5], cv.coef.length).set(cv.coef);
}

/** The step's fields as views of the module's memory. */
export function fieldViews(buf: ArrayBufferLike, at: WasmLayout, size: number): StepFields;
export function fieldViews(
  buf: ArrayBufferLike,
  at: WasmLayout,
  size: number,
  precision: Precision,
): StepFields<FieldArray>;
export function fieldViews(
  buf: ArrayBufferLike,
  at: WasmLayout,
  size: number,
  precision: Precision = 'float64',
): StepFields<FieldArray> {
  const v = (p: number) => (precision === 'float32' ? new Float32Array(buf, p, size) : new Float64Array(buf, p, size));
  return {
    u: [v(at.u[0]), v(at.u[1])],
    v: [v(at.v[0]), v(at.v[1])],
    h: v(at.h),
    accelX: v(at.accelX),
    accelY: v(at.accelY),
  };
}

/** The heap base of a module (where its own data ends), from a throw-away instance. */
export function heapBaseOf(module: WebAssembly.Module, memory: WebAssembly.Memory): number {
  return (new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as RowExports).heapBase();
}

/** Byte addresses of one buffer set: the state's velocities and the new ones, and h. */
interface PointerSet {
  u: number;
  v: number;
  un: number;
  vn: number;
  h: number;
}

/** The WebAssembly rows: one instance of the module on a memory laid out by layOut and filled. */
export class WasmRows implements LinearRows {
  readonly ny: number;
  private readonly x: RowExports;
  private readonly sets: [PointerSet, PointerSet];

  constructor(
    module: WebAssembly.Module,
    memory: WebAssembly.Memory,
    at: WasmLayout,
    g: { nx: number; ny: number; W: number },
    private readonly c: RowCoefficients,
  ) {
    this.ny = g.ny;
    this.x = new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as RowExports;
    this.sets = [0, 1].map((cur) => ({
      u: at.u[cur],
      v: at.v[cur],
      un: at.u[1 - cur],
      vn: at.v[1 - cur],
      h: at.h,
    })) as [PointerSet, PointerSet];
    const x = this.x;
    x.setGrid(g.nx, g.ny, g.W);
    x.setTables(
      at.tables[0],
      at.tables[1],
      at.tables[2],
      at.tables[3],
      at.tables[4],
      at.accelX,
      at.accelY,
      at.maskU,
      at.maskV,
    );
    x.setCoast(at.coast[0], at.coast[1], at.coast[2], at.coast[3], at.coast[4], at.coast[5]);
  }

  params(friction: number, viscosity: number): void {
    const c = this.c;
    this.x.setScalars(c.dt, c.gpdx, c.gpdy, c.idx2, c.idy2, c.dtHdx, c.dtHdy, friction, viscosity);
  }

  u(cur: number, j: number): void {
    const s = this.sets[cur];
    this.x.uRow(s.u, s.v, s.h, s.un, j);
  }

  v(cur: number, j: number): void {
    const s = this.sets[cur];
    this.x.vRow(s.v, s.h, s.un, s.vn, j);
  }

  fused(cur: number, j: number): void {
    const s = this.sets[cur];
    this.x.fusedRow(s.u, s.v, s.h, s.un, s.vn, j);
  }

  h(cur: number, j: number): void {
    const s = this.sets[cur];
    this.x.hRow(s.h, s.un, s.vn, j);
  }

  sponge(cur: number, j: number): void {
    this.x.spongeRow(this.sets[cur].vn, j);
  }
}

/** The one-thread WebAssembly rows on a memory of their own, and the step's fields (views of it); float32: c already rounded. */
export function wasmLinearParts(
  grid: Grid,
  c: RowCoefficients,
  precision: Precision = 'float64',
): { rows: WasmRows; fields: StepFields<FieldArray> } {
  const module = rowsWasmModule(false, precision);
  const { layout, bytes } = layOut(
    heapBaseOf(module, new WebAssembly.Memory({ initial: 1 })),
    grid,
    c,
    bytesOf(precision),
  );
  const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) + 1 });
  fillTables(memory.buffer, grid, c, layout, precision);
  return {
    rows: new WasmRows(module, memory, layout, grid, c),
    fields: fieldViews(memory.buffer, layout, grid.size, precision),
  };
}
