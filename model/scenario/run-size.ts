// Runs that make sense before they start. A scenario whose numbers are each within the schema's
// ranges can still describe a run no one meant: a time step of a millisecond makes hundreds of
// millions of steps, an output interval of minutes over decades makes a file of tens of GiB. So:
//   - what cannot run at all is refused (no finite time step, more steps than can be counted
//     exactly, more records than a NetCDF file can hold);
//   - above MAX_STEPS steps, or MAX_OUTPUT_BYTES of output, a run must be asked for explicitly
//     (the command line's --allow-long-run and --allow-large-output); the page runs neither.
// The message says the number, the cap and the flag. Checked by parseScenario for every run,
// check, rerun, sweep member and page load, and for a spin-up's own run (load-inputs.ts).

import { chooseTimeStep } from '../dynamics/stability.ts';
import { derivedNumbers, type DerivedNumbers } from './derived.ts';
import type { ResolvedScenario } from './resolve.ts';

/** Steps above which a run must be asked for with --allow-long-run (about 4 hours on one core at 28,000 cells). */
export const MAX_STEPS = 10_000_000;
/** Output (NetCDF) size above which a run must be asked for with --allow-large-output, bytes. */
export const MAX_OUTPUT_BYTES = 8 * 1024 * 1024 * 1024;
/** A NetCDF classic or 64-bit-offset file counts its records in a signed 32-bit integer. */
export const MAX_RECORDS = 2 ** 31 - 1;

export const ALLOW_LONG_RUN = '--allow-long-run';
export const ALLOW_LARGE_OUTPUT = '--allow-large-output';

/** What the user has allowed beyond the caps. */
export interface RunAllowance {
  longRun?: boolean;
  largeOutput?: boolean;
}

const count = (n: number) =>
  Number.isFinite(n) && n < 1e21 ? Math.round(n).toLocaleString('en-US') : n.toPrecision(3);
const gib = (n: number) => `${(n / 1024 ** 3).toFixed(2)} GiB`;
/** 0.001, 28800, 1.234e-7: four digits, no trailing zeros. */
const short = (x: number) => String(Number(x.toPrecision(4)));

/**
 * Why a run of these numbers is not started, or null when it is. `days` is the run length,
 * `autoDt` the step "auto" would give when the scenario gives its own (for the advice).
 */
export function runSizeRefusal(
  d: Pick<DerivedNumbers, 'dt' | 'steps' | 'outputs' | 'outputBytes' | 'nx' | 'ny'>,
  days: number,
  fields: number,
  allow: RunAllowance = {},
  autoDt?: number,
): string | null {
  const dt = `dt = ${short(d.dt)} s`;
  if (!(d.dt > 0) || !Number.isFinite(d.dt))
    return `the time step comes out as ${d.dt} s; the run cannot start (check time.dtSeconds and time.outputEveryDays)`;
  if (!Number.isSafeInteger(d.steps)) {
    // The step count itself may have overflowed to Infinity (or NaN): say the run length over dt.
    const steps = Number.isFinite(d.steps) ? d.steps : (days * 86400) / d.dt;
    return `the run would take ${count(steps)} time steps (${dt} for ${days} days), more than can be counted exactly; it cannot run: ${advice(autoDt)}`;
  }
  if (d.steps < 1) return `the run of ${days} days is shorter than one time step (${dt}); it would not run at all`;
  if (!(d.outputs <= MAX_RECORDS)) {
    return `the run would save ${count(d.outputs)} records; a NetCDF file holds at most ${count(MAX_RECORDS)}: use a longer time.outputEveryDays`;
  }
  if (d.steps > MAX_STEPS && !allow.longRun) {
    return `the run takes ${count(d.steps)} time steps (${dt} for ${days} days), above the cap of ${count(MAX_STEPS)} steps: ${advice(autoDt)}, or ask for it with ${ALLOW_LONG_RUN} (pycno run, check, sweep, rerun; the page runs no more than the cap)`;
  }
  if (d.outputBytes > MAX_OUTPUT_BYTES && !allow.largeOutput) {
    return `the output would be about ${gib(d.outputBytes)} (${count(d.outputs)} records of ${fields} field${fields === 1 ? '' : 's'} on ${d.nx} x ${d.ny} cells), above the cap of ${gib(MAX_OUTPUT_BYTES)}: save fewer fields (output.fields) or fewer records (time.outputEveryDays), or ask for it with ${ALLOW_LARGE_OUTPUT} (pycno run, check, sweep, rerun; the page runs no more than the cap)`;
  }
  return null;
}

/** How to take fewer steps: a longer given step (with what "auto" would give), or coarser cells. */
function advice(autoDt: number | undefined): string {
  if (autoDt !== undefined && Number.isFinite(autoDt) && autoDt > 0)
    return `use a longer time step (time.dtSeconds "auto" gives ${short(autoDt)} s here) or fewer days`;
  return 'use coarser cells (basin.resolution) or fewer days';
}

/** The refusal of a resolved scenario's run (its derived numbers), or null: what parseScenario and the page's panel check. */
export function scenarioRunRefusal(
  r: ResolvedScenario,
  allow: RunAllowance = {},
  d: DerivedNumbers = derivedNumbers(r),
): string | null {
  const t = r.model.time;
  return runSizeRefusal(
    d,
    r.days,
    r.outputFields.length,
    allow,
    d.dtIsAuto ? undefined : chooseTimeStep(d.stability, null, t.safety, t.alignTo),
  );
}

/** The refusal for a spin-up run of `steps` steps of dt seconds over `days` days, or null. */
export function spinupSizeRefusal(steps: number, dt: number, days: number, allow: RunAllowance = {}): string | null {
  if (!Number.isSafeInteger(steps))
    return `the spin-up would take ${count(Number.isFinite(steps) ? steps : (days * 86400) / dt)} time steps (dt = ${short(dt)} s for ${days} days); it cannot run`;
  if (steps > MAX_STEPS && !allow.longRun) {
    return `the spin-up takes ${count(steps)} time steps (dt = ${short(dt)} s for ${days} days), above the cap of ${count(MAX_STEPS)} steps: shorten initial.days, or ask for it with ${ALLOW_LONG_RUN}`;
  }
  return null;
}
