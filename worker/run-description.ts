// What a run's output file says about the run, from the loaded scenario and its model: one place
// for the command line's run and rerun (the page builds its files from saved runs instead).

import type { RunDescription } from '../model/io/run-output.ts';
import type { LoadedScenario } from './protocol.ts';

export function describeLoadedRun(info: LoadedScenario, scenarioFile: string, command: string): RunDescription {
  return {
    name: info.name,
    description: info.description,
    scenarioJson: info.scenarioJson,
    scenarioFile,
    grid: info.grid,
    fields: info.fields,
    hovmollerLats: info.hovmollerLats,
    hovmollerRowLats: info.hovmollerRowLats ?? [],
    probes: info.probes,
    bursts: info.bursts,
    dt: info.dt,
    physics: info.physics,
    command,
  };
}
