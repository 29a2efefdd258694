// Hostile scenario files: the shipped scenarios and the test fixture, mutated at the value level
// (wrong types, huge and tiny numbers, long strings, deep nesting, huge arrays, prototype keys,
// keys removed and added) and at the text level (NaN and Infinity written into the JSON, numbers
// in forms JSON forbids, cuts, stray bytes, duplicate keys). Each must be refused with a clear
// input error or give a scenario that builds and steps.

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { afterAll, describe, it } from 'vitest';
import { BlowUpError } from '../../model/errors.ts';
import { buildPrepared, parseScenario } from '../../model/scenario/load-inputs.ts';
import { FIXTURE_TEXT } from '../support/engine-fixture.ts';
import { check, fuzzSeed, hostileValue, printTally, runCase } from '../support/fuzz-kit.ts';

const CONFIGS = fileURLToPath(new URL('../../configs/', import.meta.url));
const BASES: string[] = [
  FIXTURE_TEXT,
  ...readdirSync(CONFIGS)
    .filter((f) => f.endsWith('.json') && !f.includes('schema'))
    .map((f) => readFileSync(join(CONFIGS, f), 'utf8')),
];

/** Built and stepped only when small: the point is the checks, not a long run. */
const BUILD_CELLS = 6000;

type Path = (string | number)[];

function paths(v: unknown, at: Path = [], out: Path[] = []): Path[] {
  out.push(at);
  if (at.length > 12 || out.length > 5000) return out;
  if (Array.isArray(v)) v.slice(0, 50).forEach((x, k) => paths(x, [...at, k], out));
  else if (v && typeof v === 'object')
    for (const k of Object.keys(v)) paths((v as Record<string, unknown>)[k], [...at, k], out);
  return out;
}

function parentOf(root: any, p: Path): any {
  let o = root;
  for (const k of p.slice(0, -1)) o = o?.[k];
  return o;
}

interface Op {
  kind: 'set' | 'delete' | 'add' | 'wrap' | 'repeat';
  sel: number;
  key: string;
  value: unknown;
}

const op: fc.Arbitrary<Op> = fc.record({
  kind: fc.constantFrom('set', 'set', 'set', 'delete', 'add', 'wrap', 'repeat'),
  sel: fc.nat(),
  key: fc.oneof(
    fc.constantFrom('__proto__', 'constructor', 'extra', 'kind', 'x', '$schema', ''),
    fc.string({ maxLength: 8 }),
  ),
  value: hostileValue(),
});

function mutate(text: string, ops: Op[]): unknown {
  const root = { doc: JSON.parse(text) };
  for (const o of ops) {
    const all = paths(root.doc, ['doc']);
    const p = all[o.sel % all.length];
    const parent = parentOf(root, p);
    const key = p[p.length - 1];
    if (parent === null || typeof parent !== 'object') continue;
    if (o.kind === 'set') parent[key] = structuredClone(o.value);
    else if (o.kind === 'delete') {
      if (Array.isArray(parent)) parent.splice(Number(key), 1);
      else delete parent[key];
    } else if (o.kind === 'add') {
      const target = parent[key];
      if (target && typeof target === 'object' && !Array.isArray(target))
        Object.defineProperty(target, o.key, { value: o.value, enumerable: true, writable: true, configurable: true });
      else if (Array.isArray(target)) target.push(o.value);
    } else if (o.kind === 'wrap') parent[key] = [[[[parent[key]]]]];
    else if (o.kind === 'repeat') {
      // Copies, not shared references: later ops must not multiply through them.
      const one = JSON.stringify(parent[key] ?? null);
      const n = one.length > 1000 ? 3 : 500;
      if (JSON.stringify(root).length + n * one.length < 4_000_000)
        parent[key] = Array.from({ length: n }, () => JSON.parse(one));
    }
  }
  return root.doc;
}

interface TextTrick {
  kind: 'none' | 'number' | 'cut' | 'insert' | 'duplicate' | 'bom' | 'comment' | 'noise';
  at: number;
  with: string;
}

