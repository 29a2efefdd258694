// Hostile formulas, painted grids, CSV wind files and NetCDF files (wind data, restarts, run
// outputs): generated and mutated, each must give a valid result or a clear error, within the
// per-case hang bound (fuzz-kit.ts). NetCDF files are cut at every offset of the header and at
// sampled offsets of the data, their bytes overwritten, their dimension lengths, counts and
// offsets set to absurd values, their magic changed and NaN/Inf written into their data.

import fc from 'fast-check';
import { afterAll, beforeAll, describe, it } from 'vitest';
import { parseWindCsv } from '../../model/forcing/csv.ts';
import { compileFormula } from '../../model/forcing/formula.ts';
import { readNetcdfVectors, seriesFromGrid } from '../../model/forcing/gridded.ts';
import type { GriddedVectors } from '../../model/forcing/spec.ts';
import { Grid } from '../../model/grid.ts';
import { NC_DOUBLE, NC_FLOAT } from '../../model/io/netcdf-format.ts';
import { readNetcdf } from '../../model/io/netcdf-read.ts';
import { writeNetcdfToMemory } from '../../model/io/netcdf-writer.ts';
import { readStartFile, writeRestart } from '../../model/io/restart.ts';
import { readRun } from '../../model/io/run-import.ts';
import { buildModel } from '../../model/scenario/build.ts';
import { parseScenario } from '../../model/scenario/load-inputs.ts';
import { FIXTURE, FIXTURE_TEXT } from '../support/engine-fixture.ts';
import { cli } from '../support/trust-kit.ts';
import { check, fuzzSeed, hostileValue, printTally, runCase, tallies } from '../support/fuzz-kit.ts';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { EARTH } from '../../model/config.ts';

const runs = (name: string, n: number) => Number(process.env[`PYCNO_FUZZ_${name.toUpperCase()}`] ?? n);

// --- formulas ----------------------------------------------------------------------------------

const TOKENS = [
  'lon',
  'lat',
  't',
  'pi',
  'e',
  'x',
  'y',
  'sin',
  'cos',
  'exp',
  'sqrt',
  'abs',
  'min',
  'max',
  'log',
  'tanh',
  'pow',
  'if',
  'constructor',
  '__proto__',
  'this',
  'globalThis',
  'eval',
  'Function',
  'process',
  'window',
  'toString',
  'valueOf',
  'prototype',
];
const OPS = [
  '+',
  '-',
  '*',
  '/',
  '^',
  '**',
  '%',
  '<',
  '>',
  '<=',
  '>=',
  '==',
  '!=',
  '&&',
  '||',
  '!',
  '?',
  ':',
  ',',
  '.',
  '[',
  ']',
  '(',
  ')',
  '=',
  '=>',
  '"s"',
  "'s'",
  '`s`',
  ';',
  '{',
  '}',
  '|',
  '&',
  '~',
  '>>',
  'new',
  'typeof',
  '\u0000',
  '1e999',
  '1e-999',
  'NaN',
  'Infinity',
  '0x1f',
  '.5',
  '5.',
  '1_000',
  '-0',
];

const formula = fc.oneof(
  {
    weight: 6,
    arbitrary: fc
      .array(
        fc.oneof(fc.constantFrom(...TOKENS, ...OPS), fc.double({ noNaN: true }).map(String), fc.nat(1000).map(String)),
        { maxLength: 40 },
      )
      .map((t) => t.join(' ')),
  },
  { weight: 2, arbitrary: fc.string({ maxLength: 80 }) },
  { weight: 1, arbitrary: fc.integer({ min: 10, max: 5000 }).map((d) => `${'('.repeat(d)}lon${')'.repeat(d)}`) },
  { weight: 1, arbitrary: fc.integer({ min: 10, max: 3000 }).map((d) => `${'sin('.repeat(d)}lat${')'.repeat(d)}`) },
  {
    weight: 1,
    arbitrary: fc.integer({ min: 100, max: 3000 }).map((d) => Array.from({ length: d }, () => 'lon').join('+')),
  },
  { weight: 1, arbitrary: fc.integer({ min: 2000, max: 200_000 }).map((n) => '1+'.repeat(n) + '1') },
);

function formulaCase(src: string): void {
  const f = compileFormula(src);
  for (const [lon, lat, t] of [
    [160, 0, 0],
    [0, -90, 1e6],
    [-1e308, 1e308, -1],
    [NaN, 0, 0],
  ]) {
    const v = f.evaluate(lon, lat, t);
    if (typeof v !== 'number') throw new TypeError(`formula ${src} gave ${typeof v}`);
  }
}

// --- painted grids -----------------------------------------------------------------------------

