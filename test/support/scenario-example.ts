// Shared by the scenario tests: the example file and a way to find one issue by path.
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import type { ScenarioIssue } from '../../model/scenario/index.ts';
import { validateScenario } from '../../model/scenario/index.ts';

export const EXAMPLE_PATH = 'configs/example-minimal.json';
export const exampleText = readFileSync(EXAMPLE_PATH, 'utf8');

/** A fresh, mutable copy of the example scenario. */
export function example(): any {
  return JSON.parse(exampleText);
}

/** Validate, expect failure, and return the issues. */
export function issuesOf(json: unknown): ScenarioIssue[] {
  const r = validateScenario(json);
  expect(r.ok, 'expected the scenario to be refused').toBe(false);
  return r.ok ? [] : r.errors;
}

/** The single issue at a path (fails if there is none or several). */
export function issueAt(issues: ScenarioIssue[], path: string): ScenarioIssue {
  const hits = issues.filter((i) => i.path === path);
  expect(
    hits.map((i) => i.path),
    `issues: ${JSON.stringify(issues, null, 1)}`,
  ).toEqual([path]);
  return hits[0];
}
