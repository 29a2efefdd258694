// The WebAssembly strip kernel: the strip phases of wasm/strips.as.ts over one shared
// WebAssembly.Memory that holds the whole state (both velocity buffers, h, the stress
// accelerations, masks, row tables and coast lists). The leader lays the memory out and fills it;
// the leader and every worker instantiate the module against that same memory and set the same
// addresses. Needs WebAssembly SIMD and threads (shared memory): in a page, cross-origin isolation.

import { copyStepTables, decodeBase64, takeStepTables, type StepTableLayout } from '../dynamics/linear-wasm.ts';
import type { RowCoefficients } from '../dynamics/linear.ts';
import { STRIPS_WASM_BASE64 } from '../dynamics/wasm/strips-wasm.ts';
import type { StripKernel } from './strip-kernel.ts';
import type { SharedFields } from './strip-protocol.ts';
import type { StripRows } from './strip-schedule.ts';

interface StripExports {
  heapBase(): number;
  setGrid(nx: number, ny: number, W: number): void;
  setScalars(dt: number, gpdx: number, gpdy: number, idx2: number, idy2: number, dtHdx: number, dtHdy: number, r: number, A: number): void;
  setTables(fS: number, fN: number, fV: number, sH: number, sV: number, ax: number, ay: number, mu: number, mv: number): void;
  setCoast(uStart: number, uIndex: number, uCoef: number, vStart: number, vIndex: number, vCoef: number): void;
  stripFront(u: number, v: number, h: number, un: number, j1: number): void;
  stripBulk(u: number, v: number, h: number, un: number, vn: number, j0: number, j1: number): void;
  stripBack(h: number, un: number, vn: number, j0: number, j1: number): void;
  stripEdge(vn: number, j0: number): void;
}

/** Byte addresses in the shared memory. */
export interface WasmStripLayout {
  u: [number, number];
  v: [number, number];
  h: number;
  accelX: number;
  accelY: number;
  maskU: number;
  maskV: number;
  /** Row tables and coast lists, as the one-thread kernel lays them out (linear-wasm.ts). */
  tables: StepTableLayout['tables'];
  coast: StepTableLayout['coast'];
}

/** What a worker is sent to run the WebAssembly strips (a shared Memory posts as itself). */
export interface WasmStripMemory {
  memory: WebAssembly.Memory;
  layout: WasmStripLayout;
}

let compiled: WebAssembly.Module | null = null;

/** The compiled strip module (compiled once per thread). */
export function stripWasmModule(): WebAssembly.Module {
  compiled ??= new WebAssembly.Module(decodeBase64(STRIPS_WASM_BASE64) as BufferSource);
  return compiled;
}

function sharedMemory(pages: number): WebAssembly.Memory {
  return new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
}

/** True where the strip module compiles and instantiates on a shared memory (SIMD and threads). */
export function wasmStripsAvailable(): boolean {
  try {
    new WebAssembly.Instance(stripWasmModule(), { env: { memory: sharedMemory(1) } });
    return true;
  } catch {
    return false;
  }
}

const align = (p: number) => (p + 63) & ~63;

/** Lay out and fill the shared memory of a team; the returned fields are views into it. */
export function createWasmStripMemory(
  grid: { ny: number; size: number; maskU: Float64Array; maskV: Float64Array },
  c: RowCoefficients,
): { shared: WasmStripMemory; fields: SharedFields } {
  const { ny, size } = grid;
  const probe = new WebAssembly.Instance(stripWasmModule(), { env: { memory: sharedMemory(1) } });
  let at = align((probe.exports as unknown as StripExports).heapBase());
  const take = (bytes: number) => {
    const p = at;
    at = align(at + bytes);
    return p;
  };
  const f = () => take(size * 8);
  const layout: WasmStripLayout = {
    u: [f(), f()],
    v: [f(), f()],
    h: f(),
    accelX: f(),
    accelY: f(),
    maskU: f(),
    maskV: f(),
    ...takeStepTables(ny, c, take),
  };
  if (at > 65536 * 65536) throw new RangeError(`the grid needs ${at} bytes, more than a 32-bit WebAssembly memory holds`);
  const memory = sharedMemory(Math.ceil(at / 65536));
  const buf = memory.buffer;
  const f64 = (p: number, n: number) => new Float64Array(buf, p, n);
  copyStepTables(buf, grid, c, layout);
  const fields: SharedFields = {
    u: [f64(layout.u[0], size), f64(layout.u[1], size)],
    v: [f64(layout.v[0], size), f64(layout.v[1], size)],
    h: f64(layout.h, size),
    accelX: f64(layout.accelX, size),
    accelY: f64(layout.accelY, size),
  };
  return { shared: { memory, layout }, fields };
}

/** This thread's instance of the strip module on the team's memory, for strip `rows`. */
export function wasmStripKernel(shared: WasmStripMemory, g: { nx: number; ny: number; W: number }, c: RowCoefficients, rows: StripRows): StripKernel {
  const inst = new WebAssembly.Instance(stripWasmModule(), { env: { memory: shared.memory } });
  const x = inst.exports as unknown as StripExports;
  const L = shared.layout;
  x.setGrid(g.nx, g.ny, g.W);
  x.setTables(L.tables[0], L.tables[1], L.tables[2], L.tables[3], L.tables[4], L.accelX, L.accelY, L.maskU, L.maskV);
  x.setCoast(L.coast[0], L.coast[1], L.coast[2], L.coast[3], L.coast[4], L.coast[5]);
  const { j0, j1 } = rows;
  const h = L.h;
  return {
    front(cur, r, A) {
      x.setScalars(c.dt, c.gpdx, c.gpdy, c.idx2, c.idy2, c.dtHdx, c.dtHdy, r, A);
      x.stripFront(L.u[cur], L.v[cur], h, L.u[1 - cur], j1);
    },
    bulk: (cur) => x.stripBulk(L.u[cur], L.v[cur], h, L.u[1 - cur], L.v[1 - cur], j0, j1),
    back: (cur) => x.stripBack(h, L.u[1 - cur], L.v[1 - cur], j0, j1),
    edge: (cur) => x.stripEdge(L.v[1 - cur], j0),
  };
}
