// The bounds of a sane model state, shared by the blow-up check of a running model (model.ts)
// and the check of a start state before the first step (initial.ts, io/restart.ts): a state the
// running model would stop at once is never accepted as a start.

/** Flow faster than this stops a run as blown up, m/s (ocean currents reach about 2-3 m/s; common practice). */
export const RUNAWAY_SPEED = 20;
/**
 * Thickest upper layer a start may have, m: deeper than the deepest ocean (the Challenger Deep,
 * about 10,900 m; from memory). A thickness anomaly beyond it is a damaged or crafted file.
 */
export const MAX_LAYER_THICKNESS = 11_000;
