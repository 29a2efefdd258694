// Checks the schema cannot express: relations between values (edges in order, the basin a whole
// number of cells, shapes and probes inside the basin, ramps shorter than their pulses, ...).
// They run on a scenario with defaults filled in, which may still hold values of the wrong type
// where the schema already complained; every check first makes sure its inputs are numbers.

import { secondsOfDays } from '../clock.ts';
import { EARTH } from '../config.ts';
import { notDividing, stepsInInterval } from '../dynamics/stability.ts';
import { Grid } from '../grid.ts';
import { insideShape, type LandShape } from '../land.ts';
import { pathToString, type PathSegment, type ScenarioIssue } from './errors.ts';
import { resolveScenario } from './resolve.ts';
import { memoryEstimate, scenarioStability } from './derived.ts';
import type { Scenario } from './types.ts';
import { couplingIssues } from './coupling-checks.ts';

/** Grids above this many cells are refused: the page would run out of memory and patience. */
export const MAX_CELLS = 4_000_000;
/** The memory budget that cap stands for: the largest grid's arrays in the nonlinear mode with every field, bytes. */
export const MEMORY_BUDGET = memoryEstimate(2000, 2000, 'nonlinear', 10);

const num = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const EPS = 1e-9;

interface Box {
  w: number;
  e: number;
  s: number;
  n: number;
}

