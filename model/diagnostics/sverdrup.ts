// The steady interior flow a wind stress asks for, from Sverdrup's balance, on cell centres:
//   curl tau = d(tauy)/dx - d(taux)/dy (N m-3), with dx, dy in metres as the model uses them
//   (R times radians; the beta plane has no cos(lat));
//   beta V = curl(tau) / rho0 (Sverdrup 1947, PNAS 33, 318; check-values §4), so V is the
//   meridional transport per unit width (m2 s-1, northward positive);
//   its zonal partner from continuity dU/dx + dV/dy = 0 with U = 0 at the eastern coast:
//   U(x) = integral from x to the coast of dV/dy dx', the zonal transport per unit width (m2 s-1,
//   eastward positive), integrated westward from the eastern boundary of each stretch of ocean.
// These predict the interior off the equator (the counter current under a weak-wind gap shows as
// eastward U); near the equator, where beta V balances nothing for long, they are an indication only.
// Fields are nx * ny from the south-west corner, NaN on land.

import { betaAt, sverdrupTransport, type CoriolisPhysics } from '../theory.ts';

/** What the balance needs of the grid. */
export interface SverdrupGrid {
  nx: number;
  ny: number;
  /** Cell sizes, m. */
  dx: number;
  dy: number;
  /** Cell-centre latitudes, degrees (for beta on the sphere). */
  latCentre: ArrayLike<number>;
}

/** Centred derivative along a row or column, one-sided next to land or the edge, NaN alone. */
function derivative(
  f: ArrayLike<number>,
  nx: number,
  ny: number,
  i: number,
  j: number,
  alongX: boolean,
  step: number,
): number {
  const at = (ii: number, jj: number) => (ii < 0 || jj < 0 || ii >= nx || jj >= ny ? NaN : f[jj * nx + ii]);
  const [di, dj] = alongX ? [1, 0] : [0, 1];
  const a = at(i - di, j - dj);
  const b = at(i + di, j + dj);
  const c = at(i, j);
  if (!Number.isNaN(a) && !Number.isNaN(b)) return (b - a) / (2 * step);
  if (!Number.isNaN(b)) return (b - c) / step;
  if (!Number.isNaN(a)) return (c - a) / step;
  return NaN;
}

/** curl tau on cell centres, N m-3 (NaN on land). */
export function stressCurl(taux: ArrayLike<number>, tauy: ArrayLike<number>, g: SverdrupGrid): Float64Array {
  const { nx, ny } = g;
  const curl = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const k = j * nx + i;
      curl[k] = Number.isNaN(taux[k])
        ? NaN
        : derivative(tauy, nx, ny, i, j, true, g.dx) - derivative(taux, nx, ny, i, j, false, g.dy);
    }
  }
  return curl;
}

/** Sverdrup's V = curl(tau) / (rho0 beta), with beta of each row, m2 s-1. */
export function sverdrupV(
  curl: ArrayLike<number>,
  g: SverdrupGrid,
  physics: CoriolisPhysics & { density: number },
): Float64Array {
  const { nx, ny } = g;
  const V = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    const beta = betaAt(physics, g.latCentre[j]);
    for (let i = 0; i < nx; i++) V[j * nx + i] = sverdrupTransport(curl[j * nx + i], physics.density, beta);
  }
  return V;
}

/**
 * U(x) = sum over the cells east of x, up to the coast, of dV/dy dx: a midpoint sum, restarted at
 * every land cell so that each stretch of ocean starts from U = 0 at its own eastern coast. m2 s-1.
 */
export function sverdrupU(V: ArrayLike<number>, g: SverdrupGrid): Float64Array {
  const { nx, ny } = g;
  const out = new Float64Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    let U = 0;
    for (let i = nx - 1; i >= 0; i--) {
      const k = j * nx + i;
      if (Number.isNaN(V[k])) {
        out[k] = NaN;
        U = 0;
        continue;
      }
      const dVdy = derivative(V, nx, ny, i, j, false, g.dy);
      const inc = Number.isNaN(dVdy) ? 0 : dVdy * g.dx;
      // Value at the cell centre: half this cell's increment past the running sum.
      out[k] = U + 0.5 * inc;
      U += inc;
    }
  }
  return out;
}
