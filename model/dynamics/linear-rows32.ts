// The linear step's rows in float32 (TypeScript): the arithmetic of the row functions of linear.ts,
// operation for operation, with every operation rounded to float32 (Math.fround), as the float32
// build of the WebAssembly rows (wasm/rows.as.ts over real = f32) and a C float kernel compute it.
// JavaScript computes in double, and a sum or product of two float32 values rounded once to float32
// is the float32 operation's result (double has more than twice float32's precision), so these
// rows give the bits of the f32x4 lanes; test/kernels/linear-rows.test.ts holds them to each other.
// The fused sweep is the u, v and h rows in turn (it gives their bits by construction). This is the
// fallback where WebAssembly does not compile, not a fast path: each fround costs a conversion.

import type { CoastTerms } from './coefficients.ts';
import type { RowCoefficients, RowGrid } from './linear.ts';
import type { LinearRows, StepFields } from './linear-rows.ts';

const f = Math.fround;

/** A linear step's row constants as float32 holds them (each rounded once; kept as doubles). */
export function roundRowCoefficients(c: RowCoefficients): RowCoefficients {
  const t = (a: Float64Array) => a.map(f);
  const coast = (x: CoastTerms): CoastTerms => ({ rowStart: x.rowStart, index: x.index, coef: t(x.coef) });
  return {
    dt: f(c.dt),
    gpdx: f(c.gpdx),
    gpdy: f(c.gpdy),
    idx2: f(c.idx2),
    idy2: f(c.idy2),
    dtHdx: f(c.dtHdx),
    dtHdy: f(c.dtHdy),
    coriolisSouth: t(c.coriolisSouth),
    coriolisNorth: t(c.coriolisNorth),
    fV: t(c.fV),
    spongeH: t(c.spongeH),
    spongeV: t(c.spongeV),
    coastU: coast(c.coastU),
    coastV: coast(c.coastV),
  };
}

interface RowSet {
  u: Float32Array;
  v: Float32Array;
  un: Float32Array;
  vn: Float32Array;
}

/** The float32 TypeScript rows over a set of float32 fields; `c` already rounded (roundRowCoefficients). */
export class TsRows32 implements LinearRows {
  readonly ny: number;
  private r = 0;
  private A = 0;
  private readonly sets: [RowSet, RowSet];

  constructor(
    private readonly g: RowGrid,
    private readonly c: RowCoefficients,
    private readonly fields: StepFields<Float32Array>,
  ) {
    this.ny = g.ny;
    this.sets = [0, 1].map((cur) => ({
      u: fields.u[cur],
      v: fields.v[cur],
      un: fields.u[1 - cur],
      vn: fields.v[1 - cur],
    })) as [RowSet, RowSet];
  }

  params(friction: number, viscosity: number): void {
    this.r = f(friction);
    this.A = f(viscosity);
  }

  u(cur: number, j: number): void {
    const { nx, W, maskU } = this.g;
    const { dt, gpdx, idx2, idy2 } = this.c;
    const { r, A } = this;
    const { u, v, un } = this.sets[cur];
    const h = this.fields.h;
    const ax = this.fields.accelX;
    const fS = this.c.coriolisSouth[j];
    const fN = this.c.coriolisNorth[j];
    const row = (j + 1) * W + 1;
    const end = row + nx;
    for (let k = row; k <= end; k++) {
      const fvbar = f(f(fS * f(v[k - 1] + v[k])) + f(fN * f(v[k - 1 + W] + v[k + W])));
      const uc = u[k];
      const twoU = f(2 * uc);
      const lap = f(f(f(f(u[k + 1] + u[k - 1]) - twoU) * idx2) + f(f(f(u[k + W] + u[k - W]) - twoU) * idy2));
      const tend = f(f(f(f(fvbar - f(gpdx * f(h[k] - h[k - 1]))) + ax[k]) - f(r * uc)) + f(A * lap));
      un[k] = maskU[k] * f(uc + f(dt * tend));
    }
    coastTerms32(this.c.coastU, j, f(A * dt), u, un);
  }

  v(cur: number, j: number): void {
    const { nx, W, maskV } = this.g;
    const { dt, gpdy, idx2, idy2 } = this.c;
    const { r, A } = this;
    const { v, un, vn } = this.sets[cur];
    const h = this.fields.h;
    const ay = this.fields.accelY;
    const nf = -this.c.fV[j];
    const row = (j + 1) * W + 1;
    const end = row + nx;
    for (let k = row; k < end; k++) {
      const ubar = f(0.25 * f(f(f(un[k - W] + un[k + 1 - W]) + un[k]) + un[k + 1]));
      const vc = v[k];
      const twoV = f(2 * vc);
      const lap = f(f(f(f(v[k + 1] + v[k - 1]) - twoV) * idx2) + f(f(f(v[k + W] + v[k - W]) - twoV) * idy2));
      const tend = f(f(f(f(f(nf * ubar) - f(gpdy * f(h[k] - h[k - W]))) + ay[k]) - f(r * vc)) + f(A * lap));
      vn[k] = maskV[k] * f(vc + f(dt * tend));
    }
    coastTerms32(this.c.coastV, j, f(A * dt), v, vn);
  }

  fused(cur: number, j: number): void {
    this.u(cur, j);
    this.v(cur, j);
    this.h(cur, j - 1);
  }

  h(cur: number, j: number): void {
    const { nx, W } = this.g;
    const { dtHdx, dtHdy } = this.c;
    const { un, vn } = this.sets[cur];
    const h = this.fields.h;
    const s = this.c.spongeH[j];
    const row = (j + 1) * W + 1;
    const end = row + nx;
    for (let k = row; k < end; k++) {
      const div = f(f(dtHdx * f(un[k + 1] - un[k])) + f(dtHdy * f(vn[k + W] - vn[k])));
      h[k] = f(h[k] - div) * s;
    }
  }

  sponge(cur: number, j: number): void {
    const s = this.c.spongeV[j];
    if (s === 1) return;
    const vn = this.sets[cur].vn;
    const row = (j + 1) * this.g.W + 1;
    const end = row + this.g.nx;
    for (let k = row; k < end; k++) vn[k] = vn[k] * s;
  }
}

function coastTerms32(t: CoastTerms, j: number, Adt: number, x: Float32Array, xn: Float32Array): void {
  for (let n = t.rowStart[j]; n < t.rowStart[j + 1]; n++) {
    const k = t.index[n];
    xn[k] = xn[k] + f(f(Adt * t.coef[n]) * x[k]);
  }
}
