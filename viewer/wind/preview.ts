// The wind stress a scenario gives, before running: the SAME buildWindStress (model/forcing/wind.ts)
// the model calls, on the same grid, filled at the chosen day exactly as the solver would fill it
// (time-varying parts held at the middle of their updateHours interval). This is the forcing only;
// nothing of the ocean is computed here: an answering part shows its answer to a test warming.
// Derived layers on cell centres: |tau|, and the stress curl and Sverdrup transports V and U as
// model/diagnostics/sverdrup.ts computes them (a prediction of the steady interior off the
// equator; near the equator an indication only).

import { stressCurl, sverdrupU, sverdrupV } from '../../model/diagnostics/sverdrup.ts';
import { Grid } from '../../model/grid.ts';
import type { CoriolisPhysics } from '../../model/theory.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { resolveScenario, validateScenario, type ResolvedScenario } from '../../model/scenario/index.ts';
import { issueListLines } from '../../model/scenario/errors.ts';
import { equatorialBeta } from '../../model/theory.ts';

/**
 * The answering wind follows the run's own SST, which no preview knows: the preview shows its
 * answer to a warming of this many kelvin times its upwelling region.
 */
export const PREVIEW_WARMING = 1;

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
  if (!r.ok) throw new PreviewError(issueListLines(r.errors).join('\n'));
  const resolved = resolveScenario(r.scenario);
  return { resolved, grid: new Grid(resolved.model.basin, resolved.model.physics.earthRadius) };
}

/** The stress the model gets at `day`. Forcing errors (a formula giving NaN...) come out as thrown. */
export function stressAt(
  resolved: ResolvedScenario,
  grid: Grid,
  day: number,
  files?: Map<string, string | Uint8Array>,
): StressField {
  const { stress, answering } = buildWindStress(grid, resolved.wind, {
    seed: String(resolved.seed),
    files,
    beta: equatorialBeta(resolved.model.physics),
  });
  answering?.answerTestAnomaly(PREVIEW_WARMING);
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

/** One preview layer on cell centres (NaN on land). rho0 and beta from the scenario's physics. */
export function layerValues(
  field: StressField,
  layer: PreviewLayer,
  grid: Grid,
  physics: CoriolisPhysics & { density: number },
): Float32Array {
  const { nx, ny, taux, tauy } = field;
  const out = new Float32Array(nx * ny);
  if (layer === 'magnitude') {
    for (let k = 0; k < out.length; k++) out[k] = Math.hypot(taux[k], tauy[k]);
    return out;
  }
  // The balance itself is the model's (model/diagnostics/sverdrup.ts); the page only draws it.
  const curl = stressCurl(taux, tauy, grid);
  if (layer === 'curl') out.set(curl);
  else if (layer === 'sverdrupV') out.set(sverdrupV(curl, grid, physics));
  else out.set(sverdrupU(sverdrupV(curl, grid, physics), grid));
  return out;
}

/** Range of finite values, or [0, 0]. */
export function finiteRange(a: ArrayLike<number>): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let k = 0; k < a.length; k++) {
    const v = a[k];
    if (!Number.isNaN(v)) {
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
export function stressSeriesAt(
  resolved: ResolvedScenario,
  grid: Grid,
  lon: number,
  lat: number,
  days: number[],
  files?: Map<string, string | Uint8Array>,
): { lon: number; lat: number; taux: Float64Array; tauy: Float64Array } | null {
  const b = resolved.model.basin;
  const i = Math.min(grid.nx - 1, Math.max(0, Math.floor((lon - b.lonWest) / b.dLon)));
  const j = Math.min(grid.ny - 1, Math.max(0, Math.floor((lat - b.latSouth) / b.dLat)));
  if (!grid.ocean[grid.idx(i, j)]) return null;
  const i0 = Math.max(0, i - 1);
  const i1 = Math.min(grid.nx - 1, i + 1);
  const j0 = Math.max(0, j - 1);
  const j1 = Math.min(grid.ny - 1, j + 1);
  const small = new Grid(
    {
      ...b,
      lonWest: grid.lonFace[i0],
      lonEast: grid.lonFace[i1 + 1],
      latSouth: grid.latFace[j0],
      latNorth: grid.latFace[j1 + 1],
    },
    resolved.model.physics.earthRadius,
  );
  // The designed parts only: the answering wind over the run depends on the run (and its atmosphere on the whole basin).
  const designed = { ...resolved.wind, parts: resolved.wind.parts.filter((p) => p.kind !== 'answering') };
  const { stress } = buildWindStress(small, designed, { seed: String(resolved.seed), files });
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
