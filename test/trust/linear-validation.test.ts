// Validation stays linear in the size of the input (issue 20). Unknown keys used to cost about N^2
// (each error listed every unknown key with an edit distance: 1000 keys 9.5 s, 2000 keys in
// physics over 30 s, the page frozen 101 s on 3000), 300,000 keys overflowed the stack, and the
// page listed all 3004 problem lines where the command line showed 20. Now: one walk finds the
// unknown keys (suggestions for the first 20 only), objects hold at most 10,000 keys and lists
// at most 1,000 objects, the validator's own overflow is caught, and page and command line show
// the same capped list (errors.ts issueListLines) with lines of at most 4,000 characters.
//
// Time bounds here are hang guards (docs/reliability.md: under 2 s per case), not speed targets,
// and are taken as the CPU time of this process, so a machine busy with other work does not fail
// them; the slowest case takes well under half of it on two shared cores.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { MAX_ISSUE_LINES, MAX_LINE_CHARS, issueListLines, type ScenarioIssue } from '../../model/scenario/errors.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { MAX_SUGGESTIONS } from '../../model/scenario/unknown-keys.ts';
import { validateScenario } from '../../model/scenario/validate.ts';
import { ScenarioPanel } from '../../viewer/panels/scenario-panel.ts';
import { CASE_BOUND_MS } from '../support/fuzz-kit.ts';
import { FIXTURE_TEXT } from '../support/trust-kit.ts';
import { folder, noInternals, pycno } from '../support/cli-kit.ts';

const base = () => JSON.parse(FIXTURE_TEXT) as Record<string, any>;

/** CPU milliseconds (user + system) of this process while fn runs, and what it threw. */
function cpu(fn: () => void): { ms: number; error: Error | null } {
  const t0 = process.cpuUsage();
  let error: Error | null = null;
  try {
    fn();
  } catch (e) {
    error = e as Error;
  }
  const d = process.cpuUsage(t0);
  return { ms: (d.user + d.system) / 1000, error };
}

/** The scenario text refused by the command line's reader (parseScenario), within the bound, with a clear message. */
function refusedFast(text: string): string[] {
  const { ms, error } = cpu(() => parseScenario(text, 'many.json'));
  expect(error, 'must be refused').not.toBeNull();
  expect(error!.name).toMatch(/InputError|ScenarioError/);
  expect(ms, `took ${ms.toFixed(0)} ms of CPU`).toBeLessThan(CASE_BOUND_MS);
  const lines = error!.message.split('\n');
  for (const l of lines) expect(l.length).toBeLessThanOrEqual(MAX_LINE_CHARS);
  expect(error!.message).not.toMatch(/Maximum call stack|RangeError|undefined/);
  return lines;
}

/** 100,000 unknown keys: 9,000 in each of eleven objects (the top level and ten sections), under the 10,000-per-object cap. */
function spreadKeys(total: number): Record<string, any> {
  const s = base();
  const places = [
    s,
    s.basin,
    s.physics,
    s.time,
    s.wind,
    s.hovmoller,
    s.wind.parts[0],
    s.wind.parts[0].source,
    s.wind.parts[0].envelope,
    s.probes[0],
    s.probes[1],
  ];
  for (let k = 0; k < total; k++) places[k % places.length][`extra${k}`] = k;
  return s;
}

