// The linear step on WebAssembly SIMD (source: wasm/linear.as.ts). The state's u, v, h, the new
// velocity buffers and the stress accelerations are views into the module's memory, so a step
// copies nothing; the results are bit-identical to linearStep (test/kernels/linear-paths.test.ts).
// Compiling a module needs WebAssembly: under a Content Security Policy that is 'wasm-unsafe-eval'
// (no 'unsafe-eval', no eval or new Function anywhere).

import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import { LINEAR_WASM_BASE64 } from './wasm/linear-wasm.ts';

interface KernelExports {
  heapBase(): number;
  setGrid(nx: number, ny: number, W: number): void;
  setScalars(dt: number, gpdx: number, gpdy: number, idx2: number, idy2: number, dtHdx: number, dtHdy: number, r: number, A: number): void;
  setTables(fS: number, fN: number, fV: number, sH: number, sV: number, ax: number, ay: number, mu: number, mv: number): void;
  setCoast(uStart: number, uIndex: number, uCoef: number, vStart: number, vIndex: number, vCoef: number): void;
  step(u: number, v: number, h: number, un: number, vn: number): void;
}

let compiled: WebAssembly.Module | null = null;

/** The bytes of a base64 module text (atob exists in Node and in every worker). */
export function decodeBase64(b64: string): Uint8Array {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

/** The compiled kernel module (compiled once per thread). */
export function linearWasmModule(): WebAssembly.Module {
  compiled ??= new WebAssembly.Module(decodeBase64(LINEAR_WASM_BASE64) as BufferSource);
  return compiled;
}

/** True where WebAssembly with SIMD can be compiled here. */
export function wasmAvailable(): boolean {
  try {
    linearWasmModule();
    return true;
  } catch {
    return false;
  }
}

/** Where the masks, row tables and coast lists of a step sit in a kernel's memory (byte offsets). */
export interface StepTableLayout {
  maskU: number;
  maskV: number;
  /** coriolisSouth, coriolisNorth, fV, spongeH, spongeV. */
  tables: [number, number, number, number, number];
  /** u then v coast lists: rowStart, index, coef each. */
  coast: [number, number, number, number, number, number];
}

/** Reserve the row tables and coast lists with `take(bytes)` (masks are fields, taken by the caller). */
export function takeStepTables(ny: number, c: Pick<StepCoefficients, 'coastU' | 'coastV'>, take: (bytes: number) => number): Pick<StepTableLayout, 'tables' | 'coast'> {
  const cu = c.coastU;
  const cv = c.coastV;
  return {
    tables: [take(8 * ny), take(8 * ny), take(8 * (ny + 1)), take(8 * ny), take(8 * (ny + 1))],
    coast: [take(4 * cu.rowStart.length), take(4 * cu.index.length), take(8 * cu.coef.length), take(4 * cv.rowStart.length), take(4 * cv.index.length), take(8 * cv.coef.length)],
  };
}

/** Copy the masks, row tables and coast lists into a kernel's memory at the given layout. */
export function copyStepTables(
  buf: ArrayBufferLike,
  grid: { ny: number; size: number; maskU: Float64Array; maskV: Float64Array },
  c: Pick<StepCoefficients, 'coriolisSouth' | 'coriolisNorth' | 'fV' | 'spongeH' | 'spongeV' | 'coastU' | 'coastV'>,
  at: StepTableLayout,
): void {
  const { ny, size } = grid;
  const f64 = (p: number, n: number) => new Float64Array(buf, p, n);
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

export class WasmLinear {
  private readonly k: KernelExports;
  readonly memory: WebAssembly.Memory;
  /** Byte addresses of the two u buffers and the two v buffers and h. */
  private pu: number;
  private pv: number;
  private pun: number;
  private pvn: number;
  private readonly ph: number;
  private views = new Map<number, Float64Array>();
  readonly accelX: Float64Array;
  readonly accelY: Float64Array;

  constructor(
    private readonly grid: Grid,
    private readonly c: StepCoefficients,
    friction: number,
    viscosity: number,
  ) {
    const { nx, ny, W, size } = grid;
    const fieldBytes = size * 8;
    // Lay out: 5 state/work fields, 2 accelerations, 2 masks, 5 row tables, coast lists.
    const probe = new WebAssembly.Instance(linearWasmModule(), { env: { memory: new WebAssembly.Memory({ initial: 1 }) } });
    let at = align((probe.exports as unknown as KernelExports).heapBase());
    const take = (bytes: number) => {
      const p = at;
      at = align(at + bytes);
      return p;
    };
    const fields = Array.from({ length: 9 }, () => take(fieldBytes));
    const { tables, coast } = takeStepTables(ny, c, take);
    this.memory = new WebAssembly.Memory({ initial: Math.ceil(at / 65536) + 1 });
    const inst = new WebAssembly.Instance(linearWasmModule(), { env: { memory: this.memory } });
    this.k = inst.exports as unknown as KernelExports;
    const buf = this.memory.buffer;
    [this.pu, this.pv, this.ph, this.pun, this.pvn] = fields;
    const [pax, pay, pmu, pmv] = fields.slice(5);
    copyStepTables(buf, grid, c, { maskU: pmu, maskV: pmv, tables, coast });
    this.accelX = new Float64Array(buf, pax, size);
    this.accelY = new Float64Array(buf, pay, size);
    this.k.setGrid(nx, ny, W);
    this.k.setScalars(c.dt, c.gpdx, c.gpdy, c.idx2, c.idy2, c.dtHdx, c.dtHdy, friction, viscosity);
    this.k.setTables(tables[0], tables[1], tables[2], tables[3], tables[4], pax, pay, pmu, pmv);
    this.k.setCoast(coast[0], coast[1], coast[2], coast[3], coast[4], coast[5]);
  }

  private view(p: number): Float64Array {
    let a = this.views.get(p);
    if (!a) {
      a = new Float64Array(this.memory.buffer, p, this.grid.size);
      this.views.set(p, a);
    }
    return a;
  }

  /** Move a state's fields into the module's memory; from then on state.u/v/h are its views. */
  adopt(state: State): void {
    this.view(this.pu).set(state.u);
    this.view(this.pv).set(state.v);
    this.view(this.ph).set(state.h);
    this.bind(state);
  }

  private bind(state: State): void {
    state.u = this.view(this.pu);
    state.v = this.view(this.pv);
    state.h = this.view(this.ph);
  }

  /**
   * One step of the state adopted before (the same arithmetic as linearStep). Friction and
   * viscosity are passed each step, as linearStep takes them, so a change between steps counts.
   */
  step(state: State, friction: number, viscosity: number): void {
    const c = this.c;
    this.k.setScalars(c.dt, c.gpdx, c.gpdy, c.idx2, c.idy2, c.dtHdx, c.dtHdy, friction, viscosity);
    this.k.step(this.pu, this.pv, this.ph, this.pun, this.pvn);
    let t = this.pu;
    this.pu = this.pun;
    this.pun = t;
    t = this.pv;
    this.pv = this.pvn;
    this.pvn = t;
    this.bind(state);
  }
}

function align(p: number): number {
  return (p + 63) & ~63;
}
