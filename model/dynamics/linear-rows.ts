// The linear step as rows: the five row operations that the one step schedule
// (step-schedule.ts) drives, for one thread and for each latitude strip alike. Two
// implementations compute them with the same arithmetic, operation for operation: the TypeScript
// row functions of linear.ts (TsRows, here) and the WebAssembly SIMD rows of wasm/rows.as.ts
// (WasmRows, linear-wasm.ts). test/kernels/linear-rows.test.ts holds them to the same bits.

import type { Grid } from '../grid.ts';
import type { FieldArray, State } from '../state.ts';
import type { FieldBinding } from './field-binding.ts';
import { fusedRow, hRow, spongeRow, uRow, vRow, type RowCoefficients, type RowGrid } from './linear.ts';

/**
 * The fields a step works on, in the padded layout: two buffers of each velocity (the state in
 * u[cur], v[cur]; the step writes the new velocities into the other), h (updated in place) and
 * the stress accelerations taux/(rho0 H), tauy/(rho0 H).
 */
export interface StepFields<F extends FieldArray = Float64Array> {
  u: [F, F];
  v: [F, F];
  h: F;
  accelX: F;
  accelY: F;
}

/** Fresh zeroed fields of a grid (the one-thread TypeScript step). */
export function stepFields(grid: Pick<Grid, 'field'>): StepFields {
  return {
    u: [grid.field(), grid.field()],
    v: [grid.field(), grid.field()],
    h: grid.field(),
    accelX: grid.field(),
    accelY: grid.field(),
  };
}

/** Fresh zeroed float32 fields of a grid. */
export function stepFields32(grid: Pick<Grid, 'size'>): StepFields<Float32Array> {
  const f = () => new Float32Array(grid.size);
  return { u: [f(), f()], v: [f(), f()], h: f(), accelX: f(), accelY: f() };
}

/** The row operations of one step; `cur` says which velocity buffers hold the state. */
export interface LinearRows {
  readonly ny: number;
  /** Friction r (s-1) and viscosity A (m2 s-1) for the steps that follow. */
  params(friction: number, viscosity: number): void;
  /** u on the west faces of row j, with the old v. */
  u(cur: number, j: number): void;
  /** v on the south faces of row j, with the new u. */
  v(cur: number, j: number): void;
  /** u row j, v row j and h row j - 1 in one sweep (1 <= j < ny). */
  fused(cur: number, j: number): void;
  /** h' of row j from the new velocities, with the row's sponge factor. */
  h(cur: number, j: number): void;
  /** The v sponge of row j, after continuity has used the unrelaxed flux. */
  sponge(cur: number, j: number): void;
}

interface RowSet {
  u: Float64Array;
  v: Float64Array;
  un: Float64Array;
  vn: Float64Array;
}

/** The TypeScript rows over a set of fields. */
export class TsRows implements LinearRows {
  readonly ny: number;
  private r = 0;
  private A = 0;
  private readonly sets: [RowSet, RowSet];

  constructor(
    private readonly g: RowGrid,
    private readonly c: RowCoefficients,
    private readonly f: StepFields,
  ) {
    this.ny = g.ny;
    this.sets = [0, 1].map((cur) => ({ u: f.u[cur], v: f.v[cur], un: f.u[1 - cur], vn: f.v[1 - cur] })) as [
      RowSet,
      RowSet,
    ];
  }

  params(friction: number, viscosity: number): void {
    this.r = friction;
    this.A = viscosity;
  }

  u(cur: number, j: number): void {
    const s = this.sets[cur];
    uRow(this.g, this.c, this.r, this.A, this.f.accelX, s.u, s.v, this.f.h, s.un, j);
  }

  v(cur: number, j: number): void {
    const s = this.sets[cur];
    vRow(this.g, this.c, this.r, this.A, this.f.accelY, s.v, this.f.h, s.un, s.vn, j);
  }

  fused(cur: number, j: number): void {
    const s = this.sets[cur];
    fusedRow(this.g, this.c, this.r, this.A, this.f.accelX, this.f.accelY, s.u, s.v, this.f.h, s.un, s.vn, j);
  }

  h(cur: number, j: number): void {
    const s = this.sets[cur];
    hRow(this.g, this.c, this.f.h, s.un, s.vn, j);
  }

  sponge(cur: number, j: number): void {
    spongeRow(this.g, this.c, this.sets[cur].vn, j);
  }
}

/** The linear fields and the State: u, v double-buffered, h in place, the stress as accelerations. */
export function linearBinding(
  grid: Pick<Grid, 'maskU' | 'maskV'>,
  f: StepFields<FieldArray>,
  rhoH: number,
): FieldBinding {
  const bind = (state: State, cur: number) => {
    state.u = f.u[cur];
    state.v = f.v[cur];
    state.h = f.h;
  };
  return {
    adopt(state) {
      f.u[0].set(state.u);
      f.v[0].set(state.v);
      f.h.set(state.h);
      bind(state, 0);
    },
    bind,
    setStress(taux, tauy) {
      const { maskU, maskV } = grid;
      const { accelX, accelY } = f;
      for (let k = 0; k < taux.length; k++) {
        accelX[k] = maskU[k] * (taux[k] / rhoH);
        accelY[k] = maskV[k] * (tauy[k] / rhoH);
      }
    },
    stepParams(_state, friction, viscosity, out) {
      out[0] = friction;
      out[1] = viscosity;
    },
    stepped() {},
    spongeTaken: () => 0,
  };
}