describe('unknown keys: linear, and the same capped list everywhere', () => {
  it('100,000 unknown keys spread over eleven objects: refused within the bound, 20 lines and the count', () => {
    const lines = refusedFast(JSON.stringify(spreadKeys(100_000)));
    expect(lines).toHaveLength(MAX_ISSUE_LINES + 1);
    expect(lines[MAX_ISSUE_LINES]).toBe(
      '... and 99,980 more problems (100,000 in all); fix the first ones and check again',
    );
    expect(lines[0]).toMatch(
      /^many\.json: line 1: [\w.[\]]*extra\d+: unknown key 'extra\d+' (at the top level|in [\w.[\]]+); did you mean|\(allowed: /,
    );
  });

  it('100,000 and 300,000 keys in one object (300,000 overflowed the stack): refused by the per-object cap', () => {
    for (const n of [100_000, 300_000]) {
      const s = base();
      for (let k = 0; k < n; k++) s.physics[`k${k}`] = k;
      const lines = refusedFast(JSON.stringify(s));
      expect(lines).toEqual([
        `many.json: line 1: physics: the object holds ${(n + 3).toLocaleString('en-US')} keys; at most 10,000 (a scenario's objects have a few dozen)`,
      ]);
    }
  });

  it('9,990 unknown keys in physics (2000 took over 30 s): every one found, within the bound', () => {
    const s = base();
    for (let k = 0; k < 9_990; k++) s.physics[`extra${k}`] = k;
    const lines = refusedFast(JSON.stringify(s, null, 1));
    expect(lines.at(-1)).toBe('... and 9,970 more problems (9,990 in all); fix the first ones and check again');
    expect(lines[0]).toMatch(
      /physics\.extra0: unknown key 'extra0' in physics \(allowed: reducedGravity, layerThickness/,
    );
  });

  it('a thousand wind parts with a hundred unknown keys each (the validator alone would overflow): every key counted', () => {
    const s = base();
    const part = s.wind.parts[0];
    s.wind.parts = Array.from({ length: 1000 }, () => {
      const p = structuredClone(part);
      for (let k = 0; k < 100; k++) p[`x${k}`] = k;
      return p;
    });
    const lines = refusedFast(JSON.stringify(s));
    expect(lines.at(-1)).toBe('... and 99,980 more problems (100,000 in all); fix the first ones and check again');
  });

  it('"did you mean" for the first 20 unknown keys only; the later ones just name the key', () => {
    const s = base();
    for (let k = 0; k < 30; k++) s.physics[`reducedGravty${k}`] = k;
    const r = validateScenario(s);
    expect(r.ok).toBe(false);
    const unknown = (r as { errors: ScenarioIssue[] }).errors.filter((i) => /unknown key/.test(i.message));
    expect(unknown).toHaveLength(30);
    expect(unknown.filter((i) => /did you mean 'reducedGravity'\?/.test(i.message))).toHaveLength(MAX_SUGGESTIONS);
    expect(unknown[MAX_SUGGESTIONS].message).toBe(`unknown key 'reducedGravty${MAX_SUGGESTIONS}' in physics`);
  });

  it('lists: 1,001 wind parts, 1,001 probes refused at once; 10,000 wind parts of a wrong kind (the validator overflowed) too', () => {
    const s = base();
    s.wind.parts = Array.from({ length: 1001 }, () => structuredClone(s.wind.parts[0]));
    expect(refusedFast(JSON.stringify(s))).toEqual([
      'many.json: line 1: wind.parts: holds 1001 items with objects among them; a list of objects (wind parts, land shapes, probes) holds at most 1000',
    ]);
    const p = base();
    p.probes = Array.from({ length: 1001 }, (_, k) => ({ name: `p${k}`, lon: 160, lat: 0 }));
    expect(refusedFast(JSON.stringify(p))[0]).toMatch(/probes: holds 1001 items with objects among them/);
    const w = base();
    w.wind.parts = Array.from({ length: 10_000 }, () => ({ ...structuredClone(w.wind.parts[0]), kind: 'fixd' }));
    expect(refusedFast(JSON.stringify(w))[0]).toMatch(/wind\.parts: holds 10000 items/);
  });

  it('1,000 parts of a wrong kind: every one named (the oneOf bookkeeping is linear too)', () => {
    const s = base();
    s.wind.parts = Array.from({ length: 1000 }, () => ({ ...structuredClone(s.wind.parts[0]), kind: 'fixd' }));
    const lines = refusedFast(JSON.stringify(s));
    expect(lines[0]).toMatch(
      /wind\.parts\[0\]\.kind: unknown kind "fixd"; allowed: 'fixed', 'bursts', 'answering'; did you mean 'fixed'\?$/,
    );
    expect(lines.at(-1)).toBe('... and 980 more problems (1,000 in all); fix the first ones and check again');
  });

  it('more errors than the schema validator can hold: the first problems and a line that says the list is incomplete', () => {
    // Handed over as an object (the page's edited scenario), so no text limit applies: 1,000 land
    // polygons of 200 corners, every corner text instead of numbers.
    const s = base();
    s.basin.land = Array.from({ length: 1000 }, () => ({
      kind: 'polygon',
      points: Array.from({ length: 200 }, () => ['a', 'b']),
    }));
    const { ms, error } = cpu(() => {
      const r = validateScenario(s);
      expect(r.ok).toBe(false);
      const lines = issueListLines((r as { errors: ScenarioIssue[] }).errors);
      expect(lines[0]).toMatch(/^basin\.land\[0\]/);
      expect(lines.length).toBeLessThanOrEqual(MAX_ISSUE_LINES + 2);
      expect(lines[0]).toBe('basin.land[0].points[0][0]: must be a number (got string "a"); longitude, degrees east');
      expect(lines.at(-1)).toBe(
        '... and more: so many values are wrong that the schema check stopped at the first problem in each part; fix these and check again',
      );
    });
    expect(error).toBeNull();
    expect(ms).toBeLessThan(CASE_BOUND_MS);
  });

  it('nesting 100,000 deep in an object handed over without text: refused by the iterative shape check, no stack overflow', () => {
    const s = base();
    let deep: Record<string, unknown> = {};
    s.physics.deep = deep;
    for (let k = 0; k < 100_000; k++) {
      deep.a = {};
      deep = deep.a as Record<string, unknown>;
    }
    const r = validateScenario(s);
    expect(r.ok).toBe(false);
    expect((r as { errors: ScenarioIssue[] }).errors[0].message).toBe(
      'nested deeper than 64 levels; a scenario needs only a few',
    );
  });
});

describe('the page and the command line show the same list', () => {
  let dir: string;
  beforeAll(() => {
    dir = folder('linear');
  });

  it('a 3,004-problem file: the page lists the 20 lines and the count the command line prints (it listed all 3,004)', async () => {
    const s = base();
    for (let k = 0; k < 3000; k++) s[`extra${k}`] = k;
    s.physics.reducedGravity = -1;
    s.time.days = 'long';
    s.basin.resolution = 0;
    s.seed = [];
    const text = JSON.stringify(s, null, 2);
    const { writeFileSync } = await import('node:fs');
    writeFileSync(join(dir, 'many.json'), text);
    const r = pycno(dir, ['check', 'many.json']);
    expect(r.code).toBe(2);
    noInternals(r);
    const cliLines = r.stderr
      .trimEnd()
      .split('\n')
      .map((l) => l.replace(/^pycno: /, ''));
    const page = ScenarioPanel.checkText(text, 'many.json');
    expect(page.ok).toBe(false);
    expect((page as { lines: string[] }).lines).toEqual(cliLines);
    expect(cliLines).toHaveLength(MAX_ISSUE_LINES + 1);
    expect(cliLines.at(-1)).toBe('... and 2,984 more problems (3,004 in all); fix the first ones and check again');
  });

  it('a --set path of 40,000 characters: the key and path shown cut in the middle, every line at most 4,000 characters (it was one 40 KB line)', () => {
    const long = `physics.${'x'.repeat(40_000)}=1`;
    const r = pycno(dir, ['check', 'tiny.json', '--set', long]);
    expect(r.code).toBe(2);
    noInternals(r);
    for (const line of r.stderr.trimEnd().split('\n'))
      expect(line.length).toBeLessThanOrEqual(MAX_LINE_CHARS + 'pycno: '.length);
    expect(r.stderr).toMatch(/unknown key 'x+ \.\.\. x+ \(40,000 characters\)' in physics/);
    expect(r.stderr.length).toBeLessThan(1000);
    // A line that is long for other reasons is cut at the cap, saying so.
    expect(issueListLines([{ path: 'p', message: 'y'.repeat(50_000) }])[0]).toMatch(
      /^p: y+ \.\.\. \(46,\d{3} more characters not shown\)$/,
    );
    expect(issueListLines([{ path: 'p', message: 'y'.repeat(50_000) }])[0].length).toBeLessThanOrEqual(MAX_LINE_CHARS);
  });

  it('the shipped scenarios are untouched by all this: each is valid', () => {
    for (const f of ['westerly-burst', 'kelvin-pulse', 'random-bursts', 'monsoon-reversal']) {
      const text = readFileSync(new URL(`../../configs/${f}.json`, import.meta.url), 'utf8');
      expect(() => parseScenario(text, `${f}.json`)).not.toThrow();
    }
  });
});