export function semanticIssues(sc: Scenario): ScenarioIssue[] {
  const out: ScenarioIssue[] = [];
  const add = (path: PathSegment[], message: string) => out.push({ path: pathToString(path), message });
  const b: any = sc.basin ?? {};
  const p: any = sc.physics ?? {};
  const t: any = sc.time ?? {};

  // Basin edges and cells.
  let box: Box | null = null;
  if (num(b.lonWest) && num(b.lonEast) && num(b.latSouth) && num(b.latNorth)) {
    const okLon = b.lonEast > b.lonWest;
    const okLat = b.latNorth > b.latSouth;
    if (!okLon)
      add(
        ['basin', 'lonEast'],
        `must be east of lonWest (lonWest = ${b.lonWest}, lonEast = ${b.lonEast}); longitudes increase eastward, e.g. 80W east of the dateline is 280`,
      );
    else if (b.lonEast - b.lonWest > 360)
      add(['basin', 'lonEast'], `the basin is ${b.lonEast - b.lonWest} degrees wide; at most 360`);
    if (!okLat)
      add(['basin', 'latNorth'], `must be north of latSouth (latSouth = ${b.latSouth}, latNorth = ${b.latNorth})`);
    if (okLon && okLat && b.lonEast - b.lonWest <= 360)
      box = { w: b.lonWest, e: b.lonEast, s: b.latSouth, n: b.latNorth };
  }
  const res = b.resolution;
  const dLon = num(res) ? res : num(res?.lon) ? res.lon : null;
  const dLat = num(res) ? res : num(res?.lat) ? res.lat : null;
  let cellsOk = false;
  if (box && dLon !== null && dLat !== null && dLon > 0 && dLat > 0) {
    const lonPath: PathSegment[] = num(res) ? ['basin', 'resolution'] : ['basin', 'resolution', 'lon'];
    const latPath: PathSegment[] = num(res) ? ['basin', 'resolution'] : ['basin', 'resolution', 'lat'];
    const okX = wholeCells(box.e - box.w, dLon, 'wide', lonPath, add);
    const okY = wholeCells(box.n - box.s, dLat, 'tall', latPath, add);
    if (okX && okY) {
      const cells = Math.round((box.e - box.w) / dLon) * Math.round((box.n - box.s) / dLat);
      if (cells > MAX_CELLS) {
        const nx = Math.round((box.e - box.w) / dLon);
        const ny = Math.round((box.n - box.s) / dLat);
        const mode = p.dynamics === 'nonlinear' ? 'nonlinear' : 'linear';
        const fields = Array.isArray(sc.output?.fields) ? sc.output.fields.length : 10;
        const mb = (x: number) => `${Math.round(x / 1048576).toLocaleString('en-US')} MB`;
        add(
          ['basin', 'resolution'],
          `gives ${cells.toLocaleString('en-US')} cells; at most ${MAX_CELLS.toLocaleString('en-US')}, the memory budget of ${mb(MEMORY_BUDGET)} (this ${nx} x ${ny} grid would need about ${mb(memoryEstimate(nx, ny, mode, fields))} while running): choose coarser cells`,
        );
      } else cellsOk = true;
    }
  }

  // Sponge bands.
  const sp: any = b.sponge ?? {};
  if (box && num(sp.widthDeg) && sp.widthDeg > 0) {
    const tall = box.n - box.s;
    if (2 * sp.widthDeg >= tall) {
      add(
        ['basin', 'sponge', 'widthDeg'],
        `two sponge bands of ${sp.widthDeg} degrees do not fit in a basin ${tall} degrees tall; use less than ${tall / 2}`,
      );
    } else if (dLat !== null && sp.widthDeg < dLat) {
      add(
        ['basin', 'sponge', 'widthDeg'],
        `a sponge band of ${sp.widthDeg} degrees is narrower than one cell (${dLat} degrees) and would do nothing; use 0 for none or at least ${dLat}`,
      );
    }
  }

  // Land.
  const land: unknown[] = Array.isArray(b.land) ? b.land : [];
  let landOk = true;
  land.forEach((shape: any, i) => {
    if (shape?.kind === 'rectangle' && [shape.lonWest, shape.lonEast, shape.latSouth, shape.latNorth].every(num)) {
      if (!(shape.lonEast > shape.lonWest)) {
        landOk = false;
        add(['basin', 'land', i, 'lonEast'], `must be east of lonWest (${shape.lonWest}) of the same rectangle`);
      }
      if (!(shape.latNorth > shape.latSouth)) {
        landOk = false;
        add(['basin', 'land', i, 'latNorth'], `must be north of latSouth (${shape.latSouth}) of the same rectangle`);
      }
      if (box && !(inBox(box, shape.lonWest, shape.latSouth) && inBox(box, shape.lonEast, shape.latNorth))) {
        landOk = false;
        add(
          ['basin', 'land', i],
          `the rectangle ${shape.lonWest}..${shape.lonEast} E, ${shape.latSouth}..${shape.latNorth} N reaches outside the basin ${boxText(box)}`,
        );
      }
    } else if (shape?.kind === 'polygon' && Array.isArray(shape.points)) {
      shape.points.forEach((pt: unknown, k: number) => {
        if (box && Array.isArray(pt) && num(pt[0]) && num(pt[1]) && !inBox(box, pt[0], pt[1])) {
          landOk = false;
          add(
            ['basin', 'land', i, 'points', k],
            `the corner [${pt[0]}, ${pt[1]}] lies outside the basin ${boxText(box)}`,
          );
        }
      });
    } else landOk = false;
  });

  // A grid (for land cells) when the basin is sound.
  let grid: Grid | null = null;
  if (box && cellsOk && landOk && dLon !== null && dLat !== null) {
    grid = new Grid(
      { lonWest: box.w, lonEast: box.e, latSouth: box.s, latNorth: box.n, dLon, dLat, land: land as LandShape[] },
      EARTH.radius,
    );
    if (grid.oceanCells === 0) add(['basin', 'land'], 'covers every cell of the basin: no ocean is left');
  }

  // Physics relations.
  if (num(p.layerThickness) && p.layerThickness > 0) {
    const H = p.layerThickness;
    if (num(p.surfaceLayer?.depth) && !(p.surfaceLayer.depth < H)) {
      add(
        ['physics', 'surfaceLayer', 'depth'],
        `must be less than the layer thickness (${H} m) (got ${p.surfaceLayer.depth})`,
      );
    }
    if (num(p.entrainment?.minThickness) && !(p.entrainment.minThickness < H)) {
      add(
        ['physics', 'entrainment', 'minThickness'],
        `must be less than the layer thickness (${H} m) (got ${p.entrainment.minThickness}); the resting layer would entrain`,
      );
    }
  }

  // Time.
  if (num(t.outputEveryDays) && t.outputEveryDays > 0 && secondsOfDays(t.outputEveryDays) < 1) {
    add(
      ['time', 'outputEveryDays'],
      `${t.outputEveryDays} days is ${(t.outputEveryDays * 86400).toPrecision(3)} s; records are at least 1 s apart (${(1 / 86400).toPrecision(3)} days)`,
    );
  } else if (num(t.days) && t.days > 0 && num(t.outputEveryDays) && t.outputEveryDays > t.days + EPS) {
    add(
      ['time', 'outputEveryDays'],
      `must be at most the run length (${t.days} days) (got ${t.outputEveryDays}); no frame would be saved`,
    );
  }

  // Initial state.
  const ini: any = sc.initial;
  if (ini && typeof ini === 'object') {
    if (
      ['bump', 'kelvin', 'rossby'].includes(ini.kind) &&
      num(ini.amplitude) &&
      num(p.layerThickness) &&
      p.layerThickness > 0 &&
      !(ini.amplitude > -p.layerThickness)
    ) {
      add(
        ['initial', 'amplitude'],
        `a thermocline rise of ${-ini.amplitude} m would empty the ${p.layerThickness} m layer; use an amplitude above -${p.layerThickness}`,
      );
    }
    if (
      box &&
      num(ini.lon) &&
      ['bump', 'kelvin', 'rossby'].includes(ini.kind) &&
      !(ini.lon >= box.w && ini.lon <= box.e)
    ) {
      add(['initial', 'lon'], `${ini.lon} lies outside the basin's longitudes ${box.w}..${box.e}`);
    }
    if (box && ini.kind === 'bump' && num(ini.lat) && !(ini.lat >= box.s && ini.lat <= box.n)) {
      add(['initial', 'lat'], `${ini.lat} lies outside the basin's latitudes ${box.s}..${box.n}`);
    }
    if (box && (ini.kind === 'kelvin' || ini.kind === 'rossby') && !(box.s < 0 && box.n > 0)) {
      add(
        ['initial', 'kind'],
        `an equatorial ${ini.kind === 'kelvin' ? 'Kelvin' : 'Rossby'} wave needs the equator inside the basin (latitudes ${box.s}..${box.n})`,
      );
    }
  }

  // Probes and sections.
  const probes: unknown[] = Array.isArray(sc.probes) ? sc.probes : [];
  const names = new Map<string, number>();
  probes.forEach((pr: any, i) => {
    if (typeof pr?.name === 'string') {
      if (names.has(pr.name))
        add(
          ['probes', i, 'name'],
          `"${pr.name}" is already the name of probes[${names.get(pr.name)}]; names must be unique`,
        );
      else names.set(pr.name, i);
    }
    if (!box || !num(pr?.lon) || !num(pr?.lat)) return;
    if (!inBox(box, pr.lon, pr.lat)) {
      add(['probes', i], `(${pr.lon}, ${pr.lat}) lies outside the basin ${boxText(box)}`);
    } else if (grid) {
      const cell = grid.cellAt(Math.min(pr.lon, box.e - EPS), Math.min(pr.lat, box.n - EPS));
      if (cell && !grid.ocean[grid.idx(cell.i, cell.j)]) {
        const which = land.findIndex((s) =>
          insideShape(s as LandShape, grid!.lonCentre[cell.i], grid!.latCentre[cell.j]),
        );
        add(
          ['probes', i],
          `(${pr.lon}, ${pr.lat}) lies on land${which >= 0 ? ` (basin.land[${which}])` : ''}; move it into the ocean`,
        );
      }
    }
  });
  const lats: unknown[] = Array.isArray(sc.hovmoller?.lat) ? sc.hovmoller.lat : [];
  lats.forEach((lat, i) => {
    if (box && num(lat) && !(lat >= box.s && lat <= box.n))
      add(['hovmoller', 'lat', i], `${lat} lies outside the basin's latitudes ${box.s}..${box.n}`);
  });

  // Wind parts.
  const parts: unknown[] = Array.isArray(sc.wind?.parts) ? sc.wind.parts : [];
  parts.forEach((part: any, i) =>
    windPartIssues(part, ['wind', 'parts', i], num(t.days) && t.days > 0 ? t.days : null, add),
  );
  couplingIssues(sc, add);

  // A user time step above the stability limit (only when the numbers it needs are sound), or
  // one that does not divide the output interval into whole steps (records on whole intervals).
  if (
    num(t.dtSeconds) &&
    t.dtSeconds > 0 &&
    cellsOk &&
    num(p.reducedGravity) &&
    num(p.layerThickness) &&
    num(p.viscosity)
  ) {
    let lim: ReturnType<typeof scenarioStability> | null = null;
    try {
      lim = scenarioStability(resolveScenario(sc));
    } catch {
      lim = null; // a section of the wrong type, already reported by the schema
    }
    if (lim && Number.isFinite(lim.dtMax) && t.dtSeconds > lim.dtMax) {
      add(
        ['time', 'dtSeconds'],
        `${t.dtSeconds} s is above the stability limit: ${lim.explanation}; use at most ${Math.floor(lim.dtMax)} s or "auto"`,
      );
    } else if (num(t.outputEveryDays) && t.outputEveryDays > 0) {
      const interval = secondsOfDays(t.outputEveryDays);
      if (stepsInInterval(t.dtSeconds, interval) === 0)
        add(['time', 'dtSeconds'], notDividing(t.dtSeconds, interval, lim ? lim.dtMax : Infinity));
    }
  }
  return out;
}

