// What the solver needs from the wind: stress on the C grid at a model time, and, for a wind that
// answers the ocean, the hooks through which the model hands it the ocean state.

import type { PhysicsConfig } from '../config.ts';
import type { State } from '../state.ts';

/**
 * A wind-stress field the solver can ask for at any model time.
 * taux lives on u faces and tauy on v faces, in N m-2, in the grid's padded layout
 * (see model/grid.ts). fill() overwrites both arrays completely; it must not keep them.
 */
export interface WindStress {
  fill(timeSeconds: number, taux: Float64Array, tauy: Float64Array): void;
  /** True when the field is the same at every time: the solver fills it once and keeps it. */
  readonly steady: boolean;
  /**
   * If set, the field is piecewise constant in time over intervals of this many seconds
   * ([n u, (n+1) u)), and the solver refills only when the step's start time enters a new interval.
   * Unset: the solver refills at every step.
   */
  readonly updateSeconds?: number;
  /** Set when a part of the wind answers the ocean (model/coupling/): the model calls it every everySteps steps. */
  readonly coupling?: OceanCoupling;
}

/** What a run needs to know of the coupled state between records: model/coupling/indices.ts. */
export interface CoupledIndices {
  /** T' averaged over the region of upwelling, weighted by S, K. */
  eastSst: number;
  /** Mean h' over the ocean between 5S and 5N (the equatorial warm-water volume per area), m. */
  warmWater: number;
}

/**
 * The model's side of a coupled wind. The coupled state is the SST anomaly, which the model's
 * State carries (restart files keep it); the wind it answers with is a function of that state
 * alone, so a restart that recomputes it continues bit for bit.
 */
export interface OceanCoupling {
  /** Ocean steps between couplings: the model couples at the start of every step n > 0 with n % everySteps = 0. */
  readonly everySteps: number;
  /**
   * Bind to a run and bring the answering wind in line with the state's SST. A state without one
   * (a fresh start, or a start from an uncoupled run) gets the part's initial SST first.
   */
  start(state: State, run: { physics: PhysicsConfig; dt: number; fCentre: Float64Array }): void;
  /**
   * Advance the SST over everySteps steps from the ocean state and the stress in force (taux,
   * tauy), answer it, and make the next fill() take the new wind.
   */
  couple(state: State, taux: Float64Array, tauy: Float64Array): void;
  indices(state: State): CoupledIndices;
  /** The answering surface wind at cell centres (padded layout, m s-1), for output. */
  centredWind(): { u: Float64Array; v: Float64Array };
}

/** No wind at all. */
export const calm: WindStress = {
  steady: true,
  fill(_t, taux, tauy) {
    taux.fill(0);
    tauy.fill(0);
  },
};
