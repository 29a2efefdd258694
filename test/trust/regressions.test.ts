// Replays the failing inputs the fuzzers found (test/trust/regressions/): each one crashed, hung
// or gave an unreadable message before its fix, and must now give the clear error named here.
// Inputs too big to keep as files are rebuilt here from their recipe.

import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { validateScenario } from '../../model/scenario/validate.ts';
import { FIXTURE_TEXT } from '../support/engine-fixture.ts';
import { judge } from '../support/fuzz-kit.ts';
import { replayRegression } from '../support/regression-replay.ts';

const DIR = fileURLToPath(new URL('./regressions/', import.meta.url));

/** What each kept input must now give: a pattern of the first line of the message. */
const EXPECTED: Record<string, RegExp> = {
  // RangeError (stack overflow) in the defaults walk and the schema validator.
  'scenario-deep-nesting.json': /^scenario-deep-nesting\.json: line 36, column \d+: nesting deeper than 64 levels/,
  // RangeError: the schema validator spreads one error per bad item into a push() call.
  'scenario-many-wrong-items.json':
    /^scenario-many-wrong-items\.json: line 1: probes: holds 120000 items; at most 10000/,
  // A 94,000-character message of 500 lines.
  'scenario-500-problems.json': /^scenario-500-problems\.json: line 1: basin\.land\[0\]: must be an object/,
  // "internal error" and exit 1: a FormulaError was not recognised as bad input by the builder.
  'scenario-formula-too-deep.json':
    /^scenario-formula-too-deep\.json: wind part 1 \('westerly patch'\): formula nested too deeply: more than 50 brackets at character 50/,
  // Wind data read by netcdfjs without the bounds-checked header walk: RangeError, TypeError, RangeError.
  'netcdf-wind-dataview-range.nc': /^not a readable NetCDF classic file: (truncated|corrupt|unsupported)/,
  'netcdf-wind-bad-dimension-id.nc': /^not a readable NetCDF classic file: (truncated|corrupt|unsupported)/,
  'netcdf-wind-absurd-length.nc': /^not a readable NetCDF classic file: (truncated|corrupt|unsupported)/,
  'netcdf-wind-cut-464.nc': /^not a readable NetCDF classic file: (truncated|corrupt|unsupported)/,
};

describe('regressions found by the fuzzers', () => {
  const files = readdirSync(DIR).filter((f) => !f.startsWith('.'));
  it('every kept input has an expectation, and every expectation its input', () => {
    expect(files.sort()).toEqual(Object.keys(EXPECTED).sort());
  });
  for (const f of files) {
    it(f, () => {
      const error = replayRegression(f, new Uint8Array(readFileSync(DIR + f)));
      expect(error, 'must be refused').toBeInstanceOf(Error);
      expect(judge(error)).toBeNull();
      expect((error as Error).message.split('\n')[0]).toMatch(EXPECTED[f]);
    });
  }

  it('a CSV value of a million digits is described, not quoted (the message was 1,000,044 characters)', () => {
    const e = replayRegression(
      'csv-long-value.csv',
      new TextEncoder().encode(`lon,lat,x,y\n${'9'.repeat(1_000_000)},0,0,0`),
    ) as Error;
    expect(e.message).toBe(
      "CSV line 2, column 1 ('lon'): the value is too large for a number (a field of 1000000 characters)",
    );
  });

  it('a painted grid with an object for a coordinate says what it got (the message said [object Object]); null is refused', async () => {
    const { seriesFromGrid } = await import('../../model/forcing/gridded.ts');
    const g = { lon0: { a: 1 }, lat0: 0, dLon: 1, dLat: 1, nLon: 1, nLat: 1, x: [0], y: [0] };
    expect(() => seriesFromGrid(g as never)).toThrow(
      'painted grid longitude: the first coordinate must be a finite number (got {"a":1})',
    );
    expect(() => seriesFromGrid(null as never)).toThrow(/^painted grid: expected an object/);
  });

  it('500 problems: the first 20 lines and a count', () => {
    const e = replayRegression(
      'scenario-500-problems.json',
      new Uint8Array(readFileSync(DIR + 'scenario-500-problems.json')),
    ) as Error;
    const lines = e.message.split('\n');
    expect(lines).toHaveLength(21);
    expect(lines[20]).toBe('... and 480 more problems (500 in all); fix the first ones and check again');
  });

  it('a 20 M-character scenario (took 45 s to refuse) is refused at once, saying the limit', () => {
    const text = FIXTURE_TEXT.replace('"seed": 11', `"seed": 11, "notes": "${'x'.repeat(20 * 1024 * 1024)}"`);
    expect(() => parseScenario(text, 'huge.json')).toThrow(
      /^huge\.json: the file is 20\.0 M characters long; a scenario file is at most 16 M/,
    );
  });

  it('deep nesting handed over as an object (the page, not a text) is refused, not a stack overflow', () => {
    let v: unknown = 1;
    for (let k = 0; k < 20_000; k++) v = [v];
    const sc = JSON.parse(FIXTURE_TEXT);
    sc.wind.parts[0].source = v;
    const r = validateScenario(sc);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0].message).toMatch(/nested deeper than 64 levels/);
  });
});
