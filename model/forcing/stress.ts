// What the solver needs from the wind: stress on the C grid at a model time.

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
}

/** No wind at all. */
export const calm: WindStress = {
  steady: true,
  fill(_t, taux, tauy) {
    taux.fill(0);
    tauy.fill(0);
  },
};
