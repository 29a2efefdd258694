// The wind designer's data: every kind of part survives design -> JSON -> validate -> load -> JSON
// unchanged; the preview is the model's own forcing; imported files become painted parts.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { Grid } from '../../model/grid.ts';
import { buildWindStress } from '../../model/forcing/wind.ts';
import { resolveScenario, validateScenario } from '../../model/scenario/index.ts';
import {
  deletePart,
  duplicatePart,
  movePart,
  newPart,
  PATTERN_KINDS,
  setEnabled,
  setAt,
  windOf,
  withWind,
} from '../../viewer/wind/design.ts';
import { dab } from '../../viewer/wind/paint.ts';
import { layerValues, previewSetup, stressAt, stressSeriesAt } from '../../viewer/wind/preview.ts';
import { hatEnvelope, ImportError, partsFromSeries, readGridded } from '../../viewer/wind/import.ts';
import { caretLines, checkFormula } from '../../viewer/wind/formula-check.ts';
import { seriesFromGrid } from '../../model/forcing/gridded.ts';
import { compileEnvelope } from '../../model/forcing/envelopes.ts';

const base = JSON.parse(readFileSync(new URL('../../configs/westerly-burst.json', import.meta.url), 'utf8')) as Record<
  string,
  unknown
>;
const basin = base.basin as { lonWest: number; lonEast: number; latSouth: number; latNorth: number };

describe('design round trip', () => {
  it('every part kind: design -> JSON -> validate -> load into the panel -> JSON identical', () => {
    let w = windOf({ ...base, wind: { parts: [] } });
    for (const k of PATTERN_KINDS) w = { ...w, parts: [...w.parts, newPart(k, basin, 2)] };
    // Edits of the kinds the panel makes: paint, tilt, a switched-off part, a moved and a copied part.
    const painted = w.parts.findIndex((p) => p.kind === 'fixed' && p.source.kind === 'painted');
    const g = (w.parts[painted] as { source: { grid: Parameters<typeof dab>[0] } }).source.grid;
    dab(g, 40, 0, { radius: 6, softEdge: 0.5, strength: 0.04, directionDeg: 180, mode: 'paint' });
    w.parts[2] = setAt(w.parts[2], 'source.shape.tiltDeg', 20);
    w.parts[3] = setEnabled(w.parts[3], false);
    w = { ...w, parts: duplicatePart(movePart(w.parts, 0, 1), 1) };
    w.parts[0] = setAt(w.parts[0], 'envelope', {
      kind: 'harmonics',
      mean: 1,
      terms: [{ period: 365, amplitude: 0.3, peakDay: 80 }],
    });
    w.parts[1] = setAt(w.parts[1], 'envelope', {
      kind: 'table',
      points: [
        [0, 0],
        [10, 1],
        [70, 1],
        [75, 0],
      ],
    });
    const json = withWind(base, w);
    const text = `${JSON.stringify(json, null, 2)}\n`;
    const r = validateScenario(JSON.parse(text));
    // The file part names a path only the command line can read; the rest must be valid as is.
    expect(r.ok ? [] : r.errors).toEqual([]);
    // Load into the panel: the panel keeps the file's wind and composes it back onto the file.
    const loaded = JSON.parse(text) as Record<string, unknown>;
    const again = `${JSON.stringify(withWind(loaded, windOf(loaded)), null, 2)}\n`;
    expect(again).toBe(text);
    expect(
      new Set(
        windOf(loaded).parts.map((p) =>
          p.kind !== 'fixed' ? p.kind : p.source.kind === 'shaped' ? p.source.shape.kind : p.source.kind,
        ),
      ),
    ).toEqual(new Set(['uniform', 'band', 'patch', 'formula', 'painted', 'file', 'bursts', 'answering']));
  });

  it('keeps a file without a wind section as it was, and deleting every part leaves an empty list', () => {
    const { wind: _w, ...noWind } = base;
    expect(JSON.stringify(withWind(noWind, windOf(noWind)))).toBe(JSON.stringify(noWind));
    const w = windOf(base);
    const empty = { ...w, parts: deletePart(w.parts, 0) };
    expect((withWind(base, empty).wind as { parts: unknown[]; updateHours: number }).parts).toEqual([]);
    expect((withWind(base, empty).wind as { updateHours: number }).updateHours).toBe(3);
  });
});

