// From a resolved scenario to a ready model: grid, wind, initial state. Restart and spin-up
// states come from files or other runs, which the host reads and hands in as a State.

import { buildWindStress } from '../forcing/wind.ts';
import type { DrawnBurst } from '../forcing/bursts.ts';
import { InputError } from '../errors.ts';
import { Grid } from '../grid.ts';
import { Model } from '../model.ts';
import { equatorialBeta } from '../theory.ts';
import type { State } from '../state.ts';
import type { ResolvedScenario } from './resolve.ts';

export interface BuildOptions {
  /** File contents by the path written in the scenario (gridded winds). */
  files?: Map<string, string | Uint8Array>;
  /**
   * The starting state for initial kinds 'restart' (continues its clock: the same run goes on) and
   * 'spinup' (a new run from that state, starting at day 0). Read by the host.
   */
  startState?: State;
}

export interface BuiltRun {
  model: Model;
  /** Random bursts drawn for this run (empty without a bursts part). */
  bursts: DrawnBurst[];
}

export function buildModel(r: ResolvedScenario, options: BuildOptions = {}): BuiltRun {
  const grid = new Grid(r.model.basin, r.model.physics.earthRadius);
  const { stress, bursts } = buildWindStress(grid, r.wind, {
    seed: String(r.seed),
    files: options.files,
    beta: equatorialBeta(r.model.physics),
  });
  const init = r.initial;
  if (init.kind === 'restart' || init.kind === 'spinup') {
    if (!options.startState) {
      const what = init.kind === 'restart' ? `the restart file ${init.path}` : `the spin-up scenario ${init.scenario}`;
      throw new InputError(`${what} must be read first: no starting state was given`, 'initial');
    }
    let start = options.startState;
    if (init.kind === 'spinup') {
      // A spin-up hands over its end state, not its clock: the new run's day 0 (and its wind's)
      // starts here. Its multistep history belongs to the other run's forcing, so it starts anew.
      start = start.clone();
      start.startNewRun();
    }
    const model = new Model(r.model, { wind: stress, initial: start });
    return { model, bursts };
  }
  return { model: new Model(r.model, { wind: stress, initial: init }), bursts };
}
