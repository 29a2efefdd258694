// The wind stress a scenario gives, before running: the SAME buildWindStress (model/forcing/wind.ts)
// the model calls, on the same grid, filled at the chosen day exactly as the solver would fill it
// (time-varying parts held at the middle of their updateHours interval). This is the forcing only;
// nothing of the ocean is computed here.
//
// Derived layers, on cell centres:
//   |tau|, and curl tau = d(tauy)/dx - d(taux)/dy (N m-3), with dx, dy in metres as the model uses
//   them (R times radians; the beta plane has no cos(lat));
//   the Sverdrup balance beta V = curl(tau) / rho0 (Sverdrup 1947, PNAS 33, 318; check-values §4,
//   "Sverdrup interior balance"), so V = curl(tau) / (rho0 beta), the meridional transport per unit
//   width (m2 s-1, northward positive);
//   its zonal partner from continuity dU/dx + dV/dy = 0 with U = 0 at the eastern coast:
//   U(x) = integral from x to the coast of dV/dy dx', the zonal transport per unit width (m2 s-1,
//   eastward positive), integrated westward from the eastern boundary of each stretch of ocean.
// The Sverdrup layers predict the steady interior flow off the equator (the counter current under
// a weak-wind gap shows as eastward U); near the equator, where beta V balances nothing for long,
// they are an indication only.

import { Grid } from '../../model/grid.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { resolveScenario, validateScenario, type ResolvedScenario } from '../../model/scenario/index.ts';
import { formatIssue } from '../../model/scenario/errors.ts';

export const PREVIEW_LAYERS = ['magnitude', 'curl', 'sverdrupV', 'sverdrupU'] as const;
export type PreviewLayer = (typeof PREVIEW_LAYERS)[number];

export const LAYER_INFO: Record<PreviewLayer, { label: string; units: string; diverging: boolean }> = {
  magnitude: { label: 'stress magnitude |tau|', units: 'N m-2', diverging: false },
  curl: { label: 'stress curl', units: 'N m-3', diverging: true },
  sverdrupV: { label: 'Sverdrup V = curl(tau)/(rho0 beta)', units: 'm2 s-1', diverging: true },
  sverdrupU: { label: 'Sverdrup U, from the east coast', units: 'm2 s-1', diverging: true },
};

export interface StressField {
  nx: number;
  ny: number;
  /** Centred components, nx * ny from the south-west corner, NaN on land (as frames carry them). */
  taux: Float32Array;
  tauy: Float32Array;
  day: number;
}

export class PreviewError extends Error {
  override name = 'PreviewError';
}

/** A resolved scenario and its grid; throws PreviewError with the validator's lines. */
export function previewSetup(json: unknown): { resolved: ResolvedScenario; grid: Grid } {
  const r = validateScenario(json);
  if (!r.ok) throw new PreviewError(r.errors.map(formatIssue).join('\n'));
  const resolved = resolveScenario(r.scenario);
  return { resolved, grid: new Grid(resolved.model.basin, resolved.model.physics.earthRadius) };
}

/** The stress the model gets at `day`. Forcing errors (a formula giving NaN...) come out as thrown. */
export function stressAt(resolved: ResolvedScenario, grid: Grid, day: number, files?: Map<string, string | Uint8Array>): StressField {
  const { stress } = buildWindStress(grid, resolved.wind, { seed: String(resolved.seed), files });
  const tx = grid.field();
  const ty = grid.field();
  stress.fill(day * 86400, tx, ty);
  const { nx, ny, W, ocean } = grid;
  const taux = new Float32Array(nx * ny);
  const tauy = new Float32Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = (j + 1) * W + i + 1;
      const o = j * nx + i;
      if (!ocean[k]) {
        taux[o] = NaN;
        tauy[o] = NaN;
        continue;
      }
      // The same centring as the model's output fields (model/diagnostics/fields.ts).
      taux[o] = 0.5 * (tx[k] + tx[k + 1]);
      tauy[o] = 0.5 * (ty[k] + ty[k + W]);
    }
  }
  return { nx, ny, taux, tauy, day };
}

/** Centred derivative along a row or column, one-sided next to land or the edge, NaN alone. */
function derivative(f: Float32Array | Float64Array, nx: number, ny: number, i: number, j: number, alongX: boolean, step: number): number {
  const at = (ii: number, jj: number) => (ii < 0 || jj < 0 || ii >= nx || jj >= ny ? NaN : f[jj * nx + ii]);
  const [di, dj] = alongX ? [1, 0] : [0, 1];
  const a = at(i - di, j - dj);
  const b = at(i + di, j + dj);
  const c = at(i, j);
  if (a === a && b === b) return (b - a) / (2 * step);
  if (b === b) return (b - c) / step;
  if (a === a) return (c - a) / step;
  return NaN;
}

