// The wind design the panel edits: the scenario's wind section as plain JSON, changed only through
// these functions. Parts are kept exactly as written (key order, optional keys), so a scenario
// loaded into the panel and saved again gives the same text.

import type { BandProfile, EnvelopeSpec, GriddedVectors, WindPart } from '../../model/forcing/spec.ts';
import { blankGrid } from './paint.ts';

type Json = Record<string, unknown>;

/** The scenario's wind section as written (parts and whatever else the file had). */
export interface WindSection {
  parts: WindPart[];
  [key: string]: unknown;
}

export const PATTERN_KINDS = ['uniform', 'band', 'patch', 'formula', 'painted', 'file', 'bursts', 'answering'] as const;
export type PatternKind = (typeof PATTERN_KINDS)[number];

export const PATTERN_LABELS: Record<PatternKind, string> = {
  uniform: 'Uniform',
  band: 'Latitude profile',
  patch: 'Gaussian patch',
  formula: 'Formula',
  painted: 'Painted',
  file: 'Gridded file',
  bursts: 'Random bursts',
  answering: 'Answering wind (coupled)',
};

export interface BasinBox {
  lonWest: number;
  lonEast: number;
  latSouth: number;
  latNorth: number;
}

/** The wind section of a scenario file, with an empty part list when it has none. */
export function windOf(scenario: Json): WindSection {
  const w = (scenario.wind ?? {}) as Json;
  return { ...structuredClone(w), parts: structuredClone((w.parts as WindPart[] | undefined) ?? []) } as WindSection;
}

/**
 * The scenario with this wind. A file that had no wind section and still has no parts stays
 * without one; key order of the file is kept (wind replaces itself in place).
 */
export function withWind(scenario: Json, wind: WindSection): Json {
  const out = structuredClone(scenario);
  const hadWind = 'wind' in scenario;
  const onlyParts = Object.keys(wind).length === 1;
  if (!hadWind && onlyParts && wind.parts.length === 0) return out;
  // A section that had no "parts" key and still has none keeps its shape.
  const had = (scenario.wind ?? {}) as Json;
  const section = structuredClone(wind) as Json;
  if (!('parts' in had) && wind.parts.length === 0) delete section.parts;
  out.wind = section;
  return out;
}

/** The kind of pattern a part has, as the panel names them. */
export function patternOf(part: WindPart): PatternKind {
  if (part.kind === 'bursts') return 'bursts';
  if (part.kind === 'answering') return 'answering';
  const src = part.source;
  if (src.kind === 'painted') return 'painted';
  if (src.kind === 'file') return 'file';
  return src.shape.kind;
}

/** A new part of a kind, with values that make sense in the basin. */
export function newPart(kind: PatternKind, basin: BasinBox, paintSpacing = 1): WindPart {
  const midLon = Number(((basin.lonWest + basin.lonEast) / 2).toFixed(2));
  const midLat = Math.min(basin.latNorth, Math.max(basin.latSouth, 0));
  const span = basin.lonEast - basin.lonWest;
  const constant: EnvelopeSpec = { kind: 'constant' };
  const shaped = (shape: Json, x: number, y = 0): WindPart =>
    ({
      kind: 'fixed',
      name: '',
      quantity: 'stress',
      source: { kind: 'shaped', shape, x, y },
      envelope: constant,
    }) as unknown as WindPart;
  let part: WindPart;
  switch (kind) {
    case 'uniform':
      part = shaped({ kind: 'uniform' }, -0.05);
      break;
    case 'band': {
      const profile: BandProfile = {
        kind: 'trades',
        edgeLat: Math.max(1, Math.min(30, Math.max(Math.abs(basin.latSouth), Math.abs(basin.latNorth)))),
      };
      part = shaped({ kind: 'band', profile }, -0.05);
      break;
    }
    case 'patch':
      part = shaped(
        { kind: 'patch', lon: midLon, lat: midLat, lonWidth: Number(Math.max(1, span / 20).toFixed(1)), latWidth: 4 },
        0.1,
      );
      part = { ...part, envelope: { kind: 'pulse', start: 10, duration: 14, ramp: 3 } } as WindPart;
      break;
    case 'formula':
      part = shaped({ kind: 'formula', expression: 'exp(-(lat/10)^2)' }, -0.05);
      break;
    case 'painted':
      part = {
        kind: 'fixed',
        name: '',
        quantity: 'stress',
        source: { kind: 'painted', grid: blankGrid(basin, paintSpacing) },
        envelope: constant,
      } as WindPart;
      break;
    case 'file':
      part = {
        kind: 'fixed',
        name: '',
        quantity: 'stress',
        source: { kind: 'file', path: 'winds.csv', format: 'csv' },
        envelope: constant,
      } as WindPart;
      break;
    case 'bursts':
      part = {
        kind: 'bursts',
        name: '',
        quantity: 'stress',
        ratePerYear: 6,
        window: [0, 180],
        amplitude: [0.05, 0.15],
        lon: [basin.lonWest + span * 0.1, basin.lonWest + span * 0.4].map((v) => Number(v.toFixed(1))) as [
          number,
          number,
        ],
        lat: [-2, 2],
        lonWidth: [4, 8],
        latWidth: [2, 4],
        duration: [6, 14],
        ramp: 2,
      };
      break;
    case 'answering':
      // The cold tongue in the eastern third of the basin, on the equator; the shipped scenario's numbers.
      part = {
        kind: 'answering',
        name: '',
        strength: 20,
        everySteps: 8,
        drag: 'linear',
        background: { x: -6, y: 0 },
        sst: {
          region: {
            kind: 'patch',
            lon: Number((basin.lonEast - span * 0.2).toFixed(1)),
            lat: midLat,
            lonWidth: Number(Math.max(1, span / 7).toFixed(1)),
            latWidth: 4,
          },
          upwellingDays: 30,
          dampingDays: 125,
          subsurface: { warm: 2, warmDepth: 25, cold: 4, coldDepth: 50 },
          meanGradient: 0,
          initial: 0,
        },
        atmosphere: { speed: 30, dampingDays: 2, heatingModes: 1 },
      };
      break;
  }
  part.name = PATTERN_LABELS[kind].toLowerCase();
  return part;
}

