// Messages that say what happened (issue 20): a formula with a JavaScript word in it, a flat
// sum under the length limit, numbers on the command line written as the scenario reader would
// refuse them, a rerun of a damaged run file, and a sweep refused, pointed at a file, or stopped
// with Ctrl-C. Each command-line case is a real `pycno` invocation in a temporary folder.

import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { compileFormula } from '../../model/forcing/formula.ts';
import { filesLike, folder, noInternals, pycno, pycnoAsync, refusedWith, when } from '../support/cli-kit.ts';
import { dropVariable, edited, retype, variable } from '../support/nc-edit.ts';

let dir: string;
let scenario: Record<string, any>;
let run: Uint8Array;

beforeAll(() => {
  dir = folder('messages');
  scenario = JSON.parse(readFileSync(join(dir, 'tiny.json'), 'utf8'));
  const r = pycno(dir, ['run', 'tiny.json', '--out', 'good.nc', '--quiet']);
  expect(r.code, r.stderr).toBe(0);
  run = new Uint8Array(readFileSync(join(dir, 'good.nc')));
});

function formulaScenario(name: string, expression: string): string {
  const sc = structuredClone(scenario);
  sc.wind.parts[0].source = { kind: 'shaped', shape: { kind: 'formula', expression }, x: 0.05, y: 0 };
  writeFileSync(join(dir, name), JSON.stringify(sc, null, 2));
  return name;
}

describe('formula messages say what is wrong and where', () => {
  it('`new Date()`: an unknown name, a word of JavaScript, at character 0 (it said "several separated by commas or semicolons")', () => {
    const r = pycno(dir, ['check', formulaScenario('new-date.json', 'new Date()')]);
    refusedWith(
      r,
      /^pycno: new-date\.json: wind part 1 \('westerly patch'\): .*unknown name 'new' \(a word of JavaScript; formulas know only numbers, lon, lat, t, pi, e, operators and the functions of docs\/wind\.md\) at character 0$/,
    );
    expect(r.stderr).not.toMatch(/separated by commas/);
  });

  it('two values side by side: an operator is missing, and where; real commas and semicolons are still called that', () => {
    expect(() => compileFormula('lat lon')).toThrow(
      'an operator is missing before character 4 (a formula is one expression: two values side by side need + - * / or ^ between them)',
    );
    expect(() => compileFormula('typeof lat')).toThrow(/^unknown name 'typeof' \(a word of JavaScript/);
    expect(() => compileFormula('sin(lat), 2')).toThrow(
      'a formula must be a single expression (found several separated by commas or semicolons) at character 8',
    );
    expect(() => compileFormula('lat; lon')).toThrow(/separated by commas or semicolons\) at character 3$/);
  });

  it('a flat 1+1+...+1 of 999 terms (under the length limit) runs; it was refused as "nested too deeply"', () => {
    const sum = Array.from({ length: 999 }, () => '1').join('+');
    expect(sum.length).toBeLessThan(2000);
    expect(compileFormula(sum).evaluate(0, 0, 0)).toBe(999);
    // 2 - lat - 2 - lat ...: left to right, the same as written out by hand.
    const terms = Array.from({ length: 600 }, (_, k) => (k % 2 ? 'lat' : '2'));
    let expected = 2;
    for (let k = 1; k < terms.length; k++) expected -= k % 2 ? 0.5 : 2;
    expect(compileFormula(terms.join('-')).evaluate(0, 0.5, 0)).toBe(expected);
    const r = pycno(dir, [
      'check',
      formulaScenario('flat-sum.json', `0.0001 * (${Array.from({ length: 300 }, () => 'lat').join(' + ')}) / 300`),
    ]);
    expect(r.code, r.stderr).toBe(0);
    noInternals(r);
  });
});

