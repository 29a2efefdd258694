// The nonlinear step's rows in float32 (TypeScript): the arithmetic of TsNonlinearRows
// (nonlinear-rows.ts), operation for operation, every operation rounded to float32 (Math.fround),
// as the float32 build of wasm/nonlinear.as.ts computes it in f32x4 lanes (see linear-rows32.ts for
// why one rounding of a double result is the float32 operation). The sums of the sponge rows stay
// in double (they are the budget's). The fallback where WebAssembly does not compile.

import type { NonlinearFields, NonlinearRowCoefficients, NonlinearRowGrid, NonlinearRows } from './nonlinear-rows.ts';
import { ringSlot } from './nonlinear-rows.ts';

const f = Math.fround;

/** A nonlinear step's constants as float32 holds them (each rounded once; kept as doubles). */
export function roundNonlinearCoefficients(c: NonlinearRowCoefficients): NonlinearRowCoefficients {
  const t = (a: Float64Array) => a.map(f);
  return {
    dt: f(c.dt),
    H: f(c.H),
    gp: f(c.gp),
    rho0: f(c.rho0),
    hMin: f(c.hMin),
    entrainRate: f(c.entrainRate),
    freeSlip: c.freeSlip,
    idx: f(c.idx),
    idy: f(c.idy),
    idx2: f(c.idx2),
    idy2: f(c.idy2),
    fCorner: t(c.fCorner),
    spongeH: t(c.spongeH),
    spongeV: t(c.spongeV),
    coastU: t(c.coastU),
    coastV: t(c.coastV),
  };
}

/** The float32 TypeScript rows; `c` already rounded (roundNonlinearCoefficients). */
export class TsNonlinearRows32 implements NonlinearRows {
  readonly ny: number;
  private r = 0;
  private A = 0;
  private a0 = 1;
  private a1 = 0;
  private a2 = 0;
  private readonly U: Float32Array;
  private readonly V: Float32Array;
  private readonly q: Float32Array;
  private readonly B: Float32Array;

  constructor(
    private readonly g: NonlinearRowGrid,
    private readonly c: NonlinearRowCoefficients,
    private readonly fl: NonlinearFields<Float32Array>,
  ) {
    this.ny = g.ny;
    const ring = () => new Float32Array(3 * g.W);
    this.U = ring();
    this.V = ring();
    this.q = ring();
    this.B = ring();
  }

  params(friction: number, viscosity: number, a0: number, a1: number, a2: number): void {
    this.r = f(friction);
    this.A = f(viscosity);
    this.a0 = f(a0);
    this.a1 = f(a1);
    this.a2 = f(a2);
  }

  pre(cur: number, j: number): void {
    const { nx, ny, W, maskU, maskV, oceanF: ocean } = this.g;
    const { H, gp, idx, idy, freeSlip } = this.c;
    const u = this.fl.u[cur];
    const v = this.fl.v[cur];
    const h = this.fl.h[cur];
    const row = (j + 1) * W;
    const o = ringSlot(j) * W - row;
    const { U, V, q, B } = this;
    const twoH = f(2 * H);
    if (j < ny) {
      for (let k = row + 1; k <= row + nx + 1; k++)
        U[o + k] = f(f(maskU[k] * 0.5) * f(f(twoH + h[k - 1]) + h[k])) * u[k];
      for (let k = row + 1; k <= row + nx; k++) {
        if (!ocean[k]) {
          B[o + k] = 0;
          continue;
        }
        const ke = f(0.25 * f(f(f(f(u[k] * u[k]) + f(u[k + 1] * u[k + 1])) + f(v[k] * v[k])) + f(v[k + W] * v[k + W])));
        B[o + k] = f(gp * h[k]) + ke;
      }
    }
    for (let k = row + 1; k <= row + nx; k++) V[o + k] = f(f(maskV[k] * 0.5) * f(f(twoH + h[k - W]) + h[k])) * v[k];
    const fc = this.c.fCorner[j];
    for (let k = row + 1; k <= row + nx + 1; k++) {
      const wet = ocean[k] + ocean[k - 1] + ocean[k - W] + ocean[k - W - 1];
      if (wet === 0) {
        q[o + k] = 0;
        continue;
      }
      const zeta = freeSlip && wet < 4 ? 0 : f(f(f(v[k] - v[k - 1]) * idx) - f(f(u[k] - u[k - W]) * idy));
      const hsum = f(
        f(f(f(ocean[k] * h[k]) + f(ocean[k - 1] * h[k - 1])) + f(ocean[k - W] * h[k - W])) +
          f(ocean[k - W - 1] * h[k - W - 1]),
      );
      const hq = f(f(hsum / wet) + H);
      q[o + k] = f(fc + zeta) / Math.max(hq, 1);
    }
  }