const paintedGrid: fc.Arbitrary<unknown> = fc.oneof(
  fc.record({
    lon0: fc.oneof(fc.double(), hostileValue()),
    lat0: fc.oneof(fc.double(), hostileValue()),
    dLon: fc.oneof(fc.double(), fc.constantFrom(0, -1, 1e-300, 1e300)),
    dLat: fc.oneof(fc.double(), fc.constantFrom(0, -1, 1e-300)),
    nLon: fc.oneof(fc.integer({ min: -2, max: 40 }), fc.constantFrom(1e9, 2 ** 31, 2 ** 53, 0.5, NaN)),
    nLat: fc.oneof(fc.integer({ min: -2, max: 40 }), fc.constantFrom(1e9, 2 ** 32, 1.5, Infinity)),
    x: fc.oneof(fc.array(fc.oneof(fc.double(), hostileValue()), { maxLength: 300 }), hostileValue()),
    y: fc.oneof(fc.array(fc.double(), { maxLength: 300 }), hostileValue()),
  }),
  fc.integer({ min: 1, max: 30 }).chain((n) =>
    fc.record({
      lon0: fc.double({ min: -360, max: 360 }),
      lat0: fc.double({ min: -90, max: 90 }),
      dLon: fc.double({ min: 0.01, max: 10 }),
      dLat: fc.double({ min: 0.01, max: 10 }),
      nLon: fc.constant(n),
      nLat: fc.constant(n),
      x: fc.array(fc.double(), { minLength: n * n, maxLength: n * n }),
      y: fc.array(fc.double(), { minLength: n * n, maxLength: n * n }),
    }),
  ),
  hostileValue(),
);

// --- CSV ---------------------------------------------------------------------------------------

function csvGrid(nLon: number, nLat: number, days: number): string {
  const rows = [days > 0 ? 'lon,lat,day,x,y' : 'lon,lat,x,y'];
  for (let d = 0; d < Math.max(1, days); d++)
    for (let j = 0; j < nLat; j++)
      for (let i = 0; i < nLon; i++)
        rows.push(
          days > 0
            ? `${150 + i},${-5 + j},${d * 5},${0.01 * i},${-0.01 * j}`
            : `${150 + i},${-5 + j},${0.01 * i},${-0.01 * j}`,
        );
  return rows.join('\n');
}

const csv = fc
  .record({
    nLon: fc.integer({ min: 1, max: 12 }),
    nLat: fc.integer({ min: 1, max: 8 }),
    days: fc.integer({ min: 0, max: 3 }),
    edits: fc.array(
      fc.record({
        at: fc.nat(),
        kind: fc.constantFrom('replace', 'insert', 'delete', 'cut', 'dup'),
        with: fc.oneof(
          fc.constantFrom(
            'NaN',
            'Infinity',
            '-inf',
            '1e999',
            '',
            ',',
            ',,,,',
            'x',
            '0x10',
            '"1"',
            '#',
            '\r',
            '\uFEFF',
            'lon,lat,x,y',
            '1e-400',
            '-0',
          ),
          fc.string({ maxLength: 10 }),
        ),
      }),
      { maxLength: 4 },
    ),
    noise: fc.option(fc.string({ unit: 'binary', maxLength: 200 }), { freq: 8 }),
    huge: fc.option(fc.constantFrom('rows', 'columns', 'line'), { freq: 40 }),
  })
  .map(({ nLon, nLat, days, edits, noise, huge }) => {
    if (noise !== null) return noise;
    if (huge === 'rows') return 'lon,lat,x,y\n' + Array.from({ length: 50_000 }, (_, k) => `${k},0,0,0`).join('\n');
    if (huge === 'columns') return 'lon,lat,x,y\n' + `1,2,3,4${',5'.repeat(100_000)}`;
    if (huge === 'line') return 'lon,lat,x,y\n' + '9'.repeat(1_000_000) + ',0,0,0';
    const lines = csvGrid(nLon, nLat, days).split('\n');
    for (const e of edits) {
      const k = e.at % lines.length;
      if (e.kind === 'replace') {
        const cells = lines[k].split(',');
        cells[e.at % cells.length] = e.with;
        lines[k] = cells.join(',');
      } else if (e.kind === 'insert') lines.splice(k, 0, e.with);
      else if (e.kind === 'delete') lines.splice(k, 1);
      else if (e.kind === 'cut') lines[k] = lines[k].slice(0, e.at % (lines[k].length + 1));
      else lines.push(lines[k]);
    }
    return lines.join(e2(edits.length));
  });
const e2 = (n: number) => (n % 3 === 2 ? '\r\n' : '\n');

