// The nonlinear step as rows: the row operations that the nonlinear strip schedule
// (step-schedule.ts) drives, for one thread and for each latitude strip alike. The arithmetic is
// that of nonlinearStep (nonlinear.ts), operation for operation, so every path gives its bits:
// the TypeScript rows here (TsNonlinearRows) and the WebAssembly SIMD rows of
// wasm/nonlinear.as.ts (WasmNonlinearRows, nonlinear-wasm.ts).
//
// What differs from nonlinearStep is only where values live. The state is double-buffered (u, v
// and h of the step are read, the new ones go into the other buffer of each pair), so a row's
// result never feeds another row of the same step, and a strip needs no barrier inside a step.
// The mass fluxes U, V, the potential vorticity q and the Bernoulli function B of a row are kept
// in a ring of three rows per thread (pre), which the rows above and below read (out): a strip
// computes the one row of them below and above its own that its neighbours also compute, from
// the same old values, so with the same bits. The tendency of a field goes into the history slot
// that held the oldest one (read just before at the same place), so AB3 carries two slots, not
// three.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { FieldArray, State } from '../state.ts';
import type { StepCoefficients } from './coefficients.ts';
import type { FieldBinding } from './field-binding.ts';

/** The fields of the nonlinear step, in the padded layout (see model/grid.ts). */
export interface NonlinearFields<F extends FieldArray = Float64Array> {
  /** The state in [cur], the step's result in [1 - cur]. */
  u: [F, F];
  v: [F, F];
  h: [F, F];
  /**
   * Tendency history: slot [cur] holds the previous step's tendency, slot [1 - cur] the one before;
   * the step reads both and writes its own tendency into slot [1 - cur].
   */
  du: [F, F];
  dv: [F, F];
  dh: [F, F];
  /** Wind stress on u and v faces, N m-2. */
  taux: F;
  tauy: F;
  /**
   * Sum of h' over each sponge row after the step's advance (before its sponge factor), by j; the
   * step that begins with `cur` current writes [1 - cur] (so a team's leader can read a step's
   * sums while the workers run the next).
   */
  spongeSums: [Float64Array, Float64Array];
}

export function nonlinearFields(grid: Pick<Grid, 'field' | 'ny'>): NonlinearFields {
  const two = (): [Float64Array, Float64Array] => [grid.field(), grid.field()];
  return {
    u: two(),
    v: two(),
    h: two(),
    du: two(),
    dv: two(),
    dh: two(),
    taux: grid.field(),
    tauy: grid.field(),
    spongeSums: [new Float64Array(grid.ny + 1), new Float64Array(grid.ny + 1)],
  };
}

/** The same in float32 (the sponge sums stay double: they are the budget's). */
export function nonlinearFields32(grid: Pick<Grid, 'size' | 'ny'>): NonlinearFields<Float32Array> {
  const f = () => new Float32Array(grid.size);
  const two = (): [Float32Array, Float32Array] => [f(), f()];
  return {
    u: two(),
    v: two(),
    h: two(),
    du: two(),
    dv: two(),
    dh: two(),
    taux: f(),
    tauy: f(),
    spongeSums: [new Float64Array(grid.ny + 1), new Float64Array(grid.ny + 1)],
  };
}

/** What the nonlinear rows read of the grid (a strip worker holds only these). */
export interface NonlinearRowGrid {
  nx: number;
  ny: number;
  W: number;
  maskU: Float64Array;
  maskV: Float64Array;
  /** 1 for ocean, 0 for land, as doubles (the rows multiply by it). */
  oceanF: Float64Array;
}

/** The constants of the nonlinear rows, all computed once from the physics and the coefficients. */
export interface NonlinearRowCoefficients {
  dt: number;
  H: number;
  gp: number;
  rho0: number;
  /** Entrainment: minimum thickness (m) and rate 1 / time (s-1, 0 without). */
  hMin: number;
  entrainRate: number;
  /** 1 for free slip (no shear at a corner touching land), 0 for no slip. */
  freeSlip: number;
  idx: number;
  idy: number;
  idx2: number;
  idy2: number;
  /** f at corners, by face row (ny + 1); sponge factors of h rows (ny) and v rows (ny + 1). */
  fCorner: Float64Array;
  spongeH: Float64Array;
  spongeV: Float64Array;
  /** Coast terms of the Laplacian, dense per face (coefficients.ts). */
  coastU: Float64Array;
  coastV: Float64Array;
}