  out(cur: number, j: number): void {
    const { nx, ny, W, maskU, maskV, oceanF: ocean } = this.g;
    const c = this.c;
    const { H, rho0, idx, idy, idx2, idy2, dt, hMin, entrainRate } = c;
    const { r, A, a0, a1, a2, U, V, q, B } = this;
    const fl = this.fl;
    const u = fl.u[cur];
    const v = fl.v[cur];
    const h = fl.h[cur];
    const row = (j + 1) * W;
    const oS = ringSlot(j - 1) * W - row;
    const oC = ringSlot(j) * W - row;
    const oN = ringSlot(j + 1) * W - row;
    if (j < ny) {
      const un = fl.u[1 - cur];
      const t1 = fl.du[cur];
      const t2 = fl.du[1 - cur];
      const taux = fl.taux;
      const coast = c.coastU;
      for (let k = row + 1; k <= row + nx + 1; k++) {
        let du = 0;
        const uc = u[k];
        if (maskU[k]) {
          const pv = f(
            0.25 * f(f(q[oN + k] * f(V[oN + k - 1] + V[oN + k])) + f(q[oC + k] * f(V[oC + k - 1] + V[oC + k]))),
          );
          const hu = Math.max(f(H + f(0.5 * f(h[k - 1] + h[k]))), 1);
          const twoU = f(2 * uc);
          const lap = f(
            f(f(f(f(u[k + 1] + u[k - 1]) - twoU) * idx2) + f(f(f(u[k + W] + u[k - W]) - twoU) * idy2)) +
              f(coast[k] * uc),
          );
          du = f(
            f(f(f(pv - f(f(B[oC + k] - B[oC + k - 1]) * idx)) + f(taux[k] / f(rho0 * hu))) - f(r * uc)) + f(A * lap),
          );
        }
        un[k] = uc + f(dt * f(f(f(a0 * du) + f(a1 * t1[k])) + f(a2 * t2[k])));
        t2[k] = du;
      }
    }
    {
      const vn = fl.v[1 - cur];
      const t1 = fl.dv[cur];
      const t2 = fl.dv[1 - cur];
      const tauy = fl.tauy;
      const coast = c.coastV;
      for (let k = row + 1; k <= row + nx; k++) {
        let dv = 0;
        const vc = v[k];
        if (maskV[k]) {
          const pv = f(
            0.25 * f(f(q[oC + k + 1] * f(U[oS + k + 1] + U[oC + k + 1])) + f(q[oC + k] * f(U[oS + k] + U[oC + k]))),
          );
          const hv = Math.max(f(H + f(0.5 * f(h[k - W] + h[k]))), 1);
          const twoV = f(2 * vc);
          const lap = f(
            f(f(f(f(v[k + 1] + v[k - 1]) - twoV) * idx2) + f(f(f(v[k + W] + v[k - W]) - twoV) * idy2)) +
              f(coast[k] * vc),
          );
          dv = f(f(f(f(-pv - f(f(B[oC + k] - B[oS + k]) * idy)) + f(tauy[k] / f(rho0 * hv))) - f(r * vc)) + f(A * lap));
        }
        vn[k] = vc + f(dt * f(f(f(a0 * dv) + f(a1 * t1[k])) + f(a2 * t2[k])));
        t2[k] = dv;
      }
      const s = c.spongeV[j];
      if (s !== 1) for (let k = row + 1; k <= row + nx; k++) vn[k] = vn[k] * s;
    }
    if (j < ny) {
      const hn = fl.h[1 - cur];
      const t1 = fl.dh[cur];
      const t2 = fl.dh[1 - cur];
      for (let k = row + 1; k <= row + nx; k++) {
        let dh = 0;
        const hc = h[k];
        if (ocean[k]) {
          const thick = f(H + hc);
          const entrain = thick < hMin ? f(f(hMin - thick) * entrainRate) : 0;
          dh = f(-f(f(f(U[oC + k + 1] - U[oC + k]) * idx) + f(f(V[oN + k] - V[oC + k]) * idy)) + entrain);
        }
        hn[k] = hc + f(dt * f(f(f(a0 * dh) + f(a1 * t1[k])) + f(a2 * t2[k])));
        t2[k] = dh;
      }
      const s = c.spongeH[j];
      if (s !== 1) {
        let sum = 0;
        for (let k = row + 1; k <= row + nx; k++) {
          sum += hn[k];
          hn[k] = hn[k] * s;
        }
        fl.spongeSums[1 - cur][j] = sum;
      }
    }
  }
}
