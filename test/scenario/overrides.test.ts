import { describe, expect, test } from 'vitest';
import { applyOverrides, formatIssue } from '../../model/scenario/index.ts';
import { example } from '../support/scenario-example.ts';

function ok(sets: string[], json: unknown = example()) {
  const r = applyOverrides(json, sets);
  if (!r.ok) throw new Error(r.errors.map(formatIssue).join('\n'));
  return r;
}

function refused(sets: string[], json: unknown = example()) {
  const r = applyOverrides(json, sets);
  if (r.ok) throw new Error('expected the overrides to be refused');
  return r.errors;
}

describe('--set overrides', () => {
  test('the fixed keys and typed values', () => {
    const r = ok([
      'physics.reducedGravity=0.05',
      'physics.layerThickness=200',
      'time.days=30',
      'wind.parts[0].enabled=false',
      'physics.frictionDays=null',
      'physics.dynamics=nonlinear',
      'time.dtSeconds="auto"',
      'seed=abc',
      'initial={"kind":"bump","lon":200,"lat":0,"radiusDeg":4,"amplitude":20}',
      'hovmoller.lat=[0, 2.5]',
    ]);
    expect(r.scenario.physics.reducedGravity).toBe(0.05);
    expect(r.scenario.physics.layerThickness).toBe(200);
    expect(r.scenario.time.days).toBe(30);
    expect(r.scenario.wind.parts[0].enabled).toBe(false);
    expect(r.scenario.physics.frictionDays).toBeNull();
    expect(r.scenario.physics.dynamics).toBe('nonlinear');
    expect(r.scenario.time.dtSeconds).toBe('auto');
    expect(r.scenario.seed).toBe('abc');
    expect(r.scenario.initial).toEqual({ kind: 'bump', lon: 200, lat: 0, radiusDeg: 4, amplitude: 20 });
    expect(r.scenario.hovmoller.lat).toEqual([0, 2.5]);
  });

  test('the input is not changed; later overrides win', () => {
    const json = example();
    const before = JSON.stringify(json);
    const r = ok(['time.days=30', 'time.days=40'], json);
    expect(JSON.stringify(json)).toBe(before);
    expect(r.scenario.time.days).toBe(40);
  });

  test('missing sections are created, with the kind that has the key', () => {
    const r = ok(['physics.coriolis.beta=2e-11', 'physics.surfaceLayer.depth=40']);
    expect(r.scenario.physics.coriolis).toEqual({ kind: 'beta-plane', beta: 2e-11 });
    expect(r.scenario.physics.surfaceLayer).toEqual({ depth: 40, dampingDays: 2 });
  });

  test('values are validated like a file, and the message names the --set', () => {
    const errors = refused(['physics.reducedGravity=-0.05', 'time.days=abc']);
    expect(errors.map(formatIssue)).toEqual([
      "physics.reducedGravity: must be > 0 (got -0.05); reduced gravity g' in m s-2, typical 0.02-0.06 (from --set physics.reducedGravity=-0.05)",
      'time.days: must be a number (got string "abc"); length of the run in days (from --set time.days=abc)',
    ]);
  });

  test('a value that makes the scenario inconsistent is caught by the semantic checks', () => {
    const errors = refused(['time.outputEveryDays=100']);
    expect(errors[0].path).toBe('time.outputEveryDays');
    expect(errors[0].message).toContain('must be at most the run length (60 days)');
  });

  test('unknown paths name the path and the nearest valid keys', () => {
    const errors = refused(['physics.reducedGravty=0.05']);
    expect(errors).toHaveLength(1);
    expect(errors[0].path).toBe('physics.reducedGravty');
    expect(errors[0].message).toBe(
      "--set \"physics.reducedGravty=0.05\": unknown key 'reducedGravty' in physics; did you mean 'reducedGravity'? " +
        '(keys: reducedGravity, layerThickness, density, coriolis, dynamics, frictionDays, viscosity, slip, surfaceLayer, entrainment)',
    );
    expect(refused(['tme.days=3'])[0].message).toContain("unknown key 'tme' at the top level; did you mean 'time'");
    // A key that belongs to another kind of envelope than the one in the file.
    expect(refused(['wind.parts[0].envelope.direction=up'])[0].message).toContain(
      "unknown key 'direction' in wind.parts[0].envelope",
    );
  });

  test('indices out of range and keys below a plain value', () => {
    expect(refused(['wind.parts[3].enabled=false'])[0].message).toBe(
      '--set "wind.parts[3].enabled=false": wind.parts has 1 entry; index 3 is out of range (0..0)',
    );
    expect(refused(['physics.reducedGravity.x=1'])[0].message).toContain(
      'physics.reducedGravity holds a single value, so it has no key',
    );
    expect(refused(['__proto__.x=1'])[0].message).toContain("unknown key '__proto__' at the top level");
  });

  test('malformed --set texts', () => {
    expect(refused(['physics.reducedGravity'])[0].message).toBe(
      '--set "physics.reducedGravity": expected path=value, e.g. physics.reducedGravity=0.05',
    );
    expect(refused(['physics.reducedGravity='])[0].message).toContain('no value after =');
    expect(refused(['physics..reducedGravity=1'])[0].message).toContain('has an empty key');
    expect(refused(['wind.parts[x].enabled=1'])[0].message).toContain('bad path');
  });

  test('values that look like JSON but are not', () => {
    expect(refused(['physics.reducedGravity=0.05.1'])[0].message).toMatch(
      /^--set "physics.reducedGravity=0.05.1": the value "0.05.1" is not valid JSON/,
    );
    expect(refused(['hovmoller.lat=[0, 2'])[0].message).toContain('is not valid JSON');
  });
});