export function nonlinearRowGrid(grid: Grid): NonlinearRowGrid {
  return {
    nx: grid.nx,
    ny: grid.ny,
    W: grid.W,
    maskU: grid.maskU,
    maskV: grid.maskV,
    oceanF: Float64Array.from(grid.ocean),
  };
}

export function nonlinearRowCoefficients(
  grid: Grid,
  c: StepCoefficients,
  physics: PhysicsConfig,
): NonlinearRowCoefficients {
  return {
    dt: c.dt,
    H: physics.layerThickness,
    gp: physics.reducedGravity,
    rho0: physics.density,
    hMin: physics.entrainment.minThickness,
    entrainRate: physics.entrainment.time > 0 ? 1 / physics.entrainment.time : 0,
    freeSlip: physics.slip === 'free' ? 1 : 0,
    idx: 1 / grid.dx,
    idy: 1 / grid.dy,
    idx2: c.idx2,
    idy2: c.idy2,
    fCorner: c.fCorner,
    spongeH: c.spongeH,
    spongeV: c.spongeV,
    coastU: c.coastFieldU,
    coastV: c.coastFieldV,
  };
}

/** Adams-Bashforth weights for orders 1, 2, 3 (newest tendency first), by min(historyCount, 2). */
export const AB_WEIGHTS = [
  [1, 0, 0],
  [1.5, -0.5, 0],
  [23 / 12, -16 / 12, 5 / 12],
] as const;

/** Thickness below which the stress is applied as if the layer were this thick (as nonlinear.ts). */
export const STRESS_DEPTH_FLOOR = 1;

/** The row operations of one nonlinear step; `cur` says which buffers hold the state. */
export interface NonlinearRows {
  readonly ny: number;
  /** Friction r, viscosity A and the Adams-Bashforth weights of the steps that follow. */
  params(friction: number, viscosity: number, a0: number, a1: number, a2: number): void;
  /**
   * The diagnosed rows of row j into this thread's ring, from the state: U and B (0 <= j < ny),
   * V and q (0 <= j <= ny).
   */
  pre(cur: number, j: number): void;
  /**
   * The new u, v and h of row j (v only for j = ny) with their tendencies into the history and
   * the row's sponge; needs pre of rows j - 1, j and j + 1 (those that exist) in the ring.
   */
  out(cur: number, j: number): void;
}

/** The ring slot of row j (j >= -1). */
export const ringSlot = (j: number): number => (j + 3) % 3;

/** The TypeScript rows over a set of fields, with a ring of its own. */
export class TsNonlinearRows implements NonlinearRows {
  readonly ny: number;
  private r = 0;
  private A = 0;
  private a0 = 1;
  private a1 = 0;
  private a2 = 0;
  /** Ring rows of U, V, q, B: slot s holds padded columns 0..W-1 at s * W. */
  private readonly U: Float64Array;
  private readonly V: Float64Array;
  private readonly q: Float64Array;
  private readonly B: Float64Array;

  constructor(
    private readonly g: NonlinearRowGrid,
    private readonly c: NonlinearRowCoefficients,
    private readonly f: NonlinearFields,
  ) {
    this.ny = g.ny;
    const ring = () => new Float64Array(3 * g.W);
    this.U = ring();
    this.V = ring();
    this.q = ring();
    this.B = ring();
  }

  params(friction: number, viscosity: number, a0: number, a1: number, a2: number): void {
    this.r = friction;
    this.A = viscosity;
    this.a0 = a0;
    this.a1 = a1;
    this.a2 = a2;
  }

