import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import type { WindSpec } from '../../model/forcing/spec.ts';
import { formatIssue, validateScenario, withDefaults, type ScenarioFile } from '../../model/scenario/index.ts';
import { scenarioSchema } from '../../model/scenario/schema.ts';
import { example } from '../support/scenario-example.ts';

/** Every schema node that describes an instance value, with its pointer. */
function walk(node: any, at: string, visit: (node: any, at: string) => void): void {
  if (!node || typeof node !== 'object') return;
  visit(node, at);
  for (const [k, v] of Object.entries(node.properties ?? {})) walk(v, `${at}/properties/${k}`, visit);
  for (const [k, v] of Object.entries(node.$defs ?? {})) walk(v, `${at}/$defs/${k}`, visit);
  (node.oneOf ?? []).forEach((b: any, i: number) => walk(b, `${at}/oneOf/${i}`, visit));
  (node.prefixItems ?? []).forEach((b: any, i: number) => walk(b, `${at}/prefixItems/${i}`, visit));
  if (node.items && typeof node.items === 'object') walk(node.items, `${at}/items`, visit);
}

describe('the JSON Schema file', () => {
  test('every property has a description', () => {
    const missing: string[] = [];
    walk(scenarioSchema, '#', (node, at) => {
      for (const [k, v] of Object.entries<any>(node.properties ?? {}))
        if (typeof v.description !== 'string' || v.description === '') missing.push(`${at}/properties/${k}`);
    });
    expect(missing).toEqual([]);
  });

  test('every object refuses unknown keys', () => {
    const open: string[] = [];
    walk(scenarioSchema, '#', (node, at) => {
      if (node.type === 'object' && node.additionalProperties !== false) open.push(at);
    });
    expect(open).toEqual([]);
  });

  test('the two fixed --set keys exist with their ranges', () => {
    const p = scenarioSchema.properties.physics.properties;
    expect(p.reducedGravity).toMatchObject({ type: 'number', exclusiveMinimum: 0, maximum: 1 });
    expect(p.layerThickness).toMatchObject({ type: 'number', exclusiveMinimum: 0, maximum: 5000 });
  });

  test('no eval or new Function in the scenario code', () => {
    for (const f of readdirSync('model/scenario')) {
      const src = readFileSync(`model/scenario/${f}`, 'utf8');
      expect(src, f).not.toMatch(/\bnew Function\b|\beval\s*\(/);
    }
  });
});

describe('the schema describes exactly the WindSpec shapes of model/forcing/spec.ts', () => {
  // Typed as WindSpec, so the compiler checks it against spec.ts; the schema must accept it.
  const wind: WindSpec = {
    bulk: { airDensity: 1.2, drag: 'constant', dragCoefficient: 1.3e-3 },
    updateHours: 3,
    parts: [
      {
        kind: 'fixed',
        quantity: 'stress',
        source: { kind: 'shaped', shape: { kind: 'uniform' }, x: -0.05, y: 0 },
        envelope: { kind: 'constant' },
      },
      {
        kind: 'fixed',
        name: 'tilted patch',
        enabled: false,
        quantity: 'wind',
        source: {
          kind: 'shaped',
          shape: { kind: 'patch', lon: 180, lat: 0, lonWidth: 10, latWidth: 5, tiltDeg: 20 },
          x: 7,
          y: 1,
        },
        envelope: { kind: 'ramp', start: 5, duration: 10, direction: 'down' },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: {
          kind: 'shaped',
          shape: { kind: 'band', profile: { kind: 'cosine', centre: 0, halfWidth: 10 } },
          x: -0.04,
          y: 0,
        },
        envelope: { kind: 'pulse', start: 0, duration: 20, ramp: 5 },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: {
          kind: 'shaped',
          shape: { kind: 'band', profile: { kind: 'tanh', south: -5, north: 5, edge: 1 } },
          x: 0,
          y: 0.01,
        },
        envelope: { kind: 'harmonics', mean: 1, terms: [{ period: 365, amplitude: 0.5, peakDay: 90 }] },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: {
          kind: 'shaped',
          shape: { kind: 'band', profile: { kind: 'gap', centre: 5, width: 2, depth: 0.8 } },
          x: -0.05,
          y: 0,
        },
        envelope: {
          kind: 'table',
          points: [
            [0, 0],
            [10, 1],
            [30, 0.5],
          ],
        },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: { kind: 'shaped', shape: { kind: 'band', profile: { kind: 'trades', edgeLat: 15 } }, x: -0.05, y: 0 },
        envelope: { kind: 'switch-off', day: 30, ramp: 2 },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: {
          kind: 'shaped',
          shape: { kind: 'formula', expression: 'exp(-(lat/5)^2) * cos(2*pi*t/30)' },
          x: 0.02,
          y: 0,
        },
        envelope: { kind: 'constant' },
      },
      {
        kind: 'fixed',
        quantity: 'stress',
        source: {
          kind: 'painted',
          grid: {
            lon0: 140,
            lat0: -20,
            dLon: 60,
            dLat: 20,
            nLon: 3,
            nLat: 3,
            x: [0, 0, 0, 0.1, 0.1, 0.1, 0, 0, 0],
            y: [0, 0, 0, 0, 0, 0, 0, 0, 0],
          },
        },
        envelope: { kind: 'constant' },
      },
      {
        kind: 'fixed',
        quantity: 'wind',
        source: { kind: 'file', path: 'winds.nc', format: 'netcdf', xVariable: 'uwnd', yVariable: 'vwnd' },
        envelope: { kind: 'constant' },
      },
      {
        kind: 'fixed',
        quantity: 'wind',
        source: { kind: 'file', path: 'winds.csv', format: 'csv' },
        envelope: { kind: 'constant' },
      },
      {
        kind: 'bursts',
        name: 'bursts',
        quantity: 'wind',
        ratePerYear: 6,
        window: [0, 50],
        amplitude: [5, 12],
        lon: [150, 190],
        lat: [-3, 3],
        lonWidth: [5, 15],
        latWidth: [3, 6],
        duration: [4, 20],
        ramp: 1,
      },
    ],
  };

  test('every kind of shape, profile, source, envelope and part validates and survives unchanged', () => {
    const j = example();
    j.wind = wind;
    const r = validateScenario(j);
    if (!r.ok) throw new Error(r.errors.map(formatIssue).join('\n'));
    // Only the optional keys with defaults are added.
    const parts = r.scenario.wind.parts.map((p) => ({ ...p }));
    expect(parts.every((p) => p.enabled !== undefined)).toBe(true);
    expect(r.scenario.wind.bulk).toEqual(wind.bulk);
    expect(r.scenario.wind.parts[1]).toEqual(wind.parts[1]);
  });

  test('every initial kind validates', () => {
    for (const initial of [
      { kind: 'rest' },
      { kind: 'bump', lon: 200, lat: 0, radiusDeg: 3, amplitude: 20 },
      { kind: 'kelvin', lon: 160, amplitude: 10, zonalWidthDeg: 8 },
      { kind: 'rossby', lon: 240, amplitude: 10, zonalWidthDeg: 8 },
      { kind: 'restart', path: 'runs/spinup.nc' },
      { kind: 'spinup', scenario: 'spinup.json', days: 365 },
      { kind: 'spinup', scenario: 'spinup.json' },
    ]) {
      const j = example();
      j.initial = initial;
      const r = validateScenario(j);
      expect(r.ok, JSON.stringify(initial)).toBe(true);
    }
  });

  test('a scenario with its defaults filled in is itself valid (the defaults obey the schema)', () => {
    const minimal: ScenarioFile = {
      format: 'pycno-scenario/1',
      name: 'defaults',
      basin: { lonWest: 120, lonEast: 280, latSouth: -15, latNorth: 15, resolution: 0.5 },
      time: { days: 10 },
    };
    const filled = withDefaults(minimal);
    const r = validateScenario(filled);
    if (!r.ok) throw new Error(r.errors.map(formatIssue).join('\n'));
    expect(r.scenario).toEqual(filled);
    expect(Object.keys(filled).sort()).toEqual(
      [
        'basin',
        'description',
        'format',
        'hovmoller',
        'initial',
        'name',
        'numerics',
        'output',
        'physics',
        'probes',
        'seed',
        'time',
        'wind',
      ].sort(),
    );
  });
});

describe('docs/scenarios.md', () => {
  test('the complete example in the documentation validates', () => {
    const doc = readFileSync('docs/scenarios.md', 'utf8');
    const block = /```json\n([\s\S]*?)\n```/.exec(doc);
    expect(block).not.toBeNull();
    const r = validateScenario(JSON.parse(block![1]));
    if (!r.ok) throw new Error(r.errors.map(formatIssue).join('\n'));
    expect(r.scenario.wind.parts).toHaveLength(3);
  });

  test('the key table lists every top-level and section key of the schema', () => {
    const doc = readFileSync('docs/scenarios.md', 'utf8');
    const keys: string[] = [];
    for (const [k, v] of Object.entries<any>(scenarioSchema.properties)) {
      keys.push(k);
      for (const sub of Object.keys(v.properties ?? {})) keys.push(`${k}.${sub}`);
    }
    expect(keys.filter((k) => !doc.includes(`| \`${k}\` |`))).toEqual([]);
  });
});
