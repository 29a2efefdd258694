import { describe, expect, test } from 'vitest';
import {
  formatIssue,
  loadScenario,
  parseScenarioText,
  ScenarioError,
  validateScenarioText,
} from '../../model/scenario/index.ts';
import { InputError } from '../../model/errors.ts';
import { exampleText } from '../support/scenario-example.ts';

function syntaxError(text: string): string {
  const r = parseScenarioText(text, 'bad.json');
  if (r.ok) throw new Error('expected a syntax error');
  expect(r.errors).toHaveLength(1);
  return formatIssue(r.errors[0]);
}

describe('JSON syntax errors give the file, line and column', () => {
  test('missing comma between members', () => {
    const text = '{\n  "format": "pycno-scenario/1",\n  "name": "x"\n  "basin": {}\n}';
    expect(syntaxError(text)).toBe(
      'bad.json: line 4, column 3: unexpected character "\\"": expected , or } after the value of "name"',
    );
  });

  test('trailing comma', () => {
    expect(syntaxError('{\n  "a": [1, 2,\n  ]\n}')).toBe(
      'bad.json: line 3, column 3: trailing comma before ]: remove the last comma',
    );
    expect(syntaxError('{"a": 1,\n}')).toBe(
      'bad.json: line 2, column 1: trailing comma before }: remove the last comma',
    );
  });

  test('unterminated string points at its opening quote', () => {
    expect(syntaxError('{\n  "name": "open\n}')).toBe(
      'bad.json: line 2, column 11: unterminated string: a closing " is missing',
    );
  });

  test('comments, single quotes, bare words, bad numbers', () => {
    expect(syntaxError('{\n  // note\n  "a": 1\n}')).toBe(
      'bad.json: line 2, column 3: comments are not allowed in JSON; put notes in "description"',
    );
    expect(syntaxError("{'a': 1}")).toBe(
      'bad.json: line 1, column 2: unexpected character "\'": expected a key in double quotes',
    );
    expect(syntaxError('{"a": \'x\'}')).toContain('line 1, column 7: strings must use double quotes');
    expect(syntaxError('{"dynamics": linear}')).toBe(
      'bad.json: line 1, column 14: unexpected word \'linear\': expected a value (a number, a "string", true, false, null, { or [)',
    );
    expect(syntaxError('{"days": 030}')).toContain('line 1, column 10: bad number');
    expect(syntaxError('{"days": .5}')).toContain('line 1, column 10: unexpected character "."');
  });

  test('duplicate keys are refused (JSON.parse would keep the last silently)', () => {
    expect(syntaxError('{\n  "name": "a",\n  "name": "b"\n}')).toBe(
      'bad.json: line 3, column 3: duplicate key "name" (first at line 2)',
    );
  });

  test('unclosed object and empty file', () => {
    expect(syntaxError('{\n  "a": {\n    "b": 1\n')).toBe(
      'bad.json: line 4, column 1: unexpected end of file: the object opened at line 2 is not closed with }',
    );
    expect(syntaxError('  \n')).toContain('the file is empty');
  });

  test('values are read exactly as JSON.parse reads them', () => {
    const text = '{"a": [1, -2.5e3, 0, true, false, null], "b": {"c": "x\\ty\\u00e9\\"/"}, "__proto__": {"p": 1}}';
    const r = parseScenarioText(text);
    if (!r.ok) throw new Error(formatIssue(r.errors[0]));
    expect(r.json).toEqual(JSON.parse(text));
    // "__proto__" stays a plain key and does not change the prototype.
    expect(Object.getPrototypeOf(r.json)).toBe(Object.prototype);
    expect(Object.keys(r.json as object)).toContain('__proto__');
  });
});

describe('validation issues of a file carry its name and the line of the key', () => {
  test('line numbers point at the offending key', () => {
    const text = exampleText.replace('"reducedGravity": 0.03', '"reducedGravity": -0.03');
    const r = validateScenarioText(text, 'example-minimal.json');
    if (r.ok) throw new Error('expected an error');
    const line = text.split('\n').findIndex((l) => l.includes('"reducedGravity"')) + 1;
    expect(formatIssue(r.errors[0])).toBe(
      `example-minimal.json: line ${line}: physics.reducedGravity: must be > 0 (got -0.03); reduced gravity g' in m s-2, typical 0.02-0.06`,
    );
  });

  test('loadScenario throws an InputError listing every issue', () => {
    const text = exampleText
      .replace('"reducedGravity": 0.03', '"reducedGravity": -0.03')
      .replace('"days": 60', '"days": -1');
    let caught: unknown;
    try {
      loadScenario(text, 's.json');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ScenarioError);
    expect(caught).toBeInstanceOf(InputError);
    const err = caught as ScenarioError;
    expect(err.issues.map((i) => i.path)).toEqual(['physics.reducedGravity', 'time.days']);
    expect(err.message).toMatch(
      /^2 problems in the scenario:\n {2}s\.json: line \d+: physics\.reducedGravity: must be > 0/,
    );
  });
});