  pre(cur: number, j: number): void {
    const { nx, ny, W, maskU, maskV, oceanF: ocean } = this.g;
    const { H, gp, idx, idy, freeSlip } = this.c;
    const u = this.f.u[cur];
    const v = this.f.v[cur];
    const h = this.f.h[cur];
    const row = (j + 1) * W;
    const o = ringSlot(j) * W - row; // ring index of padded index k is o + k
    const { U, V, q, B } = this;
    if (j < ny) {
      for (let k = row + 1; k <= row + nx + 1; k++) U[o + k] = maskU[k] * 0.5 * (2 * H + h[k - 1] + h[k]) * u[k];
      for (let k = row + 1; k <= row + nx; k++) {
        if (!ocean[k]) {
          B[o + k] = 0;
          continue;
        }
        const ke = 0.25 * (u[k] * u[k] + u[k + 1] * u[k + 1] + v[k] * v[k] + v[k + W] * v[k + W]);
        B[o + k] = gp * h[k] + ke;
      }
    }
    for (let k = row + 1; k <= row + nx; k++) V[o + k] = maskV[k] * 0.5 * (2 * H + h[k - W] + h[k]) * v[k];
    const f = this.c.fCorner[j];
    for (let k = row + 1; k <= row + nx + 1; k++) {
      const wet = ocean[k] + ocean[k - 1] + ocean[k - W] + ocean[k - W - 1];
      if (wet === 0) {
        q[o + k] = 0;
        continue;
      }
      const zeta = freeSlip && wet < 4 ? 0 : (v[k] - v[k - 1]) * idx - (u[k] - u[k - W]) * idy;
      const hq =
        (ocean[k] * h[k] + ocean[k - 1] * h[k - 1] + ocean[k - W] * h[k - W] + ocean[k - W - 1] * h[k - W - 1]) / wet +
        H;
      q[o + k] = (f + zeta) / Math.max(hq, STRESS_DEPTH_FLOOR);
    }
  }

  out(cur: number, j: number): void {
    const { nx, ny, W, maskU, maskV, oceanF: ocean } = this.g;
    const c = this.c;
    const { H, rho0, idx, idy, idx2, idy2, dt, hMin, entrainRate } = c;
    const { r, A, a0, a1, a2, U, V, q, B } = this;
    const f = this.f;
    const u = f.u[cur];
    const v = f.v[cur];
    const h = f.h[cur];
    const row = (j + 1) * W;
    // Ring offsets of rows j - 1, j and j + 1 such that the value the reference reads at k - W,
    // k or k + W (k in row j) is at oS + k, oC + k or oN + k.
    const oS = ringSlot(j - 1) * W - row;
    const oC = ringSlot(j) * W - row;
    const oN = ringSlot(j + 1) * W - row;
    if (j < ny) {
      // u faces of row j
      const un = f.u[1 - cur];
      const t1 = f.du[cur];
      const t2 = f.du[1 - cur];
      const taux = f.taux;
      const coast = c.coastU;
      for (let k = row + 1; k <= row + nx + 1; k++) {
        let du = 0;
        if (maskU[k]) {
          const uc = u[k];
          const pv = 0.25 * (q[oN + k] * (V[oN + k - 1] + V[oN + k]) + q[oC + k] * (V[oC + k - 1] + V[oC + k]));
          const hu = Math.max(H + 0.5 * (h[k - 1] + h[k]), STRESS_DEPTH_FLOOR);
          const lap = (u[k + 1] + u[k - 1] - 2 * uc) * idx2 + (u[k + W] + u[k - W] - 2 * uc) * idy2 + coast[k] * uc;
          du = pv - (B[oC + k] - B[oC + k - 1]) * idx + taux[k] / (rho0 * hu) - r * uc + A * lap;
        }
        un[k] = u[k] + dt * (a0 * du + a1 * t1[k] + a2 * t2[k]);
        t2[k] = du;
      }
    }
    {
      // v faces of row j
      const vn = f.v[1 - cur];
      const t1 = f.dv[cur];
      const t2 = f.dv[1 - cur];
      const tauy = f.tauy;
      const coast = c.coastV;
      for (let k = row + 1; k <= row + nx; k++) {
        let dv = 0;
        if (maskV[k]) {
          const vc = v[k];
          const pv = 0.25 * (q[oC + k + 1] * (U[oS + k + 1] + U[oC + k + 1]) + q[oC + k] * (U[oS + k] + U[oC + k]));
          const hv = Math.max(H + 0.5 * (h[k - W] + h[k]), STRESS_DEPTH_FLOOR);
          const lap = (v[k + 1] + v[k - 1] - 2 * vc) * idx2 + (v[k + W] + v[k - W] - 2 * vc) * idy2 + coast[k] * vc;
          dv = -pv - (B[oC + k] - B[oS + k]) * idy + tauy[k] / (rho0 * hv) - r * vc + A * lap;
        }
        vn[k] = v[k] + dt * (a0 * dv + a1 * t1[k] + a2 * t2[k]);
        t2[k] = dv;
      }
      const s = c.spongeV[j];
      if (s !== 1) for (let k = row + 1; k <= row + nx; k++) vn[k] *= s;
    }
    if (j < ny) {
      // h at the centres of row j
      const hn = f.h[1 - cur];
      const t1 = f.dh[cur];
      const t2 = f.dh[1 - cur];
      for (let k = row + 1; k <= row + nx; k++) {
        let dh = 0;
        if (ocean[k]) {
          const thick = H + h[k];
          const entrain = thick < hMin ? (hMin - thick) * entrainRate : 0;
          dh = -((U[oC + k + 1] - U[oC + k]) * idx + (V[oN + k] - V[oC + k]) * idy) + entrain;
        }
        hn[k] = h[k] + dt * (a0 * dh + a1 * t1[k] + a2 * t2[k]);
        t2[k] = dh;
      }
      const s = c.spongeH[j];
      if (s !== 1) {
        let sum = 0;
        for (let k = row + 1; k <= row + nx; k++) {
          sum += hn[k];
          hn[k] *= s;
        }
        f.spongeSums[1 - cur][j] = sum;
      }
    }
  }
}