describe('preview', () => {
  it('is bit for bit what buildWindStress gives the model at that day, centred like the output fields', () => {
    const sc = withWind(base, { ...windOf(base), parts: [...windOf(base).parts, newPart('band', basin)] });
    const { resolved, grid } = previewSetup(sc);
    const day = 17.3;
    const f = stressAt(resolved, grid, day);
    const g2 = new Grid(resolved.model.basin, resolved.model.physics.earthRadius);
    const { stress } = buildWindStress(g2, resolved.wind, { seed: String(resolved.seed) });
    const tx = g2.field();
    const ty = g2.field();
    stress.fill(day * 86400, tx, ty);
    for (const [i, j] of [
      [60, 50],
      [10, 3],
      [200, 70],
    ]) {
      const k = g2.idx(i, j);
      expect(f.taux[j * grid.nx + i]).toBe(Math.fround(0.5 * (tx[k] + tx[k + 1])));
      expect(f.tauy[j * grid.nx + i]).toBe(Math.fround(0.5 * (ty[k] + ty[k + g2.W])));
    }
    // The patch is at its peak: about 0.1 N m-2 eastward at 30E on the equator, on top of the trades.
    const at = (lon: number, lat: number) =>
      Math.floor((lat - basin.latSouth) / 0.5) * grid.nx + Math.floor((lon - basin.lonWest) / 0.5);
    expect(f.taux[at(30.2, 0.2)]).toBeGreaterThan(0.04);
    expect(f.taux[at(120, 0.2)]).toBeCloseTo(-0.05, 2);
  });

  it('curl and Sverdrup layers: V = curl/(rho0 beta), and U integrated from the east coast', () => {
    // Zonal stress taux = -0.05 cos(pi lat / 60) (trades to 30 degrees): curl = -d(taux)/dy.
    const w = windOf(base);
    const part = newPart('band', basin);
    const sc = withWind(base, { ...w, parts: [setAt(part, 'source.shape.profile', { kind: 'trades', edgeLat: 30 })] });
    const { resolved, grid } = previewSetup(sc);
    const f = stressAt(resolved, grid, 0);
    const phys = resolved.model.physics;
    const curl = layerValues(f, 'curl', grid, phys);
    const V = layerValues(f, 'sverdrupV', grid, phys);
    const U = layerValues(f, 'sverdrupU', grid, phys);
    const j = grid.nearestRow(10);
    const k = j * grid.nx + 100;
    const lat = grid.latCentre[j];
    const mPerDeg = (phys.earthRadius * Math.PI) / 180;
    const exact = -0.05 * (Math.PI / (60 * mPerDeg)) * Math.sin((Math.PI * lat) / 60);
    expect(curl[k]).toBeCloseTo(exact, 10);
    expect(curl[k] / exact).toBeCloseTo(1, 3);
    expect(V[k]).toBeCloseTo(curl[k] / (phys.density * phys.beta), 6);
    // Zonally uniform curl: U grows linearly westward from 0 at the east coast.
    const east = U[j * grid.nx + grid.nx - 1];
    const west = U[j * grid.nx];
    expect(Math.abs(east)).toBeLessThan(Math.abs(west) / 100);
    expect(west / U[j * grid.nx + grid.nx / 2 - 1]).toBeCloseTo(2, 1);
  });

  it('the series at a point matches the full field at each day', () => {
    const { resolved, grid } = previewSetup(base);
    const s = stressSeriesAt(resolved, grid, 30.1, 0.1, [0, 12, 17, 30])!;
    for (const [n, d] of [0, 12, 17, 30].entries()) {
      const f = stressAt(resolved, grid, d);
      const k = grid.nearestRow(0.1) * grid.nx + 60;
      expect(s.taux[n]).toBeCloseTo(f.taux[k], 6);
    }
    expect(s.taux[2]).toBeGreaterThan(0.09);
  });
});

