// The shipped scenarios (configs/*.json) as cases for path comparisons: the resolved model
// configuration with --set style overrides, a fresh wind per call (each model gets its own), and
// the initial state (a spin-up or restart scenario starts from rest here: what it would hand over
// is another run's state, and the comparison needs only some state).

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { ModelConfig } from '../../model/config.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import type { WindStress } from '../../model/forcing/stress.ts';
import { Grid } from '../../model/grid.ts';
import type { ModelOptions } from '../../model/model.ts';
import { applyOverrides, loadScenario, resolveScenario } from '../../model/scenario/index.ts';
import { State } from '../../model/state.ts';

export interface ScenarioCase {
  file: string;
  cfg: ModelConfig;
  wind: () => WindStress;
  initial: NonNullable<ModelOptions['initial']>;
}

export const SHIPPED = readdirSync('configs')
  .filter((f) => f.endsWith('.json') && !f.endsWith('.schema.json'))
  .sort();

export function scenarioCase(file: string, overrides: string[]): ScenarioCase {
  const path = join('configs', file);
  const r0 = applyOverrides(loadScenario(readFileSync(path, 'utf8'), path), overrides);
  if (!r0.ok) throw new Error(JSON.stringify(r0.errors));
  const r = resolveScenario(r0.scenario);
  const grid = new Grid(r.model.basin, r.model.physics.earthRadius);
  const initial = r.initial.kind === 'restart' || r.initial.kind === 'spinup' ? new State(grid) : r.initial;
  // The plain reference steps know no coupling, so an answering wind enters here only as the
  // designed stress it adds before it first answers; coupled runs are held bit for bit across
  // kernels and restarts in test/trust/coupled-runs.test.ts.
  const wind = (): WindStress => {
    const s = buildWindStress(grid, r.wind, { seed: String(r.seed) }).stress;
    return { fill: (t, x, y) => s.fill(t, x, y), steady: s.steady, updateSeconds: s.updateSeconds };
  };
  return { file, cfg: r.model, wind, initial };
}
