// The sea-surface temperature anomaly T' of the answering wind, from the ocean state: the
// thermocline feedback (the water that mean upwelling brings up is warmer where the thermocline is
// deeper), Newtonian damping, and optionally zonal advection of a mean SST gradient by the surface
// current. At cell centres, in the grid's padded layout:
//
//   dT/dt = w S (T_sub(h') - T) - eps_T T - S G u_surf
//
// with S(lon, lat) in 0..1 the region of mean upwelling and mean gradient (a cold tongue), w the
// upwelling rate there, G = dTbar/dx and T_sub a bounded (tanh) function of h' in the style of
// Zebiak & Cane (1987) and Battisti (1988) (docs/physics.md gives the form and our numbers).
// One update covers a whole coupling interval dT = N dt, semi-implicit in T:
//
//   T_new = (T + dT (w S T_sub - S G u_surf)) / (1 + dT (w S + eps_T))
//
// which never overshoots the relaxation, whatever the interval.

import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { SstSpec } from '../forcing/spec.ts';
import { ForcingError } from '../forcing/errors.ts';
import { compileShape } from '../forcing/shapes.ts';
import { surfaceShear, type SurfaceShear } from '../surface-layer.ts';
import * as pm from '../portable-math.ts';

const DAY = 86400;

/** Region values |S| below this count as 0 (outside the region). */
export const REGION_FLOOR = 1e-6;

/** The subsurface temperature anomaly the upwelling brings up, K, for a thermocline anomaly h' (m, positive down). */
export function subsurfaceTemperature(h: number, s: SstSpec['subsurface']): number {
  return h >= 0 ? s.warm * pm.tanh(h / s.warmDepth) : s.cold * pm.tanh(h / s.coldDepth);
}

function positive(name: string, v: unknown): number {
  if (!(typeof v === 'number' && v > 0 && Number.isFinite(v)))
    throw new ForcingError(`${name} must be a positive number (got ${String(v)})`);
  return v;
}

function finite(name: string, v: unknown): number {
  if (!(typeof v === 'number' && Number.isFinite(v)))
    throw new ForcingError(`${name} must be a finite number (got ${String(v)})`);
  return v;
}

/** What an SST update reads besides the fields: the surface layer's balance, and the stress in force. */
export interface SstContext {
  physics: PhysicsConfig;
  /** f at cell-centre rows, s-1. */
  fCentre: Float64Array;
}

export class SstAnomaly {
  /** S at cell centres (padded), 0 on land and in the halo. */
  readonly region: Float64Array;
  /** w, s-1, and eps_T, s-1. */
  readonly upwelling: number;
  readonly damping: number;
  /** G, K m-1. */
  readonly gradient: number;
  readonly spec: SstSpec;
  private readonly shear: SurfaceShear = { us: 0, vs: 0 };

  constructor(
    readonly grid: Grid,
    spec: SstSpec,
  ) {
    this.spec = spec;
    const shape = compileShape(spec.region);
    if (shape.timeDependent)
      throw new ForcingError(`sst.region: ${shape.label} reads t; the region of upwelling must not change in time`);
    this.upwelling = 1 / (positive('sst.upwellingDays', spec.upwellingDays) * DAY);
    this.damping = 1 / (positive('sst.dampingDays', spec.dampingDays) * DAY);
    this.gradient = finite('sst.meanGradient', spec.meanGradient) / 1e6;
    const sub = spec.subsurface;
    for (const k of ['warm', 'cold'] as const) {
      const v = finite(`sst.subsurface.${k}`, sub?.[k]);
      if (v < 0) throw new ForcingError(`sst.subsurface.${k} must be >= 0 (got ${v})`);
    }
    positive('sst.subsurface.warmDepth', sub.warmDepth);
    positive('sst.subsurface.coldDepth', sub.coldDepth);
    finite('sst.initial', spec.initial);
    this.region = grid.field();
    const { nx, ny, W, ocean } = grid;
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const k = (j + 1) * W + i + 1;
        if (!ocean[k]) continue;
        const s = shape.at(grid.lonCentre[i], grid.latCentre[j], 0);
        if (!Number.isFinite(s))
          throw new ForcingError(
            `sst.region: ${shape.label} gives ${s} at lon ${grid.lonCentre[i]}, lat ${grid.latCentre[j]}`,
          );
        // Far tails of a patch count as outside: the update there is damping alone, and cheap.
        this.region[k] = Math.abs(s) < REGION_FLOOR ? 0 : s;
      }
    }
    if (this.region.every((s) => s === 0)) {
      throw new ForcingError(
        `sst.region: ${shape.label} is 0 on every ocean cell, so the SST would never feel the thermocline; put the region over the ocean`,
      );
    }
  }

  /** The SST of a fresh run: initial x S. */
  fillInitial(sst: Float64Array): void {
    const a = this.spec.initial;
    sst.fill(0);
    for (let k = 0; k < sst.length; k++) if (this.region[k] !== 0) sst[k] = a * this.region[k];
  }

  /**
   * Advance T' (padded, in place) over `seconds` with the thermocline h' and layer-mean u of the
   * state and the stress in force (for the surface current, only when there is a mean gradient).
   */
  step(
    sst: Float64Array,
    h: ArrayLike<number>,
    u: ArrayLike<number>,
    taux: Float64Array,
    tauy: Float64Array,
    seconds: number,
    ctx: SstContext,
  ): void {
    const { nx, ny, W, ocean } = this.grid;
    const w = this.upwelling;
    const eps = this.damping;
    const G = this.gradient;
    const sub = this.spec.subsurface;
    const p = ctx.physics;
    const H = p.layerThickness;
    const H1 = p.surfaceLayer.depth;
    const toSurface = (H - H1) / H;
    for (let j = 0; j < ny; j++) {
      const f = ctx.fCentre[j];
      for (let i = 0; i < nx; i++) {
        const k = (j + 1) * W + i + 1;
        if (!ocean[k]) continue;
        const S = this.region[k];
        let source = 0;
        if (S !== 0) {
          source = w * S * subsurfaceTemperature(h[k], sub);
          if (G !== 0) {
            // The surface current at the centre: layer mean plus the surface layer's share of the shear.
            const { us } = surfaceShear(
              0.5 * (taux[k] + taux[k + 1]),
              0.5 * (tauy[k] + tauy[k + W]),
              f,
              p.density,
              H1,
              p.surfaceLayer.damping,
              this.shear,
            );
            const uSurf = 0.5 * (u[k] + u[k + 1]) + toSurface * us;
            source -= S * G * uSurf;
          }
        }
        sst[k] = (sst[k] + seconds * source) / (1 + seconds * (w * S + eps));
      }
    }
  }
}