describe('formula checking', () => {
  it('reports the model compiler message and position, and puts a caret there', () => {
    const r = checkFormula('cos(lonn)', basin);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.message).toMatch(/unknown name 'lonn'/);
      expect(r.index).toBe(4);
      expect(caretLines('cos(lonn)', r.index)[1]).toBe('    ^');
    }
    const ok = checkFormula('exp(-(lat/10)^2)', basin);
    expect(ok.ok && ok.max === 1 && ok.min > 0).toBe(true);
    const bad = checkFormula('sqrt(lat)', basin);
    expect(bad.ok && bad.badAt).toMatch(/gives NaN at lon/);
  });
});

describe('import', () => {
  it('stores a CSV grid as a painted part that gives the same stress as the file part', () => {
    const rows = ['lon,lat,x,y'];
    for (let lat = -10; lat <= 10; lat += 2)
      for (let lon = 0; lon <= 140; lon += 10)
        rows.push(`${lon},${lat},${(-0.05 * Math.cos((lat * Math.PI) / 40)).toFixed(5)},0.001`);
    const csv = new TextEncoder().encode(rows.join('\n'));
    const series = readGridded('trades.csv', csv);
    const { parts } = partsFromSeries(series, 'trades.csv', 'stress', basin);
    expect(parts).toHaveLength(1);
    const painted = withWind(base, { ...windOf(base), parts });
    const filed = withWind(base, {
      ...windOf(base),
      parts: [
        {
          kind: 'fixed',
          quantity: 'stress',
          source: { kind: 'file', path: 'trades.csv', format: 'csv' },
          envelope: { kind: 'constant' },
        },
      ],
    });
    const a = (() => {
      const { resolved, grid } = previewSetup(painted);
      return stressAt(resolved, grid, 0);
    })();
    const { resolved, grid } = previewSetup(filed);
    const b = stressAt(resolved, grid, 0, new Map([['trades.csv', csv]]));
    expect(Array.from(a.taux)).toEqual(Array.from(b.taux));
  });

  it('turns a time series into parts whose hat envelopes are the linear interpolation in time', () => {
    const days = Float64Array.from([0, 10, 30]);
    for (const t of [-5, 0, 4, 10, 22, 30, 50]) {
      const sum = [0, 1, 2].map((s) => compileEnvelope(hatEnvelope(days, s)).at(t));
      const w = t <= 10 ? Math.max(0, t / 10) : Math.min(1, (t - 10) / 20);
      const expected = t <= 10 ? [1 - w, w, 0] : [0, 1 - w, w];
      sum.forEach((v, k) => expect(v).toBeCloseTo(expected[k], 12));
    }
  });

  it('refuses bad files with the reason', () => {
    expect(() => readGridded('w.csv', new TextEncoder().encode('lon,lat,x,y\n1,2,abc,0\n'))).toThrow(
      /w\.csv: CSV line 2, column 3 \('x'\): the value is not a number/,
    );
    expect(() => readGridded('w.nc', Uint8Array.from([0x89, 0x48, 0x44, 0x46, 13, 10]))).toThrow(/NetCDF-4 \(HDF5\)/);
    expect(() => readGridded('w.nc', new TextEncoder().encode('hello'))).toThrow(/not a NetCDF classic file/);
    const far = seriesFromGrid({
      lon0: -170,
      lat0: 0,
      dLon: 1,
      dLat: 1,
      nLon: 2,
      nLat: 2,
      x: [0, 0, 0, 0],
      y: [0, 0, 0, 0],
    });
    expect(() => partsFromSeries(far, 'far.csv', 'stress', basin)).toThrow(ImportError);
    expect(() => partsFromSeries(far, 'far.csv', 'stress', basin)).toThrow(/lie outside the basin/);
  });
});

it('resolves the shipped scenario used above', () => {
  const r = validateScenario(base);
  expect(r.ok && resolveScenario(r.scenario).model.physics.density).toBe(1025);
});
