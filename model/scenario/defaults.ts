// Defaults come from the schema's "default" values, so the file editors show and the program agree.
// The one default that is computed, beta = 2 Omega / R, is filled in resolve.ts.

import type { Scenario, ScenarioFile } from './types.ts';
import { chooseBranch, deref, hasOwn, isPlainObject, scenarioSchema, type SchemaNode } from './schema.ts';

/** A copy of the scenario with every missing key that has a default filled in. The input is not changed. */
export function withDefaults(file: ScenarioFile): Scenario {
  const copy = structuredClone(file) as unknown;
  fillDefaults(scenarioSchema, copy);
  return copy as Scenario;
}

/** Fill defaults in place, following the schema; tolerant of values of the wrong type (leaves them). */
export function fillDefaults(node: SchemaNode, value: unknown): void {
  const n = deref(node);
  if (Array.isArray(n.oneOf)) {
    const i = chooseBranch(n.oneOf, value);
    if (i !== null) fillDefaults(n.oneOf[i], value);
    return;
  }
  if (isPlainObject(value) && isPlainObject(n.properties)) {
    for (const [key, sub] of Object.entries(n.properties as Record<string, SchemaNode>)) {
      const s = deref(sub);
      if (!hasOwn(value, key) && hasOwn(s, 'default')) value[key] = structuredClone(s.default);
      if (hasOwn(value, key)) fillDefaults(s, value[key]);
    }
  } else if (Array.isArray(value) && n.items && typeof n.items === 'object') {
    for (const item of value) fillDefaults(n.items, item);
  }
}
