// Whether the engine could build the wind of a valid scenario: the same buildWindStress the model
// calls at load, on the scenario's grid (formulas compiled and evaluated on every face). The
// scenario validator checks the format; this catches what only building shows (a formula that
// does not compile, or gives NaN somewhere). The problem comes back as an issue at the wind part
// it is about ("wind part 2 ('name'): ..." counts from 1, as the list does), so the panel marks
// that part and keeps Apply off. A gridded part's file cannot be reached from the page; that is
// said at the part and left to the engine (it refuses with the same words).

import { ForcingError } from '../../model/forcing/errors.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import type { ScenarioIssue } from '../../model/scenario/errors.ts';
import { previewSetup } from './preview.ts';

export function forcingProblem(json: unknown): ScenarioIssue | null {
  let setup: ReturnType<typeof previewSetup>;
  try {
    setup = previewSetup(json);
  } catch {
    return null; // the validator's issues are shown already
  }
  try {
    buildWindStress(setup.grid, setup.resolved.wind, { seed: String(setup.resolved.seed) });
    return null;
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (e instanceof ForcingError && /was not provided/.test(message)) return null;
    const m = /^wind part (\d+)/.exec(message);
    const k = m ? Number(m[1]) - 1 : -1;
    // A formula's problem goes to its box (the editor shows it there, with the rest of the part).
    const part =
      k >= 0
        ? (json as { wind?: { parts?: Array<{ source?: { shape?: { kind?: string } } }> } }).wind?.parts?.[k]
        : undefined;
    const path =
      k < 0
        ? 'wind'
        : part?.source?.shape?.kind === 'formula'
          ? `wind.parts[${k}].source.shape.expression`
          : `wind.parts[${k}]`;
    return { path, message };
  }
}
