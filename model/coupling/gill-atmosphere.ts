// Gill's (1980) atmosphere: the damped, steady response of a shallow-water layer on the equatorial
// beta plane to a heating Q, in the long-wave form (the meridional momentum balance geostrophic).
// In units of L_a = sqrt(c_a / beta) for lengths and c_a for speeds (Matsuno's), with eps the
// damping of momentum and of the mass field alike:
//
//   eps u - y v = -p_x,   y u = -p_y,   eps p + u_x + v_y = -Q
//
// With q = p + u, r = p - u and the Hermite functions phi_n(y) = H_n(y) exp(-y^2/2)
// ((d/dy + y) phi_n = 2n phi_{n-1}, (d/dy - y) phi_n = -phi_{n+1}), a heating Q = sum Q_n(x) phi_n(y)
// gives, mode by mode (derived from the equations above; for Q = Q_0 phi_0 it is Gill's symmetric case):
//
//   Kelvin:      q_0' + eps q_0 = -Q_0                                   (integrated eastward, 0 in the west)
//   Rossby m>=1: r_{m-1}' - (2m+1) eps r_{m-1} = (m+1)(Q_{m-1} + 2m Q_{m+1})  (integrated westward, 0 in the east)
//                q_{m+1} = r_{m-1} / (2(m+1)),  v_m = eps r_{m-1} + Q_{m-1}/2 + (m+1) Q_{m+1}
//   mixed Rossby-gravity, long-wave: q_1 = 0, v_0 = Q_1
//
// so the Kelvin response decays eastward over c_a/eps and the n-th Rossby response westward over
// c_a/((2n+1) eps). The heating is projected onto phi_0 .. phi_{K-1} (K = heatingModes) on the
// model's rows; the response to that projection is exact in the long-wave limit, mode by mode.
// Along x the heating is constant over each cell and every mode is integrated exactly across it
// (exponential factors), so the answer is exact for the heating as the grid holds it.
// Outside the basin there is no heating: the edges let waves out and none in.

import type { Grid } from '../grid.ts';
import { ForcingError } from '../forcing/errors.ts';
import * as pm from '../portable-math.ts';

export interface AtmosphereParams {
  /** c_a, m s-1. */
  speed: number;
  /** eps, s-1. */
  damping: number;
  /** K, the Hermite functions the heating is projected onto (1..MAX_HEATING_MODES). */
  heatingModes: number;
  /** beta, m-1 s-1. */
  beta: number;
}

export const MAX_HEATING_MODES = 8;

/** The long-wave Gill atmosphere on the columns and rows of an ocean grid. Outputs in units of c_a (and c_a^2 for p). */
export class GillAtmosphere {
  /** L_a = sqrt(c_a / beta), m; the time unit 1 / sqrt(beta c_a), s; eps in those units. */
  readonly radius: number;
  readonly timeUnit: number;
  readonly eps: number;
  readonly modes: number;
  /** u, v and p of the last sample() (no allocation while a run couples). */
  readonly point = { u: 0, v: 0, p: 0 };
  /** Functions phi_0 .. phi_{K+1}, N = K + 2 of them, at centre rows and face rows: [j N + n]. */
  private readonly N: number;
  private readonly phiC: Float64Array;
  private readonly phiF: Float64Array;
  /** Projection weights dy / (sqrt(pi) 2^n n!) phi_n at centre rows: [n][j]. */
  private readonly project: Float64Array[];
  /** Q_n at centres [n][i] and at faces [n][i] (mean of the two cells, 0 beyond the basin), n up to K + 1. */
  private readonly qC: Float64Array[];
  private readonly qF: Float64Array[];
  /** Kelvin q_0 and Rossby r_{m-1} at centres and faces: [0] Kelvin, [m] Rossby m. */
  private readonly ampC: Float64Array[];
  private readonly ampF: Float64Array[];
  /** Coefficients of u, v, p on phi_0..phi_{K+1} per column of faces and of centres: [(3 i + c) N + n]. */
  private readonly coefF: Float64Array;
  private readonly coefC: Float64Array;
  /** Per mode: exp(-a dx), exp(-a dx/2) and the gains (1 - E)/a over a cell and a half cell. */
  private readonly decay: Array<{ E: number; Eh: number; g: number; gh: number }>;

