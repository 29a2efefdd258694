// The embedded surface layer of fixed depth H1: the locally wind-driven shear between it and the
// rest of the active layer, from a damped Ekman balance at each point
//   r_s us - f vs = taux / (rho0 H1),   r_s vs + f us = tauy / (rho0 H1)
// Surface velocity = layer mean + (H - H1)/H * shear; flow beneath = layer mean - H1/H * shear,
// so the layer-mean transport is unchanged. It is diagnostic: nothing feeds back on the layer.

export interface SurfaceShear {
  us: number;
  vs: number;
}

/** Solve the 2x2 balance at one point (taux, tauy in N m-2, f in s-1), into `out` (no allocation: it runs per cell). */
export function surfaceShear(
  taux: number,
  tauy: number,
  f: number,
  rho0: number,
  depth: number,
  damping: number,
  out: SurfaceShear = { us: 0, vs: 0 },
): SurfaceShear {
  const X = taux / (rho0 * depth);
  const Y = tauy / (rho0 * depth);
  const det = damping * damping + f * f;
  out.us = (damping * X + f * Y) / det;
  out.vs = (damping * Y - f * X) / det;
  return out;
}
