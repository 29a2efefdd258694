// Basin integrals and extremes, computed at every output step: volume, energy, thinnest layer,
// fastest flow, and the Courant number of the scheme.

import { waveSpeed } from '../theory.ts';
import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { FieldArray, State } from '../state.ts';

export interface Integrals {
  /** Model time, days. */
  day: number;
  /** Total upper-layer volume sum((H + h') dA) over ocean cells, m3. */
  volume: number;
  /** Volume of the anomaly, sum(h' dA), m3 (exactly zero change in a closed basin). */
  volumeAnomaly: number;
  /**
   * Volume the sponge bands added (+) or took out (-) since the start of the experiment (restarts carry it), m3. Continuity in
   * flux form changes the volume of a closed basin by nothing, so in the linear mode this is the
   * whole change of volume; the nonlinear step measures its sponge directly.
   */
  spongeVolume: number;
  /** Volume entrainment added since the start of the experiment, m3 (the rest of the change; 0 in the linear mode). */
  entrainedVolume: number;
  /** Kinetic energy 1/2 rho0 sum(h* |u|^2 dA), J (h* = H linear, h nonlinear). */
  kinetic: number;
  /** Available potential energy 1/2 rho0 g' sum(h'^2 dA), J. */
  potential: number;
  energy: number;
  /** Thinnest upper layer H + h', m. */
  minThickness: number;
  /** Largest |u| at cell centres, m s-1. */
  maxSpeed: number;
  /**
   * Courant number of the scheme that runs, dt sqrt(1/dx^2 + 1/dy^2) times the fastest signal:
   * sqrt(g' H) in the linear mode (its equations carry no advection and waves see H), and
   * sqrt(g' h_max) + |u|max in the nonlinear mode.
   */
  courant: number;
}

/** Neumaier-compensated sum, so that the volume drift measured is the model's, not the sum's. */
class Sum {
  private s = 0;
  private c = 0;
  add(x: number): void {
    const t = this.s + x;
    this.c += Math.abs(this.s) >= Math.abs(x) ? this.s - t + x : x - t + this.s;
    this.s = t;
  }
  get value(): number {
    return this.s + this.c;
  }
}

/** What the volume budget needs beyond the state: where the run started, and what the sponge took. */
export interface VolumeBudget {
  /** sum(h') over ocean cells at the run's start, m. */
  anomalyAtStart: number;
  /** Nonlinear mode: sum of h' the sponges added (+) or took (-) since the start, m; null in the linear mode. */
  spongeMeasured: number | null;
}

/** sum(h') over the ocean cells, compensated. */
export function anomalySum(grid: Grid, h: FieldArray): number {
  const sum = new Sum();
  const { nx, ny, W, ocean } = grid;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = (j + 1) * W + i + 1;
      if (ocean[k]) sum.add(h[k]);
    }
  }
  return sum.value;
}

export function integrals(
  grid: Grid,
  physics: PhysicsConfig,
  state: State,
  dt: number,
  budget: VolumeBudget = { anomalyAtStart: 0, spongeMeasured: null },
): Integrals {
  const { nx, ny, W, ocean, maskU, maskV, dx, dy } = grid;
  const { u, v, h } = state;
  const H = physics.layerThickness;
  const nonlinear = physics.mode === 'nonlinear';
  const dA = dx * dy;
  const anomaly = new Sum();
  const pe = new Sum();
  const ke = new Sum();
  let minThick = Infinity;
  let maxThick = -Infinity;
  let maxSpeed2 = 0;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = (j + 1) * W + i + 1;
      if (!ocean[k]) continue;
      anomaly.add(h[k]);
      pe.add(h[k] * h[k]);
      const thick = H + h[k];
      if (thick < minThick) minThick = thick;
      if (thick > maxThick) maxThick = thick;
      const uc = 0.5 * (u[k] + u[k + 1]);
      const vc = 0.5 * (v[k] + v[k + W]);
      const s2 = uc * uc + vc * vc;
      if (s2 > maxSpeed2) maxSpeed2 = s2;
    }
  }
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i <= nx; i++) {
      const k = (j + 1) * W + i + 1;
      if (!maskU[k]) continue;
      const hs = nonlinear ? H + 0.5 * (h[k] + h[k - 1]) : H;
      ke.add(hs * u[k] * u[k]);
    }
  }
  for (let j = 0; j <= ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = (j + 1) * W + i + 1;
      if (!maskV[k]) continue;
      const hs = nonlinear ? H + 0.5 * (h[k] + h[k - W]) : H;
      ke.add(hs * v[k] * v[k]);
    }
  }
  const rho0 = physics.density;
  const kinetic = 0.5 * rho0 * ke.value * dA;
  const potential = 0.5 * rho0 * physics.reducedGravity * pe.value * dA;
  const maxSpeed = Math.sqrt(maxSpeed2);
  const signal = nonlinear
    ? waveSpeed(physics.reducedGravity, Math.max(maxThick, 0)) + maxSpeed
    : waveSpeed(physics.reducedGravity, H);
  const change = (anomaly.value - budget.anomalyAtStart) * dA;
  const spongeVolume = budget.spongeMeasured === null ? change : budget.spongeMeasured * dA;
  return {
    day: state.time / 86400,
    volume: H * grid.oceanCells * dA + anomaly.value * dA,
    volumeAnomaly: anomaly.value * dA,
    spongeVolume,
    entrainedVolume: budget.spongeMeasured === null ? 0 : change - spongeVolume,
    kinetic,
    potential,
    energy: kinetic + potential,
    minThickness: minThick,
    maxSpeed,
    courant: signal * dt * Math.sqrt(1 / (dx * dx) + 1 / (dy * dy)),
  };
}
