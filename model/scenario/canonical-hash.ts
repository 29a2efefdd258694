// The scenario hash of an ensemble member: SHA-256 of the resolved scenario (defaults filled in,
// --set values applied) written as canonical JSON, so that two texts of the same scenario (other
// key order, other indentation) have one hash and any changed value gives another. Canonical
// JSON here: object keys sorted by UTF-16 code units, arrays in order, no whitespace, numbers and
// strings as JSON.stringify writes them (ECMAScript's shortest round-trip form). For the JSON a
// scenario holds (finite numbers, strings, booleans, null) this is the JSON Canonicalization
// Scheme of RFC 8785.
//
// The run file's own pycno_scenario_sha256 hashes the text exactly as written; this one is for
// telling whether a file already holds the run a sweep member asks for.

import { sha256Hex } from '../io/sha256.ts';

export function canonicalJson(value: unknown): string {
  if (value === null || typeof value === 'boolean' || typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new Error(`canonical JSON has no form for the number ${value}`);
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (typeof value === 'object') {
    const keys = Object.keys(value as object).filter((k) => (value as Record<string, unknown>)[k] !== undefined);
    keys.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0)); // UTF-16 code units, as RFC 8785 orders them
    return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`).join(',')}}`;
  }
  throw new Error(`canonical JSON has no form for a value of type ${typeof value}`);
}

/** SHA-256 (hex) of the canonical JSON of a scenario given as JSON text. */
export function scenarioHash(scenarioJson: string): string {
  return sha256Hex(canonicalJson(JSON.parse(scenarioJson)));
}
