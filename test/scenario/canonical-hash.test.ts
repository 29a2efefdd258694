// The member hash of a sweep: canonical JSON (RFC 8785's key order and number form) of the
// resolved scenario, so the text's layout does not matter and every value does.

import { describe, expect, it } from 'vitest';
import { canonicalJson, scenarioHash } from '../../model/scenario/canonical-hash.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { FIXTURE_TEXT } from '../support/engine-fixture.ts';

describe('canonical JSON and the scenario hash', () => {
  it('sorts keys by UTF-16 code units and writes numbers in the shortest round-trip form', () => {
    // The key-order example of RFC 8785 section 3.2.3 (from memory): "\r", "1", "\u0080", "\u00f6",
    // "\u20ac", "\ud83d\ude00", "\ufb33" in that order.
    const keys = ['\u20ac', '\r', '\ufb33', '1', '\ud83d\ude00', '\u0080', '\u00f6'];
    const obj = Object.fromEntries(keys.map((k, i) => [k, i]));
    expect(canonicalJson(obj)).toBe('{"\\r":1,"1":3,"\u0080":5,"\u00f6":6,"\u20ac":0,"\ud83d\ude00":4,"\ufb33":2}');
    // Numbers as ECMAScript writes them (RFC 8785 section 3.2.2.3, from memory).
    expect(canonicalJson([1e21, 1e-7, 0.1, -0, 100, 1.5e300])).toBe('[1e+21,1e-7,0.1,0,100,1.5e+300]');
    expect(canonicalJson({ b: [true, null, 'x'], a: { d: 1, c: 2 } })).toBe('{"a":{"c":2,"d":1},"b":[true,null,"x"]}');
    expect(() => canonicalJson({ x: NaN })).toThrow(/no form for the number NaN/);
  });

  it('is the same for the same scenario written differently, and differs for one changed value', () => {
    const a = parseScenario(FIXTURE_TEXT, 'tiny.json').scenarioJson;
    const reordered = JSON.stringify(Object.fromEntries(Object.entries(JSON.parse(a)).reverse()));
    expect(reordered).not.toBe(a);
    expect(scenarioHash(reordered)).toBe(scenarioHash(a));
    // A resolved scenario resolves to itself: the batch folder's scenario.json plus a member's
    // --set gives the hash of the original plus the same --set.
    const once = parseScenario(FIXTURE_TEXT, 'tiny.json', ['physics.layerThickness=120']).scenarioJson;
    const twice = parseScenario(a, 'scenario.json', ['physics.layerThickness=120']).scenarioJson;
    expect(scenarioHash(twice)).toBe(scenarioHash(once));
    const other = parseScenario(FIXTURE_TEXT, 'tiny.json', ['physics.layerThickness=120.5']).scenarioJson;
    expect(scenarioHash(other)).not.toBe(scenarioHash(once));
    expect(scenarioHash(a)).toMatch(/^[0-9a-f]{64}$/);
  });
});