const trick: fc.Arbitrary<TextTrick> = fc.record({
  kind: fc.constantFrom('none', 'none', 'number', 'number', 'cut', 'insert', 'duplicate', 'bom', 'comment', 'noise'),
  at: fc.nat(),
  with: fc.oneof(
    fc.constantFrom(
      'NaN',
      'Infinity',
      '-Infinity',
      '1e999',
      '-1e999',
      '1e-999',
      '0x1F',
      '.5',
      '1.',
      '+1',
      '01',
      '-',
      '1e',
      '"',
      '\\u0000',
      'null',
      'true',
    ),
    fc.string({ maxLength: 6 }),
    fc.string({ unit: 'binary', maxLength: 6 }),
  ),
});

function applyTrick(text: string, t: TextTrick): string {
  switch (t.kind) {
    case 'none':
      return text;
    case 'number': {
      const nums = [...text.matchAll(/-?\d+(\.\d+)?([eE][+-]?\d+)?/g)];
      if (nums.length === 0) return text;
      const m = nums[t.at % nums.length];
      return text.slice(0, m.index) + t.with + text.slice(m.index! + m[0].length);
    }
    case 'cut':
      return text.slice(0, t.at % (text.length + 1));
    case 'insert': {
      const k = t.at % (text.length + 1);
      return text.slice(0, k) + t.with + text.slice(k);
    }
    case 'duplicate': {
      const keys = [...text.matchAll(/"(\w+)": ([^,{}[\]\n]+)/g)];
      if (keys.length === 0) return text;
      const m = keys[t.at % keys.length];
      const end = m.index! + m[0].length;
      return `${text.slice(0, end)}, ${m[0]}${text.slice(end)}`;
    }
    case 'bom':
      return `\ufeff\ufeff${text}`;
    case 'comment':
      return text.replace('{', `{ /* ${t.with} ${'*/'.repeat(t.at % 2)}`);
    case 'noise':
      return t.with.repeat(1 + (t.at % 1000));
  }
}

/** Parse, and when small enough build the model and take a few steps. */
function scenarioCase(text: string, name = 'fuzz.json'): void {
  const p = parseScenario(text, name);
  const b = p.resolved.model.basin;
  const cells = Math.round((b.lonEast - b.lonWest) / b.dLon) * Math.round((b.latNorth - b.latSouth) / b.dLat);
  const kind = p.resolved.initial.kind;
  if (cells > BUILD_CELLS || kind === 'restart' || kind === 'spinup') return;
  const { model } = buildPrepared(p, { files: new Map(), notes: [] });
  try {
    model.advance(3);
    model.checkHealth();
  } catch (e) {
    // A hostile but valid scenario may blow up; the report is then the right answer.
    if (!(e instanceof BlowUpError)) throw e;
  }
}

const scenarioText = fc
  .record({
    base: fc.nat(BASES.length - 1),
    ops: fc.array(op, { minLength: 0, maxLength: 4 }),
    trick,
    small: fc.boolean(),
  })
  .map(({ base, ops, trick: t, small }) => {
    // Most cases keep the basin small, so they get past validation into the builder.
    let text = BASES[base];
    if (small) {
      const sc = JSON.parse(text);
      sc.basin.resolution = Math.max(1, (sc.basin.lonEast - sc.basin.lonWest) / 40);
      sc.basin.resolution = sc.basin.lonEast - sc.basin.lonWest > 80 ? 4 : 2;
      text = JSON.stringify(sc);
    }
    return applyTrick(JSON.stringify(mutate(text, ops), null, 1) ?? 'null', t);
  });

describe('fuzz: hostile scenario files', () => {
  afterAll(() => printTally('scenario'));
  it('mutated scenarios: a clear input error or a model that builds and steps', () => {
    check(
      'scenario',
      fuzzSeed('scenario', 8101),
      Number(process.env.PYCNO_FUZZ_SCENARIOS ?? 3000),
      scenarioText,
      (text) => runCase('scenario', () => scenarioCase(text), text),
      (t) => (t.length > 3000 ? `${t.slice(0, 3000)}... (${t.length} chars)` : t),
    );
  });
});
