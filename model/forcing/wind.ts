// Turn a WindSpec into the WindStress the solver calls every step.
//
// Cost model: the solver's step is about 16 array passes per cell, so fill() must stay at a copy
// of two arrays. Everything static is summed once at build time; everything that varies in time
// is re-evaluated at most once per wind.updateHours of model time, at the middle of that interval
// (docs/wind.md explains and measures the choice), into preallocated buffers.
//
// Wind parts are summed as vectors at each face before the (nonlinear) bulk formula turns the sum
// into stress; stress parts are then added. Every vector source is evaluated at the u faces and at
// the v faces directly, so both components are known at both kinds of face without averaging.

import type { Grid } from '../grid.ts';
import type { WindStress } from './stress.ts';
import type { FixedPart, GriddedVectors, VectorSource, WindPart, WindSpec } from './spec.ts';
import { ForcingError } from './errors.ts';
import { compileEnvelope, pulseFactor, type Envelope } from './envelopes.ts';
import { compileShape, type Shape } from './shapes.ts';
import { makeBulkFormula } from './bulk.ts';
import {
  applyWeights,
  bilinearWeights,
  readNetcdfVectors,
  seriesFromGrid,
  timeBracket,
  type GriddedSeries,
  type Weights,
} from './gridded.ts';
import { parseWindCsv } from './csv.ts';
import { drawBursts, type DrawnBurst } from './bursts.ts';
import { AnsweringWind } from '../coupling/answering-wind.ts';
import { EARTH } from '../config.ts';
import { earthBeta } from '../theory.ts';
import * as pm from '../portable-math.ts';

export interface WindBuildOptions {
  /** The run's seed for random bursts. */
  seed: string;
  /** File contents by the path written in the scenario (the caller reads the files). */
  files?: Map<string, string | Uint8Array>;
  /** beta of the run's beta plane, m-1 s-1: the answering wind's atmosphere lives on it (default 2 Omega / R). */
  beta?: number;
}

export interface BuiltWind {
  stress: WindStress;
  /** Every burst drawn, in part order, then by start day. */
  bursts: DrawnBurst[];
  /** The answering part, if the wind has one on (the wind preview asks it for a test answer). */
  answering: AnsweringWind | null;
}

/** beta = 2 Omega / R with the Earth's constants, the default beta plane. */
const EARTH_BETA = earthBeta(EARTH.omega, EARTH.radius);

const SECONDS_PER_DAY = 86400;

/** Ocean faces of one kind (u or v), in a compact list. */
interface Faces {
  n: number;
  /** Padded index of each face. */
  index: Int32Array;
  lon: Float64Array;
  lat: Float64Array;
  /** Logical i and j of each face. */
  i: Int32Array;
  j: Int32Array;
  kind: 'u' | 'v';
}

function oceanFaces(grid: Grid, kind: 'u' | 'v'): Faces {
  const list: number[][] = [];
  const mask = kind === 'u' ? grid.maskU : grid.maskV;
  const ni = kind === 'u' ? grid.nx + 1 : grid.nx;
  const nj = kind === 'u' ? grid.ny : grid.ny + 1;
  for (let j = 0; j < nj; j++) for (let i = 0; i < ni; i++) if (mask[grid.idx(i, j)] === 1) list.push([i, j]);
  const n = list.length;
  const f: Faces = {
    n,
    index: new Int32Array(n),
    lon: new Float64Array(n),
    lat: new Float64Array(n),
    i: new Int32Array(n),
    j: new Int32Array(n),
    kind,
  };
  list.forEach(([i, j], k) => {
    f.index[k] = grid.idx(i, j);
    f.i[k] = i;
    f.j[k] = j;
    f.lon[k] = kind === 'u' ? grid.lonFace[i] : grid.lonCentre[i];
    f.lat[k] = kind === 'u' ? grid.latCentre[j] : grid.latFace[j];
  });
  return f;
}

/** Per-face accumulators: stress x on u faces, stress y on v faces, wind (both components) on both. */
class Accumulator {
  readonly sx: Float64Array;
  readonly sy: Float64Array;
  readonly wxu: Float64Array;
  readonly wyu: Float64Array;
  readonly wxv: Float64Array;
  readonly wyv: Float64Array;
  constructor(nu: number, nv: number) {
    this.sx = new Float64Array(nu);
    this.sy = new Float64Array(nv);
    this.wxu = new Float64Array(nu);
    this.wyu = new Float64Array(nu);
    this.wxv = new Float64Array(nv);
    this.wyv = new Float64Array(nv);
  }
  copyFrom(o: Accumulator): void {
    this.sx.set(o.sx);
    this.sy.set(o.sy);
    this.wxu.set(o.wxu);
    this.wyu.set(o.wyu);
    this.wxv.set(o.wxv);
    this.wyv.set(o.wyv);
  }
}

