// The western boundary layer against the grid. On a beta plane the return flow of the wind-driven
// circulation runs in a narrow layer along western coasts, of width (A/beta)^(1/3) where lateral
// viscosity A holds it (Munk 1950) or r/beta where Rayleigh friction r does (Stommel 1948). A grid
// that cannot hold that layer fills it with a two-grid-interval mode: v alternating in sign from one
// column to the next, metres per second strong. Common practice is a Munk width of at least one
// grid interval, better two (Griffies 2004, Fundamentals of Ocean Climate Models, from memory).

import { munkWidth, stommelWidth } from '../theory.ts';

/** The layer counts as resolved when its width is at least this many zonal grid intervals. */
export const RESOLVED_INTERVALS = 1;
/** What the advice aims at beyond the minimum: a little room, so the current spans a few cells. */
export const COMFORTABLE_INTERVALS = 1.5;

export interface BoundaryLayer {
  /** Munk width (A/beta)^(1/3), km (0 without viscosity). */
  munkKm: number;
  /** Stommel width r/beta, km (0 without friction). */
  stommelKm: number;
  /** The wider of the two, in zonal grid intervals. */
  intervals: number;
  resolved: boolean;
  /** Viscosity that makes the Munk width one grid interval, and 1.5 intervals, m2 s-1. */
  viscosityForOne: number;
  viscosityForComfort: number;
  /** One sentence for the user: null when resolved, else what to raise and to what. */
  advice: string | null;
}

/**
 * The western boundary layer of a run: beta (m-1 s-1; the largest in the basin), viscosity A
 * (m2 s-1), friction r (s-1) and the zonal grid interval dx (m). Without beta there is no western
 * intensification, and the layer counts as resolved.
 */
export function westernBoundaryLayer(beta: number, viscosity: number, friction: number, dx: number): BoundaryLayer {
  const munk = munkWidth(viscosity, beta);
  const stommel = stommelWidth(friction, beta);
  const intervals = beta > 0 ? Math.max(munk, stommel) / dx : Infinity;
  const forWidth = (w: number) => beta * w * w * w;
  const viscosityForOne = forWidth(RESOLVED_INTERVALS * dx);
  const viscosityForComfort = forWidth(COMFORTABLE_INTERVALS * dx);
  const resolved = intervals >= RESOLVED_INTERVALS;
  const km = (m: number) => `${(m / 1000).toFixed(1)} km`;
  const advice = resolved
    ? null
    : `the western boundary layer is narrower than one grid interval: Munk width (A/beta)^(1/3) = ${km(munk)} and Stommel width r/beta = ${km(stommel)} ` +
      `against dx = ${km(dx)}, so a grid-scale current of alternating sign builds up along western coasts; ` +
      `raise physics.viscosity to at least ${roundUp(viscosityForOne)} m2/s (Munk width = dx; ${roundUp(viscosityForComfort)} m2/s gives 1.5 dx), or refine basin.resolution`;
  return {
    munkKm: munk / 1000,
    stommelKm: stommel / 1000,
    intervals,
    resolved,
    viscosityForOne,
    viscosityForComfort,
    advice,
  };
}

/** Up to two significant digits, rounded up, so the advised value really resolves the layer. */
function roundUp(x: number): string {
  if (!(x > 0) || !Number.isFinite(x)) return String(x);
  let scale = 1;
  while (x / scale >= 100) scale *= 10;
  while (x / scale < 10) scale /= 10;
  return String(Number((Math.ceil(x / scale) * scale).toPrecision(2)));
}