function windPartIssues(
  part: any,
  at: PathSegment[],
  days: number | null,
  add: (p: PathSegment[], m: string) => void,
): void {
  if (!part || typeof part !== 'object') return;
  if (part.kind === 'fixed') {
    const src = part.source;
    if (src?.kind === 'shaped' && part.quantity === 'stress') {
      for (const c of ['x', 'y'] as const) {
        if (num(src[c]) && Math.abs(src[c]) > 5) {
          add(
            [...at, 'source', c],
            `${src[c]} N m-2 is far beyond any wind stress (trades are about 0.05); for a wind speed in m s-1 set quantity to "wind"`,
          );
        }
      }
    }
    const prof = src?.shape?.kind === 'band' ? src.shape.profile : null;
    if (prof?.kind === 'tanh' && num(prof.south) && num(prof.north) && !(prof.north > prof.south)) {
      add([...at, 'source', 'shape', 'profile', 'north'], `must be north of south (${prof.south}) (got ${prof.north})`);
    }
    if (src?.kind === 'painted' && src.grid && Number.isInteger(src.grid.nLon) && Number.isInteger(src.grid.nLat)) {
      const n = src.grid.nLon * src.grid.nLat;
      for (const c of ['x', 'y'] as const) {
        if (Array.isArray(src.grid[c]) && src.grid[c].length !== n) {
          add(
            [...at, 'source', 'grid', c],
            `must hold nLat x nLon = ${src.grid.nLat} x ${src.grid.nLon} = ${n} values (got ${src.grid[c].length})`,
          );
        }
      }
    }
    const env = part.envelope;
    if (
      env?.kind === 'pulse' &&
      num(env.ramp) &&
      num(env.duration) &&
      env.duration > 0 &&
      env.ramp > env.duration / 2 + EPS
    ) {
      add(
        [...at, 'envelope', 'ramp'],
        `a ramp of ${env.ramp} days is longer than half the pulse duration (${env.duration} days); use at most ${env.duration / 2}`,
      );
    }
    if (env?.kind === 'table' && Array.isArray(env.points)) {
      for (let k = 1; k < env.points.length; k++) {
        const d0 = env.points[k - 1]?.[0];
        const d1 = env.points[k]?.[0];
        if (num(d0) && num(d1) && !(d1 > d0)) {
          add(
            [...at, 'envelope', 'points', k],
            `day ${d1} does not come after day ${d0} of the point before; the days of a table must increase`,
          );
        }
      }
    }
  } else if (part.kind === 'bursts') {
    const ranges = ['window', 'amplitude', 'lon', 'lat', 'lonWidth', 'latWidth', 'duration'] as const;
    for (const r of ranges) {
      const v = part[r];
      if (Array.isArray(v) && num(v[0]) && num(v[1])) {
        if (v[0] > v[1]) add([...at, r], `the range [${v[0]}, ${v[1]}] is reversed; write [min, max] with min <= max`);
        else if ((r === 'lonWidth' || r === 'latWidth' || r === 'duration') && !(v[0] > 0)) {
          add([...at, r], `must be positive: the range [${v[0]}, ${v[1]}] starts at ${v[0]}`);
        } else if (r === 'window' && v[0] < 0) add([...at, r], `starts on day ${v[0]}; bursts can start from day 0`);
      }
    }
    const dur = part.duration;
    if (num(part.ramp) && Array.isArray(dur) && num(dur[0]) && dur[0] > 0 && part.ramp > dur[0] / 2 + EPS) {
      add(
        [...at, 'ramp'],
        `a ramp of ${part.ramp} days is longer than half the shortest burst (${dur[0]} days); use at most ${dur[0] / 2}`,
      );
    }
    const win = part.window;
    if (days !== null && Array.isArray(win) && num(win[0]) && win[0] >= days) {
      add([...at, 'window'], `no burst can start: the window opens on day ${win[0]}, the run ends on day ${days}`);
    }
  }
}