// --- NetCDF ------------------------------------------------------------------------------------

let SAMPLES: Array<{ name: string; bytes: Uint8Array }> = [];
const GRID = new Grid(
  { lonWest: 150, lonEast: 190, latSouth: -10, latNorth: 10, dLon: 2, dLat: 2, land: [] },
  EARTH.radius,
);

async function makeSamples(): Promise<void> {
  const lon = Array.from({ length: 6 }, (_, i) => 150 + 2 * i);
  const lat = Array.from({ length: 4 }, (_, j) => -4 + 2 * j);
  const wind = await writeNetcdfToMemory(
    {
      dimensions: [
        { name: 'time', length: 2 },
        { name: 'lat', length: 4 },
        { name: 'lon', length: 6 },
      ],
      variables: [
        { name: 'time', type: NC_DOUBLE, dimensions: ['time'], attributes: { units: 'days since 2000-01-01' } },
        { name: 'lat', type: NC_DOUBLE, dimensions: ['lat'], attributes: { units: 'degrees_north' } },
        { name: 'lon', type: NC_DOUBLE, dimensions: ['lon'], attributes: { units: 'degrees_east' } },
        {
          name: 'taux',
          type: NC_FLOAT,
          dimensions: ['time', 'lat', 'lon'],
          attributes: { units: 'N m-2', _FillValue: { type: NC_FLOAT, values: 1e20 } },
        },
        { name: 'tauy', type: NC_FLOAT, dimensions: ['time', 'lat', 'lon'] },
      ],
      attributes: { title: 'fuzz wind' },
    },
    { time: [0, 5], lat, lon, taux: Array.from({ length: 48 }, (_, k) => 0.001 * k), tauy: new Array(48).fill(0) },
  );
  const sc = parseScenario(FIXTURE_TEXT, FIXTURE, ['basin.resolution=2', 'physics.dynamics=nonlinear']);
  const m = buildModel(sc.resolved).model;
  m.advance(5);
  const restart = await writeRestart(m, { scenarioJson: sc.scenarioJson });
  const dir = mkdtempSync(join(tmpdir(), 'pycno-fuzz-nc-'));
  writeFileSync(join(dir, 'tiny.json'), FIXTURE_TEXT);
  const r = await cli(
    ['run', 'tiny.json', '--out', 'run.nc', '--quiet', '--days', '2', '--set', 'basin.resolution=2'],
    dir,
  );
  if (r.code !== 0) throw new Error(r.stderr);
  const { readFileSync } = await import('node:fs');
  const run = new Uint8Array(readFileSync(join(dir, 'run.nc')));
  SAMPLES = [
    { name: 'wind', bytes: wind },
    { name: 'restart', bytes: restart },
    { name: 'run', bytes: run },
  ];
}

/** Header length of a sample (the offset of its first data), from the reader's own walk. */
function headerEnd(bytes: Uint8Array): number {
  const f = readNetcdf(bytes);
  void f;
  // The first variable's begin, found as the smallest 'begin' by scanning the bytes is overkill:
  // the writer puts the data right after the header, so the first non-header byte is where
  // truncation starts cutting data. 1024 covers the samples' headers for the cut offsets.
  return Math.min(bytes.length, 4096);
}

type NcMutation =
  | { kind: 'cut'; at: number }
  | { kind: 'byte'; at: number; value: number }
  | { kind: 'u32'; at: number; value: number }
  | { kind: 'magic'; value: number }
  | { kind: 'nan'; at: number; which: number };

const ABSURD = [
  0,
  1,
  0x7fffffff,
  0x80000000,
  0xffffffff,
  0xfffffffe,
  1e9 >>> 0,
  65536,
  3,
  0x0000000a,
  0x0000000b,
  0x0000000c,
];

const ncMutation: fc.Arbitrary<NcMutation[]> = fc.array(
  fc.oneof(
    fc.record({ kind: fc.constant('cut' as const), at: fc.nat() }),
    fc.record({ kind: fc.constant('byte' as const), at: fc.nat(), value: fc.nat(255) }),
    fc.record({
      kind: fc.constant('u32' as const),
      at: fc.nat(),
      value: fc.oneof(fc.constantFrom(...ABSURD), fc.nat()),
    }),
    fc.record({ kind: fc.constant('magic' as const), value: fc.constantFrom(0, 3, 5, 0x89, 255) }),
    fc.record({ kind: fc.constant('nan' as const), at: fc.nat(), which: fc.nat(3) }),
  ),
  { minLength: 1, maxLength: 3 },
);

