// Output fields at cell centres: what files, frames and probes carry. Face values are averaged to
// the centre; land cells are NaN (written as the fill value in files, drawn neutral in the viewer).

import { surfaceShear, type SurfaceShear } from '../surface-layer.ts';
import type { PhysicsConfig } from '../config.ts';
import type { Grid } from '../grid.ts';
import type { State } from '../state.ts';

export const FIELD_NAMES = [
  'h_anom',
  'ssh',
  'u',
  'v',
  'u_surf',
  'v_surf',
  'u_below',
  'v_below',
  'taux',
  'tauy',
  'sst_anom',
  'u_atm',
  'v_atm',
] as const;
export type FieldName = (typeof FIELD_NAMES)[number];

export interface FieldInfo {
  units: string;
  longName: string;
  /** CF standard name where CF has one. */
  standardName?: string;
}

export const FIELD_INFO: Record<FieldName, FieldInfo> = {
  h_anom: { units: 'm', longName: 'thermocline depth anomaly (upper-layer thickness anomaly, positive down)' },
  ssh: {
    units: 'm',
    longName: "sea surface height from the thermocline, (g'/g) h'",
    standardName: 'sea_surface_height_above_geoid',
  },
  u: { units: 'm s-1', longName: 'layer-mean eastward velocity', standardName: 'eastward_sea_water_velocity' },
  v: { units: 'm s-1', longName: 'layer-mean northward velocity', standardName: 'northward_sea_water_velocity' },
  u_surf: {
    units: 'm s-1',
    longName: 'eastward velocity of the surface layer',
    standardName: 'surface_eastward_sea_water_velocity',
  },
  v_surf: {
    units: 'm s-1',
    longName: 'northward velocity of the surface layer',
    standardName: 'surface_northward_sea_water_velocity',
  },
  u_below: { units: 'm s-1', longName: 'eastward velocity beneath the surface layer' },
  v_below: { units: 'm s-1', longName: 'northward velocity beneath the surface layer' },
  taux: { units: 'N m-2', longName: 'eastward wind stress', standardName: 'surface_downward_eastward_stress' },
  tauy: { units: 'N m-2', longName: 'northward wind stress', standardName: 'surface_downward_northward_stress' },
  sst_anom: { units: 'K', longName: 'sea surface temperature anomaly of the answering wind (thermocline feedback)' },
  u_atm: { units: 'm s-1', longName: 'eastward surface wind of the answering atmosphere (Gill 1980)' },
  v_atm: { units: 'm s-1', longName: 'northward surface wind of the answering atmosphere (Gill 1980)' },
};

/** The fields only a run with an answering wind part has. */
export const COUPLED_FIELDS: readonly FieldName[] = ['sst_anom', 'u_atm', 'v_atm'];

export interface FieldContext {
  grid: Grid;
  physics: PhysicsConfig;
  state: State;
  /** Current stress on u and v faces, N m-2. */
  taux: Float64Array;
  tauy: Float64Array;
  /** f at cell-centre rows. */
  fCentre: Float64Array;
  /** The answering wind at cell centres (padded), m s-1; null or absent without one. */
  atmosphere?: { u: Float64Array; v: Float64Array } | null;
}

/**
 * Fill `out` (nx * ny values, row-major from the south-west corner, as NetCDF's (lat, lon)) with
 * one field at cell centres. `out` may also hold just the rows asked for, offset by rows.from.
 */
export function centredField(
  name: FieldName,
  ctx: FieldContext,
  out: Float32Array | Float64Array,
  rows: { from: number; to: number } = { from: 0, to: ctx.grid.ny },
): void {
  const { grid, physics, state, taux, tauy, fCentre } = ctx;
  const { nx, W, ocean } = grid;
  const { u, v, h } = state;
  const H = physics.layerThickness;
  const H1 = physics.surfaceLayer.depth;
  const rs = physics.surfaceLayer.damping;
  const rho0 = physics.density;
  const sshFactor = physics.reducedGravity / physics.gravity;
  const shear: SurfaceShear = { us: 0, vs: 0 };
  const rowOffset = out.length >= ctx.grid.nx * ctx.grid.ny ? 0 : rows.from;
  // Only rows from..to-1 are written (a Hovmoller section needs one row, not the whole field).
  for (let j = rows.from; j < rows.to; j++) {
    const f = fCentre[j];
    for (let i = 0; i < nx; i++) {
      const k = (j + 1) * W + i + 1;
      const o = (j - rowOffset) * nx + i;
      if (!ocean[k]) {
        out[o] = NaN;
        continue;
      }
      let value: number;
      switch (name) {
        case 'h_anom':
          value = h[k];
          break;
        case 'ssh':
          value = sshFactor * h[k];
          break;
        case 'u':
          value = 0.5 * (u[k] + u[k + 1]);
          break;
        case 'v':
          value = 0.5 * (v[k] + v[k + W]);
          break;
        case 'taux':
          value = 0.5 * (taux[k] + taux[k + 1]);
          break;
        case 'tauy':
          value = 0.5 * (tauy[k] + tauy[k + W]);
          break;
        // A run without an answering wind has none of these (the validator refuses asking for them).
        case 'sst_anom':
          value = state.sst ? state.sst[k] : 0;
          break;
        case 'u_atm':
          value = ctx.atmosphere ? ctx.atmosphere.u[k] : 0;
          break;
        case 'v_atm':
          value = ctx.atmosphere ? ctx.atmosphere.v[k] : 0;
          break;
        default: {
          const { us, vs } = surfaceShear(
            0.5 * (taux[k] + taux[k + 1]),
            0.5 * (tauy[k] + tauy[k + W]),
            f,
            rho0,
            H1,
            rs,
            shear,
          );
          const um = 0.5 * (u[k] + u[k + 1]);
          const vm = 0.5 * (v[k] + v[k + W]);
          if (name === 'u_surf') value = um + ((H - H1) / H) * us;
          else if (name === 'v_surf') value = vm + ((H - H1) / H) * vs;
          else if (name === 'u_below') value = um - (H1 / H) * us;
          else value = vm - (H1 / H) * vs;
        }
      }
      out[o] = value;
    }
  }
}