  constructor(
    readonly grid: Grid,
    p: AtmosphereParams,
  ) {
    for (const [name, v] of [
      ['atmosphere.speed', p.speed],
      ['atmosphere damping', p.damping],
      ['beta of the beta plane (physics.coriolis.beta)', p.beta],
    ] as const) {
      if (!(v > 0 && Number.isFinite(v))) throw new ForcingError(`${name} must be a positive number (got ${v})`);
    }
    if (!(Number.isInteger(p.heatingModes) && p.heatingModes >= 1 && p.heatingModes <= MAX_HEATING_MODES)) {
      throw new ForcingError(
        `atmosphere.heatingModes must be a whole number from 1 to ${MAX_HEATING_MODES} (got ${p.heatingModes})`,
      );
    }
    this.radius = Math.sqrt(p.speed / p.beta);
    this.timeUnit = 1 / Math.sqrt(p.beta * p.speed);
    this.eps = p.damping * this.timeUnit;
    this.modes = p.heatingModes;
    this.N = this.modes + 2;
    const K = this.modes;
    const N = this.N;
    const { nx, ny } = grid;
    const L = this.radius;
    // Hermite functions by their recurrence H_{n+1} = 2 y H_n - 2 n H_{n-1}, times exp(-y^2/2).
    const hermite = (ys: Float64Array): Float64Array => {
      const out = new Float64Array(ys.length * N);
      for (let j = 0; j < ys.length; j++) {
        const y = ys[j] / L;
        const g = pm.exp(-0.5 * y * y);
        let hPrev = 1;
        let h = 2 * y;
        out[j * N] = g;
        out[j * N + 1] = h * g;
        for (let n = 1; n + 1 < N; n++) {
          const next = 2 * y * h - 2 * n * hPrev;
          hPrev = h;
          h = next;
          out[j * N + n + 1] = h * g;
        }
      }
      return out;
    };
    this.phiC = hermite(grid.yCentre);
    this.phiF = hermite(grid.yFace);
    const dyN = grid.dy / L;
    let norm = Math.sqrt(Math.PI);
    this.project = [];
    for (let n = 0; n < K; n++) {
      if (n > 0) norm *= 2 * n;
      const w = new Float64Array(ny);
      for (let j = 0; j < ny; j++) w[j] = (dyN / norm) * this.phiC[j * N + n];
      this.project.push(w);
    }
    this.qC = Array.from({ length: K + 2 }, () => new Float64Array(nx));
    this.qF = Array.from({ length: K + 2 }, () => new Float64Array(nx + 1));
    this.ampC = Array.from({ length: K + 1 }, () => new Float64Array(nx));
    this.ampF = Array.from({ length: K + 1 }, () => new Float64Array(nx + 1));
    this.coefF = new Float64Array((nx + 1) * 3 * N);
    this.coefC = new Float64Array(nx * 3 * N);
    const dxN = grid.dx / L;
    this.decay = [];
    for (let m = 0; m <= K; m++) {
      const a = m === 0 ? this.eps : (2 * m + 1) * this.eps;
      this.decay.push({
        E: pm.exp(-a * dxN),
        Eh: pm.exp(-0.5 * a * dxN),
        g: -pm.expm1(-a * dxN) / a,
        gh: -pm.expm1(-0.5 * a * dxN) / a,
      });
    }
  }

  /** The answer to a heating at cell centres (padded, nondimensional; land cells and the halo must be 0). */
  solve(heating: Float64Array): void {
    const { nx, ny, W } = this.grid;
    const K = this.modes;
    // Projection onto phi_0 .. phi_{K-1}, column by column.
    for (let n = 0; n < K; n++) {
      const w = this.project[n];
      const q = this.qC[n];
      for (let i = 0; i < nx; i++) {
        let s = 0;
        for (let j = 0; j < ny; j++) s += w[j] * heating[(j + 1) * W + i + 1];
        q[i] = s;
      }
      const f = this.qF[n];
      f[0] = 0.5 * q[0];
      for (let i = 1; i < nx; i++) f[i] = 0.5 * (q[i - 1] + q[i]);
      f[nx] = 0.5 * q[nx - 1];
    }
    // Kelvin, eastward from 0 at the western edge.
    {
      const { E, Eh, g, gh } = this.decay[0];
      const c = this.ampC[0];
      const f = this.ampF[0];
      const Q = this.qC[0];
      let y = 0;
      f[0] = 0;
      for (let i = 0; i < nx; i++) {
        c[i] = y * Eh - Q[i] * gh;
        y = y * E - Q[i] * g;
        f[i + 1] = y;
      }
    }
    // Rossby m = 1..K, westward from 0 at the eastern edge.
    for (let m = 1; m <= K; m++) {
      const { E, Eh, g, gh } = this.decay[m];
      const c = this.ampC[m];
      const f = this.ampF[m];
      const Qa = this.qC[m - 1];
      const Qb = this.qC[m + 1];
      let y = 0;
      f[nx] = 0;
      for (let i = nx - 1; i >= 0; i--) {
        const F = (m + 1) * (Qa[i] + 2 * m * Qb[i]);
        c[i] = y * Eh - F * gh;
        y = y * E - F * g;
        f[i] = y;
      }
    }
    for (let i = 0; i <= nx; i++) this.coefficients(this.ampF, this.qF, i, this.coefF);
    for (let i = 0; i < nx; i++) this.coefficients(this.ampC, this.qC, i, this.coefC);
  }