function wholeCells(
  extent: number,
  d: number,
  word: string,
  path: PathSegment[],
  add: (p: PathSegment[], m: string) => void,
): boolean {
  const n = extent / d;
  const whole = Math.round(n);
  if (whole < 1) {
    add(path, `a cell of ${d} degrees is larger than the basin, which is ${extent} degrees ${word}`);
    return false;
  }
  if (Math.abs(n - whole) > 1e-6 * Math.max(1, whole)) {
    const nice = [0.05, 0.1, 0.125, 0.2, 0.25, 0.5, 1, 2, 2.5, 5].filter(
      (c) => Math.abs(extent / c - Math.round(extent / c)) < 1e-9,
    );
    const near = nice.sort((a, c) => Math.abs(a - d) - Math.abs(c - d)).slice(0, 2);
    add(
      path,
      `the basin is ${extent} degrees ${word}, not a whole number of ${d}-degree cells (${n.toFixed(2)})${near.length ? `; ${near.join(' or ')} would fit` : ''}`,
    );
    return false;
  }
  return true;
}

function inBox(b: Box, lon: number, lat: number): boolean {
  return lon >= b.w - EPS && lon <= b.e + EPS && lat >= b.s - EPS && lat <= b.n + EPS;
}

function boxText(b: Box): string {
  return `(${b.w}..${b.e} E, ${b.s}..${b.n} N)`;
}