/** A contribution to the accumulators at a time in days. */
interface Term {
  readonly timeVarying: boolean;
  add(days: number, acc: Accumulator): void;
}

function addScaled(out: Float64Array, a: Float64Array, s: number): void {
  if (s === 0) return;
  for (let k = 0; k < out.length; k++) out[k] += s * a[k];
}

function evaluateShape(shape: Shape, faces: Faces, days: number, out: Float64Array): void {
  for (let k = 0; k < faces.n; k++) {
    const v = shape.at(faces.lon[k], faces.lat[k], days);
    if (!Number.isFinite(v)) {
      throw new ForcingError(
        `${shape.label} gives ${v} at lon ${faces.lon[k]}, lat ${faces.lat[k]}, t ${days} days (a ${faces.kind} face)`,
      );
    }
    out[k] = v;
  }
}

/** A fixed direction times a scalar shape times an envelope. */
function shapedTerm(
  src: Extract<VectorSource, { kind: 'shaped' }>,
  quantity: 'stress' | 'wind',
  env: Envelope,
  u: Faces,
  v: Faces,
): Term {
  const shape = compileShape(src.shape);
  const x = src.x;
  const y = src.y;
  if (!Number.isFinite(x) || !Number.isFinite(y))
    throw new ForcingError(`the direction (x, y) must be finite numbers (got ${x}, ${y})`);
  const su = new Float64Array(u.n);
  const sv = new Float64Array(v.n);
  // Static shapes are evaluated here, once; a formula in t is re-evaluated at each update (this
  // first evaluation then only makes a formula that breaks at t = 0 fail at build time).
  // A stress part needs the shape on u faces only for x, on v faces only for y; a wind part needs
  // both everywhere, since |U| mixes the components.
  const needU = quantity === 'wind' || x !== 0;
  const needV = quantity === 'wind' || y !== 0;
  if (needU) evaluateShape(shape, u, 0, su);
  if (needV) evaluateShape(shape, v, 0, sv);
  return {
    timeVarying: shape.timeDependent || !env.constant,
    add(days, acc) {
      const e = env.at(days);
      if (e === 0) return;
      if (shape.timeDependent) {
        if (needU) evaluateShape(shape, u, days, su);
        if (needV) evaluateShape(shape, v, days, sv);
      }
      if (quantity === 'stress') {
        addScaled(acc.sx, su, e * x);
        addScaled(acc.sy, sv, e * y);
      } else {
        addScaled(acc.wxu, su, e * x);
        addScaled(acc.wyu, su, e * y);
        addScaled(acc.wxv, sv, e * x);
        addScaled(acc.wyv, sv, e * y);
      }
    },
  };
}

/** Gridded vectors (painted or from a file), bilinear in space and linear in time. */
function griddedTerm(series: GriddedSeries, quantity: 'stress' | 'wind', env: Envelope, u: Faces, v: Faces): Term {
  const wu: Weights = bilinearWeights(series, u.lon, u.lat);
  const wv: Weights = bilinearWeights(series, v.lon, v.lat);
  const hasTime = series.days !== null && series.days.length > 1;
  const addSlice = (s: number, scale: number, acc: Accumulator) => {
    if (scale === 0) return;
    if (quantity === 'stress') {
      applyWeights(wu, series.x[s], acc.sx, scale, true);
      applyWeights(wv, series.y[s], acc.sy, scale, true);
    } else {
      applyWeights(wu, series.x[s], acc.wxu, scale, true);
      applyWeights(wu, series.y[s], acc.wyu, scale, true);
      applyWeights(wv, series.x[s], acc.wxv, scale, true);
      applyWeights(wv, series.y[s], acc.wyv, scale, true);
    }
  };
  return {
    timeVarying: hasTime || !env.constant,
    add(days, acc) {
      const e = env.at(days);
      if (e === 0) return;
      if (!hasTime) return addSlice(0, e, acc);
      const [a, b, w] = timeBracket(series.days, days);
      addSlice(a, e * (1 - w), acc);
      if (b !== a) addSlice(b, e * w, acc);
    },
  };
}

