// The wind panel keeps Apply off for a scenario that validates but whose wind the engine could not
// build (viewer/wind/forcing-check.ts): the problem names the part as the list numbers it (from 1)
// and goes to the formula box it is about.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { forcingProblem } from '../../viewer/wind/forcing-check.ts';
import { routeIssues } from '../../viewer/wind/design-state.ts';

const burst = JSON.parse(readFileSync(new URL('../../configs/westerly-burst.json', import.meta.url), 'utf8'));

function withFormula(expression: string) {
  const s = structuredClone(burst);
  s.wind.parts.push({
    kind: 'fixed',
    name: 'shape',
    quantity: 'stress',
    source: { kind: 'shaped', shape: { kind: 'formula', expression }, x: 0.01, y: 0 },
    envelope: { kind: 'constant' },
  });
  return s;
}

describe('the forcing check of the wind panel', () => {
  it('passes a wind the engine can build', () => {
    expect(forcingProblem(burst)).toBeNull();
    expect(forcingProblem(withFormula('exp(-(lat/10)^2)'))).toBeNull();
  });
  it("a formula that does not compile: its part as listed ('2.'), our syntax in the message, at the formula box", () => {
    const p = forcingProblem(withFormula('lat^^2'))!;
    expect(p.message).toBe(
      "wind part 2 ('shape'): syntax error at character 4: '^' must be followed by a number, a name or a bracket",
    );
    expect(p.path).toBe('wind.parts[1].source.shape.expression');
    const routed = routeIssues([p], 1, 2);
    expect(routed.editor.map((i) => i.rel)).toEqual(['source.shape.expression']);
    expect(routed.invalid).toEqual([false, true]);
  });
  it('a formula that gives NaN on the grid is not runnable either', () => {
    const p = forcingProblem(withFormula('sqrt(lat)'))!;
    expect(p.message).toMatch(/^wind part 2 \('shape'\): formula 'sqrt\(lat\)' gives NaN at lon [\d.]+, lat -[\d.]+/);
  });
});