/** One preview layer on cell centres (NaN on land). rho0 and beta from the scenario's physics. */
export function layerValues(field: StressField, layer: PreviewLayer, grid: Grid, physics: { density: number; beta: number; coriolis: string; earthRotation: number; earthRadius: number }): Float32Array {
  const { nx, ny, taux, tauy } = field;
  const out = new Float32Array(nx * ny);
  if (layer === 'magnitude') {
    for (let k = 0; k < out.length; k++) out[k] = Math.hypot(taux[k], tauy[k]);
    return out;
  }
  const curl = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = j * nx + i;
      curl[k] = taux[k] !== taux[k] ? NaN : derivative(tauy, nx, ny, i, j, true, grid.dx) - derivative(taux, nx, ny, i, j, false, grid.dy);
    }
  }
  if (layer === 'curl') {
    out.set(curl);
    return out;
  }
  // beta per row: constant on the beta plane; 2 Omega cos(lat) / R on the sphere.
  const betaRow = new Float64Array(ny);
  for (let j = 0; j < ny; j++) {
    betaRow[j] = physics.coriolis === 'spherical' ? (2 * physics.earthRotation * Math.cos((grid.latCentre[j] * Math.PI) / 180)) / physics.earthRadius : physics.beta;
  }
  const V = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) V[j * nx + i] = curl[j * nx + i] / (physics.density * betaRow[j]);
  if (layer === 'sverdrupV') {
    out.set(V);
    return out;
  }
  // U(x) = sum over cells east of x, up to the coast, of dV/dy dx: a midpoint sum, restarted at
  // every land cell so each stretch of ocean starts from U = 0 at its own eastern coast.
  for (let j = 0; j < ny; j++) {
    let U = 0;
    for (let i = nx - 1; i >= 0; i--) {
      const k = j * nx + i;
      if (taux[k] !== taux[k]) {
        out[k] = NaN;
        U = 0;
        continue;
      }
      const dVdy = derivative(V, nx, ny, i, j, false, grid.dy);
      const inc = dVdy === dVdy ? dVdy * grid.dx : 0;
      // Value at the cell centre: half this cell's increment past the running sum.
      out[k] = U + 0.5 * inc;
      U += inc;
    }
  }
  return out;
}

/** Range of finite values, or [0, 0]. */
export function finiteRange(a: ArrayLike<number>): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let k = 0; k < a.length; k++) {
    const v = a[k];
    if (v === v) {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  return lo <= hi ? [lo, hi] : [0, 0];
}

/**
 * The total stress at one cell over the run: the same builder on a small grid of that model cell
 * and its neighbours (same cell edges, same land, so the same faces carry stress; a face on the
 * basin's edge stays a coast), filled at each day. Returns null over land.
 */
export function stressSeriesAt(resolved: ResolvedScenario, grid: Grid, lon: number, lat: number, days: number[], files?: Map<string, string | Uint8Array>): { lon: number; lat: number; taux: Float64Array; tauy: Float64Array } | null {
  const b = resolved.model.basin;
  const i = Math.min(grid.nx - 1, Math.max(0, Math.floor((lon - b.lonWest) / b.dLon)));
  const j = Math.min(grid.ny - 1, Math.max(0, Math.floor((lat - b.latSouth) / b.dLat)));
  if (!grid.ocean[grid.idx(i, j)]) return null;
  const i0 = Math.max(0, i - 1);
  const i1 = Math.min(grid.nx - 1, i + 1);
  const j0 = Math.max(0, j - 1);
  const j1 = Math.min(grid.ny - 1, j + 1);
  const small = new Grid({ ...b, lonWest: grid.lonFace[i0], lonEast: grid.lonFace[i1 + 1], latSouth: grid.latFace[j0], latNorth: grid.latFace[j1 + 1] }, resolved.model.physics.earthRadius);
  const { stress } = buildWindStress(small, resolved.wind, { seed: String(resolved.seed), files });
  const tx = small.field();
  const ty = small.field();
  const k = small.idx(i - i0, j - j0);
  const taux = new Float64Array(days.length);
  const tauy = new Float64Array(days.length);
  days.forEach((d, n) => {
    stress.fill(d * 86400, tx, ty);
    taux[n] = 0.5 * (tx[k] + tx[k + 1]);
    tauy[n] = 0.5 * (ty[k] + ty[k + small.W]);
  });
  return { lon: grid.lonCentre[i], lat: grid.latCentre[j], taux, tauy };
}