  /** The coefficients of u, v, p on the Hermite functions at one column (amplitudes amp, heating Q). */
  private coefficients(amp: Float64Array[], Q: Float64Array[], i: number, out: Float64Array): void {
    const K = this.modes;
    const N = this.N;
    const u = 3 * i * N;
    const v = u + N;
    const p = v + N;
    out.fill(0, u, u + 3 * N);
    // u = (q - r)/2 and p = (q + r)/2 with q = q_0 phi_0 + sum q_{m+1} phi_{m+1}, r = sum r_{m-1} phi_{m-1}.
    out[u] = 0.5 * amp[0][i];
    out[p] = 0.5 * amp[0][i];
    out[v] = Q[1][i];
    for (let m = 1; m <= K; m++) {
      const a = amp[m][i];
      const q = a / (2 * (m + 1));
      out[u + m + 1] += 0.5 * q;
      out[p + m + 1] += 0.5 * q;
      out[u + m - 1] -= 0.5 * a;
      out[p + m - 1] += 0.5 * a;
      out[v + m] += this.eps * a + 0.5 * Q[m - 1][i] + (m + 1) * Q[m + 1][i];
    }
  }

  private sample(coef: Float64Array, phi: Float64Array, i: number, j: number): void {
    const N = this.N;
    const c = 3 * i * N;
    const r = j * N;
    let u = 0;
    let v = 0;
    let p = 0;
    for (let n = 0; n < N; n++) {
      const f = phi[r + n];
      u += coef[c + n] * f;
      v += coef[c + N + n] * f;
      p += coef[c + 2 * N + n] * f;
    }
    this.point.u = u;
    this.point.v = v;
    this.point.p = p;
  }

  /** The answer on the u face west of cell (i, j) (i = 0..nx), into point. */
  atUFace(i: number, j: number): void {
    this.sample(this.coefF, this.phiC, i, j);
  }

  /** The answer on the v face south of cell (i, j) (j = 0..ny), into point. */
  atVFace(i: number, j: number): void {
    this.sample(this.coefC, this.phiF, i, j);
  }

  /** The answer at the centre of cell (i, j), into point. */
  atCentre(i: number, j: number): void {
    this.sample(this.coefC, this.phiC, i, j);
  }

  /**
   * u and v on a list of faces: u faces (column i of faces, centre row j) or v faces (centre column
   * i, face row j), into outU and outV (either may be null). One loop: it runs at every coupling.
   */
  sampleFaces(
    kind: 'u' | 'v',
    iList: Int32Array,
    jList: Int32Array,
    n: number,
    outU: Float64Array | null,
    outV: Float64Array | null,
  ): void {
    const N = this.N;
    const coef = kind === 'u' ? this.coefF : this.coefC;
    const phi = kind === 'u' ? this.phiC : this.phiF;
    for (let f = 0; f < n; f++) {
      const c = 3 * iList[f] * N;
      const r = jList[f] * N;
      let u = 0;
      let v = 0;
      for (let m = 0; m < N; m++) {
        const y = phi[r + m];
        u += coef[c + m] * y;
        v += coef[c + N + m] * y;
      }
      if (outU) outU[f] = u;
      if (outV) outV[f] = v;
    }
  }

  /** u, v and p at every cell centre, padded (land included: the atmosphere knows no coasts). */
  centreFields(): { u: Float64Array; v: Float64Array; p: Float64Array } {
    const g = this.grid;
    const out = { u: g.field(), v: g.field(), p: g.field() };
    for (let j = 0; j < g.ny; j++) {
      for (let i = 0; i < g.nx; i++) {
        this.atCentre(i, j);
        const k = g.idx(i, j);
        out.u[k] = this.point.u;
        out.v[k] = this.point.v;
        out.p[k] = this.point.p;
      }
    }
    return out;
  }
}