/** One line that says what a part is: pattern, envelope, amplitude with units. */
export function summary(part: WindPart): string {
  const pattern = PATTERN_LABELS[patternOf(part)].toLowerCase();
  if (part.kind === 'answering') {
    const r = part.sst?.region;
    const where =
      r?.kind === 'patch' ? ` over a region at ${r.lon}°E, ${r.lat}°N` : r ? ` over a ${r.kind} region` : '';
    return `${pattern}, ${part.strength} m/s per K${where}, every ${part.everySteps ?? 8} steps`;
  }
  const units = part.quantity === 'wind' ? 'm/s' : 'N m-2';
  if (part.kind === 'bursts') {
    return `${pattern}, ${part.ratePerYear} per year in days ${part.window[0]}-${part.window[1]}, ${part.amplitude[0]}-${part.amplitude[1]} ${units} eastward`;
  }
  const env = part.envelope.kind;
  const src = part.source;
  let amp = '';
  if (src.kind === 'shaped') {
    const m = Math.hypot(Number(src.x), Number(src.y));
    const dir =
      Number(src.y) === 0
        ? Number(src.x) < 0
          ? ' westward'
          : Number(src.x) > 0
            ? ' eastward'
            : ''
        : ` toward ${((Math.atan2(Number(src.y), Number(src.x)) * 180) / Math.PI).toFixed(0)}°`;
    amp = `${Number.isFinite(m) ? Number(m.toPrecision(3)) : '?'} ${units}${dir}`;
  } else if (src.kind === 'painted') {
    const g = src.grid as GriddedVectors;
    let big = 0;
    for (let k = 0; k < g.x.length; k++) big = Math.max(big, Math.hypot(g.x[k], g.y[k]));
    amp = `${g.nLon} x ${g.nLat} points at ${g.dLon}°, up to ${Number(big.toPrecision(3))} ${units}`;
  } else amp = `${src.format} file ${src.path}, ${units}`;
  return `${pattern} x ${env}, ${amp}`;
}

// ---- list operations (each returns a new list; the panel records history around them) ----

export function movePart(parts: WindPart[], k: number, by: -1 | 1): WindPart[] {
  const to = k + by;
  if (to < 0 || to >= parts.length) return parts;
  const out = parts.slice();
  [out[k], out[to]] = [out[to], out[k]];
  return out;
}

export function duplicatePart(parts: WindPart[], k: number): WindPart[] {
  const copy = structuredClone(parts[k]);
  copy.name = `${parts[k].name ?? 'part'} (copy)`;
  return [...parts.slice(0, k + 1), copy, ...parts.slice(k + 1)];
}

export function deletePart(parts: WindPart[], k: number): WindPart[] {
  return parts.filter((_, n) => n !== k);
}

/** On or off. "On" removes the key when the part never had one (the default is on). */
export function setEnabled(part: WindPart, on: boolean): WindPart {
  const out = structuredClone(part) as WindPart & { enabled?: boolean };
  if (on) delete out.enabled;
  else out.enabled = false;
  return out;
}

/** A value at a path inside a part ("source.shape.lon", "window.0"). */
export function getAt(obj: unknown, path: string): unknown {
  let o = obj;
  for (const k of path.split('.')) o = o && typeof o === 'object' ? (o as Json)[k] : undefined;
  return o;
}

export function setAt<T>(obj: T, path: string, value: unknown): T {
  const out = structuredClone(obj);
  const keys = path.split('.');
  let o = out as unknown as Json;
  for (const k of keys.slice(0, -1)) o = o[k] as Json;
  const last = keys[keys.length - 1];
  if (value === undefined) delete o[last];
  else o[last] = value;
  return out;
}