describe('numbers on the command line follow the scenario reader: JSON decimals only', () => {
  it('--days 0x10 (it ran 16 days), +16, 016, Infinity: refused; 16, 1.6e1 accepted', () => {
    for (const v of ['0x10', '+16', '016', 'Infinity', '1e999', '16days', '']) {
      refusedWith(
        pycno(dir, ['check', 'tiny.json', '--days', v]),
        new RegExp(
          `^pycno: --days: expected a number of days > 0 \\(got '${v.replace(/[+]/g, '\\+')}'\\); write it as a scenario file writes numbers, e.g\\. 30, 2\\.5 or 1e2 \\(no hex, no leading '\\+' or zeros\\)$`,
        ),
      );
    }
    for (const v of ['16', '1.6e1']) {
      const r = pycno(dir, ['check', 'tiny.json', '--days', v]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toMatch(/^steps +48 for 16 days$/m);
    }
  });

  it('--threads 0x2 and --jobs 0x2 refused the same way; --threads 2 accepted', () => {
    refusedWith(
      pycno(dir, ['run', 'tiny.json', '--threads', '0x2', '--out', 'never.nc']),
      /^pycno: --threads: must be a whole number from 1 to \d+, or 'auto' \(got '0x2'\)$/,
    );
    const jobs = pycno(dir, [
      'sweep',
      'tiny.json',
      '--vary',
      'physics.reducedGravity=0.02,0.03',
      '--jobs',
      '0x2',
      '--out',
      'never',
    ]);
    expect(jobs.code).toBe(2);
    expect(jobs.stderr).toMatch(/^pycno sweep: --jobs needs a whole number >= 1$/m);
    const ok = pycno(dir, ['run', 'tiny.json', '--threads', '2', '--out', 'threads.nc', '--quiet']);
    expect(ok.code, ok.stderr).toBe(0);
  });
});

describe('pycno rerun of a damaged run file: exit 2 naming the variable (it was exit 1 "differs")', () => {
  for (const [name, change, line] of [
    [
      'no h_anom',
      (f) => dropVariable(f, 'h_anom'),
      /variable 'h_anom' is missing \(the run's scenario lists it in output\.fields\)$/,
    ],
    [
      'h_anom as int16',
      (f) => void retype(f, 'h_anom', 'short'),
      /variable 'h_anom' is short; a run file has it as float$/,
    ],
    [
      'h_anom with lat and lon swapped',
      (f) => {
        variable(f, 'h_anom').dimensions = ['time', 'lon', 'lat'];
      },
      /variable 'h_anom' has dimensions \(time, lon, lat\); a run file has it on \(time, lat, lon\)$/,
    ],
  ] as const satisfies ReadonlyArray<readonly [string, Parameters<typeof edited>[1], RegExp]>) {
    it(name, async () => {
      const file = `rerun-${name.replace(/\W+/g, '-')}.nc`;
      writeFileSync(join(dir, file), await edited(run, change));
      const r = pycno(dir, ['rerun', file]);
      refusedWith(r, new RegExp(`^pycno: ${file.replace(/\./g, '\\.')}: damaged Pycno run file: ${line.source}`));
      expect(r.stdout).not.toMatch(/differs/);
    });
  }
});

describe('pycno sweep: refused before anything runs, one line for a file as --out, an index after Ctrl-C', () => {
  it('every member with a bad --vary path (they were all launched, exit 1): refused at once, nothing made', () => {
    const r = pycno(dir, ['sweep', 'tiny.json', '--vary', 'physics.reducedGravty=0.02,0.03', '--out', 'bad-vary']);
    expect(r.code).toBe(2);
    noInternals(r);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(3);
    expect(lines[0]).toMatch(
      /^pycno sweep: bad-vary\/run-001\.nc \(physics\.reducedGravty=0\.02\): tiny\.json: line \d+: physics\.reducedGravty: --set "physics\.reducedGravty=0\.02": unknown key 'reducedGravty' in physics; did you mean 'reducedGravity'\?/,
    );
    expect(lines[2]).toBe('pycno sweep: 2 of 2 members cannot run; nothing was started');
    expect(existsSync(join(dir, 'bad-vary'))).toBe(false);
    // --list is refused the same way: a job array of failing runs helps no one.
    expect(
      pycno(dir, ['sweep', 'tiny.json', '--vary', 'physics.reducedGravty=0.02', '--out', 'bad-vary', '--list']).code,
    ).toBe(2);
  });

  it('--out naming an existing file (a raw EEXIST stack): one clear line, the file untouched', () => {
    writeFileSync(join(dir, 'results.txt'), 'keep me\n');
    refusedWith(
      pycno(dir, ['sweep', 'tiny.json', '--vary', 'physics.reducedGravity=0.02,0.03', '--out', 'results.txt']),
      /^pycno sweep: --out results\.txt is a file; pycno sweep writes its runs and index into a folder \(it is made when missing\): give a folder name$/,
    );
    expect(readFileSync(join(dir, 'results.txt'), 'utf8')).toBe('keep me\n');
  });

  it('Ctrl-C: exit 130 with what finished (and where), what stopped (its records kept) and what never started; the index says so too', async () => {
    // Three members on one thread: a quick one, then two long ones (0.1-degree cells, 60 days).
    const { child, done } = pycnoAsync(dir, [
      'sweep',
      'tiny.json',
      '--vary',
      'basin.resolution=1,0.1,0.1',
      '--days',
      '60',
      '--jobs',
      '1',
      '--out',
      'stopped',
    ]);
    await when(
      child,
      () =>
        existsSync(join(dir, 'stopped', 'run-001.nc')) &&
        readdirSync(join(dir, 'stopped')).some((f) => f.startsWith('run-002.nc.part-')),
      20,
    );
    child.kill('SIGINT');
    const r = await done;
    expect(r.code, r.stderr).toBe(130);
    noInternals(r);
    const tail = r.stderr
      .trimEnd()
      .split('\n')
      .filter((l) => l.startsWith('pycno sweep:'))
      .slice(1);
    expect(tail[0]).toBe('pycno sweep: interrupted with Ctrl-C: 1 of 3 members finished: stopped/run-001.nc');
    expect(tail[1]).toMatch(
      /^pycno sweep: 1 stopped part way, their records kept in stopped\/run-002\.nc\.part-[\d-]+$/,
    );
    expect(tail[2]).toBe('pycno sweep: 1 not started: stopped/run-003.nc');
    expect(tail[3]).toBe("pycno sweep: the index with each member's status is stopped/index.csv");
    const kept = tail[1].split(' ').pop()!;
    expect(existsSync(join(dir, kept))).toBe(true);
    expect(filesLike(join(dir, 'stopped'), 'run-003')).toEqual([]);
    const csv = readFileSync(join(dir, 'stopped', 'index.csv'), 'utf8')
      .trim()
      .split('\n');
    expect(csv[0]).toMatch(/^file,basin\.resolution,exit,status,/);
    expect(csv[1]).toMatch(/^stopped\/run-001\.nc,1,0,done,60,/);
    expect(csv[2]).toMatch(/^stopped\/run-002\.nc,0\.1,130,stopped,/);
    expect(csv[3]).toMatch(/^stopped\/run-003\.nc,0\.1,,not started,/);
  }, 120_000);
});
