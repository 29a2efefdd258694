// Defaults come from the schema's "default" values, so the file editors show and the program agree.
// The one default that is computed, beta = 2 Omega / R, is filled in resolve.ts.

import type { Scenario, ScenarioFile } from './types.ts';
import { chooseBranch, deref, hasOwn, isPlainObject, scenarioSchema, type SchemaNode } from './schema.ts';

/** A copy of the scenario with every missing key that has a default filled in. The input is not changed. */
export function withDefaults(file: ScenarioFile): Scenario {
  const copy = structuredClone(file) as unknown;
  const latGiven =
    isPlainObject(file) &&
    isPlainObject((file as { hovmoller?: unknown }).hovmoller) &&
    hasOwn((file as { hovmoller: Record<string, unknown> }).hovmoller, 'lat');
  fillDefaults(scenarioSchema, copy);
  if (!latGiven) insideBasin(copy as Scenario);
  return copy as Scenario;
}

/**
 * The schema's default Hovmoller latitude is the equator; a basin that does not reach it gets the
 * cell-centre latitude nearest to the equator instead, so a default the user never wrote cannot
 * make a valid basin invalid.
 */
function insideBasin(sc: Scenario): void {
  const b = sc.basin as Partial<Scenario['basin']> | undefined;
  const lat = sc.hovmoller?.lat;
  if (
    !b ||
    typeof b.latSouth !== 'number' ||
    typeof b.latNorth !== 'number' ||
    !Array.isArray(lat) ||
    lat.length !== 1 ||
    lat[0] !== 0
  )
    return;
  if (b.latSouth <= 0 && b.latNorth >= 0) return;
  const res = b.resolution as unknown;
  const dLat = typeof res === 'number' ? res : isPlainObject(res) && typeof res.lat === 'number' ? res.lat : 0;
  const half = dLat > 0 && dLat < b.latNorth - b.latSouth ? dLat / 2 : 0;
  sc.hovmoller.lat = [b.latSouth > 0 ? b.latSouth + half : b.latNorth - half];
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