/** The nonlinear fields and the State: u, v, h double-buffered, the history in two slots, the stress as given. */
export function nonlinearBinding(
  f: NonlinearFields<FieldArray>,
  spongeH: Float64Array,
  spongeRowsH: Int32Array,
): FieldBinding {
  const bind = (state: State, cur: number) => {
    state.u = f.u[cur];
    state.v = f.v[cur];
    state.h = f.h[cur];
    const hist = state.history;
    hist.du[0] = f.du[cur];
    hist.du[1] = f.du[1 - cur];
    hist.dv[0] = f.dv[cur];
    hist.dv[1] = f.dv[1 - cur];
    hist.dh[0] = f.dh[cur];
    hist.dh[1] = f.dh[1 - cur];
  };
  return {
    adopt(state) {
      f.u[0].set(state.u);
      f.v[0].set(state.v);
      f.h[0].set(state.h);
      for (const key of ['du', 'dv', 'dh'] as const) {
        f[key][0].set(state.history[key][0]);
        f[key][1].set(state.history[key][1]);
      }
      bind(state, 0);
    },
    bind,
    setStress(taux, tauy) {
      f.taux.set(taux);
      f.tauy.set(tauy);
    },
    stepParams(state, friction, viscosity, out) {
      const w = AB_WEIGHTS[Math.min(state.historyCount, 2)];
      out[0] = friction;
      out[1] = viscosity;
      out[2] = w[0];
      out[3] = w[1];
      out[4] = w[2];
    },
    stepped(state) {
      state.historyCount = Math.min(state.historyCount + 1, 2);
    },
    spongeTaken(cur) {
      // as applySponge (sponge.ts) sums it: row by row in the order of the sponge rows
      const sums = f.spongeSums[1 - cur];
      let removed = 0;
      for (let n = 0; n < spongeRowsH.length; n++) {
        const j = spongeRowsH[n];
        removed += (1 - spongeH[j]) * sums[j];
      }
      return removed;
    },
  };
}