function mutateNc(src: Uint8Array, muts: NcMutation[], headerBias: boolean): Uint8Array {
  let b = src.slice();
  const span = headerBias ? headerEnd(src) : b.length;
  for (const m of muts) {
    const dv = new DataView(b.buffer, b.byteOffset, b.byteLength);
    if (m.kind === 'cut') b = b.slice(0, m.at % (b.length + 1));
    else if (m.kind === 'byte' && b.length) b[m.at % Math.min(span, b.length)] = m.value;
    else if (m.kind === 'u32' && b.length >= 4)
      dv.setUint32(
        4 * ((m.at % Math.min(span, b.length)) >> 2) -
          (4 * ((m.at % Math.min(span, b.length)) >> 2) + 4 > b.length ? 4 : 0),
        m.value,
      );
    else if (m.kind === 'magic' && b.length >= 4) b[3] = m.value;
    else if (m.kind === 'nan' && b.length >= 8) {
      const at = b.length - 8 - 8 * (m.at % Math.max(1, (b.length >> 3) - 1));
      if (at >= 0) dv.setFloat64(at, [NaN, Infinity, -Infinity, 1e308][m.which]);
    }
  }
  return b;
}

function netcdfCase(bytes: Uint8Array): void {
  // Every reader a file can reach: the generic one, wind data, restart / start files, the run library.
  const errors: unknown[] = [];
  for (const read of [
    () => readNetcdf(bytes),
    () => readNetcdfVectors(bytes),
    () => readStartFile(bytes, GRID, 'fuzz.nc'),
    () => readRun(bytes, 'fuzz.nc'),
  ]) {
    try {
      read();
    } catch (e) {
      errors.push(e);
    }
  }
  // Throw the least clear failure, so the judge sees it.
  // Each reader may refuse a file meant for another; only an unclear failure counts against it.
  const bad = errors.find(
    (e) => !(e instanceof Error) || !['NetcdfReadError', 'InputError', 'ForcingError', 'RunFileError'].includes(e.name),
  );
  if (bad) throw bad;
  // Counted as refused when even the generic reader refused it.
  if (errors.length === 4) throw errors[0];
}

describe('fuzz: hostile formulas, painted grids, CSV and NetCDF files', () => {
  beforeAll(makeSamples, 60_000);
  afterAll(() => {
    for (const n of ['formula', 'painted', 'csv', 'netcdf', 'netcdf-cut']) printTally(n);
    const total = Object.values(tallies).reduce((s, t) => s + t.tried, 0);
    console.log(`fuzz: ${total} inputs in this file`);
  });

  it('formulas: compiled or refused with a FormulaError; never eval, never a crash', () => {
    check('formula', fuzzSeed('formula', 8102), runs('formula', 3000), formula, (src) =>
      runCase('formula', () => formulaCase(src), src),
    );
  });

  it('painted grids: a series or a clear error', () => {
    check('painted', fuzzSeed('painted', 8103), runs('painted', 1000), paintedGrid, (g) =>
      runCase('painted', () => void seriesFromGrid(g as GriddedVectors)),
    );
  });

  it('CSV wind files: a series or a clear error naming the line', () => {
    check(
      'csv',
      fuzzSeed('csv', 8104),
      runs('csv', 1500),
      csv,
      (text) => runCase('csv', () => void parseWindCsv(text), text),
      (t) => t.slice(0, 1500),
    );
  });

  it('NetCDF files cut at every header offset and at sampled data offsets', () => {
    for (const s of SAMPLES) {
      const head = Math.min(s.bytes.length, 4096);
      const cuts = [
        ...Array.from({ length: head }, (_, k) => k),
        ...Array.from({ length: 64 }, (_, k) => Math.floor(head + ((s.bytes.length - head) * k) / 64)),
      ];
      for (const at of cuts) {
        const p = runCase('netcdf-cut', () => netcdfCase(s.bytes.subarray(0, at)), s.bytes.subarray(0, at));
        if (p) throw new Error(`${s.name} cut at byte ${at}: ${p}`);
      }
    }
  });

  it('NetCDF files with overwritten bytes, absurd lengths and counts, wrong magic, NaN/Inf data', () => {
    const arb = fc.record({ sample: fc.nat(SAMPLES.length - 1), muts: ncMutation, header: fc.boolean() });
    check(
      'netcdf',
      fuzzSeed('netcdf', 8105),
      runs('netcdf', 2500),
      arb,
      ({ sample, muts, header }) => {
        const bytes = mutateNc(SAMPLES[sample].bytes, muts, header);
        return runCase('netcdf', () => netcdfCase(bytes), bytes);
      },
      (x) => `${SAMPLES[x.sample].name} ${JSON.stringify(x.muts)} header=${x.header}`,
    );
  });
});