/** Eastward Gaussian patches, each under its own pulse. Evaluated separably: exp per row and column. */
function burstsTerm(bursts: DrawnBurst[], grid: Grid, u: Faces, v: Faces): Term {
  const gxFace = new Float64Array(grid.nx + 1);
  const gxCentre = new Float64Array(grid.nx);
  const gyCentre = new Float64Array(grid.ny);
  const gyFace = new Float64Array(grid.ny + 1);
  const gauss = (out: Float64Array, at: Float64Array, c: number, s: number) => {
    for (let k = 0; k < out.length; k++) {
      const d = (at[k] - c) / s;
      out[k] = pm.exp(-0.5 * d * d);
    }
  };
  const addPatch = (faces: Faces, gx: Float64Array, gy: Float64Array, out: Float64Array, a: number) => {
    for (let k = 0; k < faces.n; k++) out[k] += a * gx[faces.i[k]] * gy[faces.j[k]];
  };
  return {
    timeVarying: true,
    add(days, acc) {
      for (const b of bursts) {
        if (b.start > days) break; // sorted by start within a part; parts are separate terms
        const e = pulseFactor(days, b.start, b.duration, b.ramp);
        if (e === 0) continue;
        const a = e * b.amplitude;
        gauss(gxFace, grid.lonFace, b.lon, b.lonWidth);
        gauss(gyCentre, grid.latCentre, b.lat, b.latWidth);
        if (b.quantity === 'stress') addPatch(u, gxFace, gyCentre, acc.sx, a);
        else {
          gauss(gxCentre, grid.lonCentre, b.lon, b.lonWidth);
          gauss(gyFace, grid.latFace, b.lat, b.latWidth);
          addPatch(u, gxFace, gyCentre, acc.wxu, a);
          addPatch(v, gxCentre, gyFace, acc.wxv, a);
        }
      }
    },
  };
}

/** "wind part 2 ('burst')": counted from 1, as the page's list numbers the parts (wind.parts[1]). */
function partLabel(k: number, part: WindPart): string {
  return `wind part ${k + 1}${part.name ? ` ('${part.name}')` : ''}`;
}

