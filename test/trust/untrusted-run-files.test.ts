// Run files from someone else are untrusted (issue 19): crafted and damaged NetCDF files through
// `pycno rerun`, `pycno run` (a restart or run output as the start), `pycno compare` and
// `pycno report`, each a real invocation in a temporary folder. A file's embedded scenario may
// name no file the user did not allow (--inputs DIR, regular files inside it); a restart or run
// file with a missing, retyped, reshaped or out-of-order variable is refused with exit 2 and a
// message that names the variable, and no output file is left.

import { mkdirSync, readFileSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { folder, noInternals, pycno, refusedWith, type Ran } from '../support/cli-kit.ts';
import { dropVariable, edited, retype, setScenario, variable, type EditableFile } from '../support/nc-edit.ts';

let dir: string;
let run: Uint8Array;
let restart: Uint8Array;
let scenario: Record<string, any>;

beforeAll(() => {
  dir = folder('untrusted');
  const r = pycno(dir, ['run', 'tiny.json', '--out', 'good.nc', '--restart-out', 'good-restart.nc', '--quiet']);
  expect(r.code).toBe(0);
  run = new Uint8Array(readFileSync(join(dir, 'good.nc')));
  restart = new Uint8Array(readFileSync(join(dir, 'good-restart.nc')));
  scenario = JSON.parse(readFileSync(join(dir, 'tiny.json'), 'utf8'));
});

/** A run file whose embedded scenario is `sc` (hash matching: crafted, not damaged). */
async function crafted(name: string, change: (sc: Record<string, any>) => void, into = dir): Promise<string> {
  const sc = JSON.parse(
    String((await import('../../model/io/netcdf-read.ts')).readNetcdf(run).attributes.pycno_scenario.value),
  );
  change(sc);
  writeFileSync(join(into, name), await edited(run, (f) => setScenario(f, JSON.stringify(sc, null, 2))));
  return name;
}

/** Nothing but the inputs: no output, no temporary file, no lock. */
function leftNothing(before: string[], where = dir): void {
  expect(readdirSync(where).sort()).toEqual(before);
}

describe('pycno rerun: the embedded scenario names no file the user did not allow', () => {
  it('a restart path that is a device (/dev/zero): refused at once without --inputs, with --inputs . and with --inputs /', async () => {
    const f = await crafted('devzero.nc', (sc) => (sc.initial = { kind: 'restart', path: '/dev/zero' }));
    const before = readdirSync(dir).sort();
    for (const [extra, why] of [
      [[], /give --inputs DIR to allow the regular files inside folder DIR$/],
      [['--inputs', '.'], /it lies outside --inputs \.; only files inside that folder are read$/],
      [['--inputs', '/'], /it is not a regular file \(a character device\); only regular files are read$/],
    ] as const) {
      const r = pycno(dir, ['rerun', f, ...extra, '--out', 'never.nc'], 20_000);
      refusedWith(r, /^pycno: devzero\.nc#pycno_scenario: initial\.path: cannot read the restart file \/dev\/zero: /);
      expect(r.stderr.trimEnd()).toMatch(why);
      expect(r.ms).toBeLessThan(20_000);
    }
    leftNothing(before);
  }, 90_000);

  it('a path that climbs out of the allowed folder (../), and a link inside it that leads out: refused', async () => {
    const sub = join(dir, 'bundle');
    mkdirSync(sub);
    writeFileSync(join(dir, 'outside-restart.nc'), restart);
    symlinkSync('../outside-restart.nc', join(sub, 'inside-link.nc'));
    const climb = await crafted(
      'climb.nc',
      (sc) => (sc.initial = { kind: 'restart', path: '../outside-restart.nc' }),
      sub,
    );
    const link = await crafted('link.nc', (sc) => (sc.initial = { kind: 'restart', path: 'inside-link.nc' }), sub);
    refusedWith(
      pycno(dir, ['rerun', `bundle/${climb}`, '--inputs', 'bundle']),
      /initial\.path: cannot read the restart file .*outside-restart\.nc: it lies outside --inputs bundle; only files inside that folder are read$/,
    );
    refusedWith(
      pycno(dir, ['rerun', `bundle/${link}`, '--inputs', 'bundle']),
      /initial\.path: cannot read the restart file .*inside-link\.nc: it lies outside --inputs bundle \(it leads to .*outside-restart\.nc\)/,
    );
  });

  it('a wind file and a spin-up scenario named by absolute paths: refused without --inputs', async () => {
    writeFileSync(join(dir, 'spin.json'), readFileSync(join(dir, 'tiny.json')));
    const wind = await crafted('wind-abs.nc', (sc) => {
      sc.wind.parts[0].source = { kind: 'file', format: 'csv', path: join(dir, 'tiny.json') };
    });
    const spin = await crafted(
      'spin-abs.nc',
      (sc) => (sc.initial = { kind: 'spinup', scenario: join(dir, 'spin.json') }),
    );
    refusedWith(
      pycno(dir, ['rerun', wind]),
      /^pycno: wind-abs\.nc#pycno_scenario: wind\.parts\[0\]\.source\.path: cannot read the wind file .*tiny\.json: the run file's scenario names this file/,
    );
    refusedWith(
      pycno(dir, ['rerun', spin]),
      /^pycno: spin-abs\.nc#pycno_scenario: initial\.scenario: cannot read the spin-up scenario .*spin\.json: the run file's scenario names this file/,
    );
  });

  it('an honest run from a restart: refused without --inputs (the path is named), a match with --inputs', () => {
    const sc = {
      ...scenario,
      initial: { kind: 'restart', path: 'good-restart.nc' },
      time: { ...scenario.time, days: 2 },
    };
    writeFileSync(join(dir, 'cont.json'), JSON.stringify(sc));
    expect(pycno(dir, ['run', 'cont.json', '--out', 'cont.nc', '--quiet']).code).toBe(0);
    refusedWith(
      pycno(dir, ['rerun', 'cont.nc']),
      /^pycno: cont\.nc#pycno_scenario: initial\.path: cannot read the restart file .*good-restart\.nc: the run file's scenario names this file/,
    );
    const ok = pycno(dir, ['rerun', 'cont.nc', '--inputs', '.']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/^match /);
  });

  it('--inputs naming no folder: exit 2', () => {
    refusedWith(
      pycno(dir, ['rerun', 'good.nc', '--inputs', 'no-such-folder']),
      /^pycno: --inputs no-such-folder: no such folder$/,
    );
  });
});

describe('an embedded scenario of 3,000 unknown keys', () => {
  // All three commands read the embedded scenario through the one scenario validator
  // (rerun: parseScenario in the engine's load; report: validateScenario in model/report; compare
  // only compares the scenario texts). The validator was quadratic in the number of unknown keys
  // (400 keys: 5 s) and these two cases were known failures until it was made linear
  // (model/scenario/unknown-keys.ts): 20 s is a hang guard, not a speed target.
  const many = () =>
    crafted('many-keys.nc', (sc) => {
      for (let k = 0; k < 3000; k++) sc[`extra${k}`] = k;
    });
  const answers = (r: Ran) => {
    expect(r.code, r.stderr.slice(0, 300)).not.toBeNull(); // not killed by the timeout
    expect(r.ms).toBeLessThan(20_000);
    noInternals(r);
  };

  it('pycno rerun answers within 20 s (exit 2: unknown keys)', async () => {
    const r = pycno(dir, ['rerun', await many()], 20_000);
    answers(r);
    expect(r.code).toBe(2);
  }, 40_000);

  it('pycno report answers within 20 s', async () => {
    answers(pycno(dir, ['report', await many(), '--out', 'many.html'], 20_000));
  }, 40_000);

  it('pycno compare answers within 20 s', async () => {
    const r = pycno(dir, ['compare', 'good.nc', await many()], 20_000);
    answers(r);
    expect(r.stdout).toMatch(/extra0/);
  }, 40_000);
});

/** A restart (or run output) used as the start of a run: each must be refused naming the variable. */
const BAD_STARTS: Array<[string, 'restart' | 'run', (f: EditableFile) => void, RegExp]> = [
  [
    'restart, time as text',
    'restart',
    (f) => {
      retype(f, 'time', 'char').values = 'x';
    },
    /variable 'time' is char; a Pycno restart file has it as double$/,
  ],
  [
    'restart, h as int16',
    'restart',
    (f) => void retype(f, 'h', 'short'),
    /variable 'h' is short; a Pycno restart file has it as double$/,
  ],
  ['restart, no h', 'restart', (f) => dropVariable(f, 'h'), /has no variable 'h'; a Pycno restart file holds it$/],
  [
    'restart, no time',
    'restart',
    (f) => dropVariable(f, 'time'),
    /has no variable 'time'; a Pycno restart file holds it$/,
  ],
  [
    'restart, no steps',
    'restart',
    (f) => dropVariable(f, 'steps'),
    /has no variable 'steps'; a Pycno restart file holds it$/,
  ],
  [
    'restart, u on other dimensions',
    'restart',
    (f) => {
      variable(f, 'u').dimensions = ['x_padded', 'y_padded'];
    },
    /variable 'u' has dimensions \(x_padded, y_padded\); a Pycno restart file has it on \(y_padded, x_padded\)$/,
  ],
  [
    'restart, NaN in h',
    'restart',
    (f) => {
      (variable(f, 'h').values as Float64Array)[100] = NaN;
    },
    /variable 'h' has NaN at index 100 \(cell \(13, 1\) at 163\.50°E, 8\.50°S\); a start must be finite$/,
  ],
  [
    'restart, a fractional step count',
    'restart',
    (f) => {
      (variable(f, 'steps').values as Float64Array)[0] = 2.5;
    },
    /variable 'steps' is 2\.5; a step count is a whole number >= 0$/,
  ],
  [
    'restart, history count 7',
    'restart',
    (f) => {
      (variable(f, 'history_count').values as Float64Array)[0] = 7;
    },
    /variable 'history_count' is 7; it must be 0, 1 or 2$/,
  ],
  [
    'run output, time as text',
    'run',
    (f) => void retype(f, 'time', 'char'),
    /variable 'time' is char; a Pycno run output has it as double$/,
  ],
  [
    'run output, time reversed',
    'run',
    (f) => void (variable(f, 'time').values as Float64Array).reverse(),
    /variable 'time' does not increase: record 1 is day 5, after day 6$/,
  ],
  [
    'run output, h_anom as int16',
    'run',
    (f) => void retype(f, 'h_anom', 'short'),
    /variable 'h_anom' is short; a Pycno run output has it as float$/,
  ],
  [
    'run output, no u',
    'run',
    (f) => dropVariable(f, 'u'),
    /has no variable 'u'; a run output used as a start must hold h_anom, u and v$/,
  ],
  [
    'run output, no time',
    'run',
    (f) => dropVariable(f, 'time'),
    /has no variable 'time'; a Pycno run output holds it$/,
  ],
  [
    'run output, lat as text',
    'run',
    (f) => void retype(f, 'lat', 'char'),
    /variable 'lat' is char; a Pycno run output has it as double$/,
  ],
];

describe('pycno run from a hostile restart or run file: exit 2 naming the variable, no output', () => {
  for (const [name, kind, change, message] of BAD_STARTS) {
    it(name, async () => {
      const file = `start-${name.replace(/\W+/g, '-')}.nc`;
      writeFileSync(join(dir, file), await edited(kind === 'restart' ? restart : run, change));
      const json = `from-${file}.json`;
      writeFileSync(join(dir, json), JSON.stringify({ ...scenario, initial: { kind: 'restart', path: file } }));
      const before = readdirSync(dir).sort();
      refusedWith(
        pycno(dir, ['run', json, '--out', 'never.nc', '--restart-out', 'never-restart.nc']),
        new RegExp(
          `^pycno: ${json.replace(/\./g, '\\.')}: initial\\.path: ${file.replace(/\./g, '\\.')}: ${message.source}`,
        ),
      );
      leftNothing(before);
    });
  }
});

/** Damaged or crafted run files for compare and report. */
const BAD_RUNS: Array<[string, (f: EditableFile) => void, RegExp]> = [
  ['time as text', (f) => void retype(f, 'time', 'char'), /variable 'time' is char; a run file has it as double$/],
  [
    'time reversed',
    (f) => void (variable(f, 'time').values as Float64Array).reverse(),
    /variable 'time' does not increase: time 1 \(5\) does not follow time 0 \(6\)$/,
  ],
  [
    'time with NaN',
    (f) => {
      (variable(f, 'time').values as Float64Array)[3] = NaN;
    },
    /variable 'time' has NaN at record 3$/,
  ],
  [
    'h_anom as int16',
    (f) => void retype(f, 'h_anom', 'short'),
    /variable 'h_anom' is short; a run file has it as float$/,
  ],
  [
    'h_anom as double',
    (f) => void retype(f, 'h_anom', 'double'),
    /variable 'h_anom' is double; a run file has it as float$/,
  ],
  [
    'no h_anom',
    (f) => dropVariable(f, 'h_anom'),
    /variable 'h_anom' is missing \(the run's scenario lists it in output\.fields\)$/,
  ],
  ['no time', (f) => dropVariable(f, 'time'), /variable 'time' is missing$/],
  ['no step', (f) => dropVariable(f, 'step'), /variable 'step' is missing$/],
  ['lat as text', (f) => void retype(f, 'lat', 'char'), /variable 'lat' is char; a run file has it as double$/],
  [
    'ocean as double',
    (f) => void retype(f, 'ocean', 'double'),
    /variable 'ocean' is double; a run file has it as byte$/,
  ],
  ['no energy series', (f) => dropVariable(f, 'energy'), /variable 'energy' is missing$/],
  [
    'a probe series as int',
    (f) => void retype(f, 'probe_u', 'int'),
    /variable 'probe_u' is int; a run file has it as float$/,
  ],
  [
    'Hovmoller rows as double',
    (f) => void retype(f, 'hovmoller_h_anom', 'double'),
    /variable 'hovmoller_h_anom' is double; a run file has it as float$/,
  ],
];

describe('pycno compare and pycno report of a damaged run file: exit 2 naming the variable, no output', () => {
  for (const [name, change, message] of BAD_RUNS) {
    it(name, async () => {
      const file = `bad-${name.replace(/\W+/g, '-')}.nc`;
      writeFileSync(join(dir, file), await edited(run, change));
      const before = readdirSync(dir).sort();
      const line = new RegExp(`^pycno: ${file.replace(/\./g, '\\.')}: damaged Pycno run file: ${message.source}`);
      refusedWith(pycno(dir, ['compare', 'good.nc', file, '--out', 'never-diff.nc']), line);
      refusedWith(pycno(dir, ['report', file, '--out', 'never.html']), line);
      leftNothing(before);
    });
  }
});