export function buildWindStress(grid: Grid, wind: WindSpec, opts: WindBuildOptions): BuiltWind {
  if (!wind || !Array.isArray(wind.parts)) throw new ForcingError('wind.parts must be a list');
  const updateHours = wind.updateHours;
  if (!(typeof updateHours === 'number' && updateHours >= 0 && Number.isFinite(updateHours))) {
    throw new ForcingError(`wind.updateHours must be a number >= 0 (got ${String(updateHours)})`);
  }
  const bulk = makeBulkFormula(wind.bulk);
  const u = oceanFaces(grid, 'u');
  const v = oceanFaces(grid, 'v');
  const files = opts.files ?? new Map<string, string | Uint8Array>();
  const parsedFiles = new Map<string, GriddedSeries>();

  const loadSeries = (src: Exclude<VectorSource, { kind: 'shaped' }>): GriddedSeries => {
    if (src.kind === 'painted') return seriesFromGrid(src.grid as GriddedVectors);
    const key = JSON.stringify([src.path, src.format, src.xVariable ?? null, src.yVariable ?? null]);
    const cached = parsedFiles.get(key);
    if (cached) return cached;
    const content = files.get(src.path);
    if (content === undefined) throw new ForcingError(`the file '${src.path}' was not provided`);
    let series: GriddedSeries;
    if (src.format === 'csv') {
      try {
        series = parseWindCsv(content);
      } catch (e) {
        // The message names the file; the file's own text is never repeated (csv.ts).
        if (e instanceof ForcingError) throw new ForcingError(`the wind file ${src.path}: ${e.message}`);
        throw e;
      }
    } else if (src.format === 'netcdf') {
      if (typeof content === 'string')
        throw new ForcingError(`the NetCDF file '${src.path}' must be given as bytes, not text`);
      series = readNetcdfVectors(content, { xVariable: src.xVariable, yVariable: src.yVariable });
    } else throw new ForcingError(`unknown file format '${String((src as { format: unknown }).format)}'`);
    parsedFiles.set(key, series);
    return series;
  };

  const terms: Term[] = [];
  let answering: AnsweringWind | null = null;
  let answeringTerm: Term | null = null;
  let windParts = 0;
  let windVarying = false;
  const drawn: DrawnBurst[] = [];
  wind.parts.forEach((part, k) => {
    if (part.enabled === false) return;
    try {
      if (part.kind === 'answering') {
        // Its stress changes only when the model couples; the wind re-evaluates then (coupling below).
        if (answering) throw new ForcingError('a run has one SST anomaly, so at most one answering part can be on');
        const a = new AnsweringWind(grid, part, { u, v, bulk, beta: opts.beta ?? EARTH_BETA });
        answering = a;
        answeringTerm = { timeVarying: true, add: (_days, acc) => a.addStress(acc.sx, acc.sy) };
        terms.push(answeringTerm);
        return;
      }
      if (part.quantity !== 'stress' && part.quantity !== 'wind') {
        throw new ForcingError(`quantity must be 'stress' or 'wind' (got ${String(part.quantity)})`);
      }
      let term: Term;
      if (part.kind === 'bursts') {
        const list = drawBursts(part, opts.seed, k);
        drawn.push(...list);
        if (list.length === 0) return;
        term = burstsTerm(list, grid, u, v);
      } else if (part.kind === 'fixed') {
        const fixed = part as FixedPart;
        const env = compileEnvelope(fixed.envelope);
        const src = fixed.source;
        if (src.kind === 'shaped') term = shapedTerm(src, fixed.quantity, env, u, v);
        else if (src.kind === 'painted' || src.kind === 'file')
          term = griddedTerm(loadSeries(src), fixed.quantity, env, u, v);
        else throw new ForcingError(`unknown source kind '${String((src as { kind: unknown }).kind)}'`);
      } else {
        throw new ForcingError(`unknown part kind '${String((part as { kind: unknown }).kind)}'`);
      }
      if (part.quantity === 'wind') {
        windParts++;
        windVarying ||= term.timeVarying;
      }
      terms.push(term);
    } catch (err) {
      if (err instanceof ForcingError) err.message = `${partLabel(k, part)}: ${err.message}`;
      throw err;
    }
  });

  // Static terms are summed once. If no wind part varies, the bulk stress of the wind sum is static too.
  const base = new Accumulator(u.n, v.n);
  for (const t of terms) if (!t.timeVarying) t.add(0, base);
  const dynamic = terms.filter((t) => t.timeVarying);
  const applyBulk = (acc: Accumulator) => {
    for (let k = 0; k < u.n; k++) acc.sx[k] += bulk.factor(acc.wxu[k], acc.wyu[k]) * acc.wxu[k];
    for (let k = 0; k < v.n; k++) acc.sy[k] += bulk.factor(acc.wxv[k], acc.wyv[k]) * acc.wyv[k];
  };
  const bulkIsStatic = windParts > 0 && !windVarying;
  if (bulkIsStatic) {
    applyBulk(base);
    base.wxu.fill(0);
    base.wyu.fill(0);
    base.wxv.fill(0);
    base.wyv.fill(0);
  }

  // Land faces and the halo stay 0 forever: only ocean faces are ever written.
  const resultX = grid.field();
  const resultY = grid.field();
  const work = new Accumulator(u.n, v.n);
  const evaluate = (days: number) => {
    work.copyFrom(base);
    for (const t of dynamic) t.add(days, work);
    if (windParts > 0 && !bulkIsStatic) applyBulk(work);
    for (let k = 0; k < u.n; k++) resultX[u.index[k]] = work.sx[k];
    for (let k = 0; k < v.n; k++) resultY[v.index[k]] = work.sy[k];
  };
  evaluate(0);

  // The answer changes only when the model couples; it alone does not make the design unsteady.
  const steady = dynamic.every((t) => t === answeringTerm);
  let answered = false;
  const interval = updateHours * 3600;
  let lastSlot = steady ? 0 : Number.NaN;
  const size = grid.size;
  const coupled = answering as AnsweringWind | null;
  const stress: WindStress = {
    steady,
    // A new answer from the ocean makes the next fill() evaluate again, in whatever interval.
    ...(coupled
      ? {
          coupling: coupled.coupling(() => {
            lastSlot = Number.NaN;
            answered = true;
          }),
        }
      : {}),
    // Tell the solver the field is held over each interval, so it refills (and rescales) once per interval.
    ...(interval > 0 ? { updateSeconds: interval } : {}),
    fill(timeSeconds, taux, tauy) {
      if (taux.length !== size || tauy.length !== size) {
        throw new ForcingError(
          `fill(): the arrays must have the grid's padded size ${size} (got ${taux.length}, ${tauy.length})`,
        );
      }
      if (steady) {
        if (answered) evaluate(0);
      } else {
        if (interval === 0) {
          if (timeSeconds !== lastSlot) {
            evaluate(timeSeconds / SECONDS_PER_DAY);
            lastSlot = timeSeconds;
          }
        } else {
          const slot = Math.floor(timeSeconds / interval);
          if (slot !== lastSlot) {
            // Sample the middle of the interval: the held value then integrates to second order.
            evaluate(((slot + 0.5) * interval) / SECONDS_PER_DAY);
            lastSlot = slot;
          }
        }
      }
      answered = false;
      taux.set(resultX);
      tauy.set(resultY);
    },
  };
  return { stress, bursts: drawn, answering: coupled };
}
