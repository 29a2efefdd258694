// What can be edited in each kind of part: the fields, their units, and their valid ranges read
// from the scenario schema (configs/scenario.schema.json), so the page and the file agree.

import { deref, scenarioSchema, type SchemaNode } from '../../model/scenario/schema.ts';
import type { BandProfile, EnvelopeSpec, ShapeSpec, WindPart } from '../../model/forcing/spec.ts';
import { getAt } from './design.ts';

export interface FieldSpec {
  /** Path inside the part, "source.shape.lon", "window.0". */
  path: string;
  label: string;
  units: string;
  type: 'number' | 'text' | 'select';
  options?: string[];
  /** The key may be absent (empty box removes it). */
  optional?: boolean;
}

const DEFS = (scenarioSchema.$defs ?? {}) as Record<string, SchemaNode>;

/** The oneOf branch whose "kind" constant matches the value's kind. */
function branch(node: SchemaNode, value: unknown): SchemaNode {
  const n = deref(node);
  if (!Array.isArray(n.oneOf)) return n;
  const kind = value && typeof value === 'object' ? (value as Record<string, unknown>).kind : undefined;
  for (const b of n.oneOf as SchemaNode[]) {
    const d = deref(b);
    if (d.properties?.kind?.const === kind) return d;
  }
  return n;
}

/** The schema node of a field of a part (undefined if the schema has none there). */
export function schemaFor(part: WindPart, path: string): SchemaNode | undefined {
  let node: SchemaNode | undefined = branch(DEFS.windPart, part);
  let value: unknown = part;
  for (const seg of path.split('.')) {
    if (!node) return undefined;
    if (/^\d+$/.test(seg)) {
      const items = node.prefixItems as SchemaNode[] | undefined;
      node = items ? items[Number(seg)] : node.items;
    } else node = node.properties?.[seg];
    value = value && typeof value === 'object' ? (value as Record<string, unknown>)[seg] : undefined;
    if (node) node = branch(node, value);
  }
  return node;
}

/** ">= 0, <= 365" from the schema's bounds. */
export function rangeHint(part: WindPart, path: string): string {
  const n = schemaFor(part, path);
  if (!n) return '';
  const out: string[] = [];
  if (n.exclusiveMinimum !== undefined) out.push(`> ${n.exclusiveMinimum}`);
  if (n.minimum !== undefined) out.push(`>= ${n.minimum}`);
  if (n.maximum !== undefined) out.push(`<= ${n.maximum}`);
  if (n.exclusiveMaximum !== undefined) out.push(`< ${n.exclusiveMaximum}`);
  return out.join(', ');
}

export function describe(part: WindPart, path: string): string {
  return String(schemaFor(part, path)?.description ?? '');
}

export const ENVELOPE_KINDS: EnvelopeSpec['kind'][] = ['constant', 'ramp', 'pulse', 'harmonics', 'table', 'switch-off'];
export const SHAPE_KINDS: ShapeSpec['kind'][] = ['uniform', 'band', 'patch', 'formula'];
export const PROFILE_KINDS: BandProfile['kind'][] = ['trades', 'cosine', 'tanh', 'gap'];

export function defaultEnvelope(kind: EnvelopeSpec['kind'], runDays: number): EnvelopeSpec {
  const d = Math.max(1, runDays);
  switch (kind) {
    case 'constant':
      return { kind: 'constant' };
    case 'ramp':
      return { kind: 'ramp', start: 0, duration: Math.max(1, Math.round(d / 10)), direction: 'up' };
    case 'pulse':
      return { kind: 'pulse', start: 10, duration: 14, ramp: 3 };
    case 'harmonics':
      return { kind: 'harmonics', mean: 0, terms: [{ period: 365, amplitude: 1, peakDay: 0 }] };
    case 'table':
      return {
        kind: 'table',
        points: [
          [0, 0],
          [10, 1],
        ],
      };
    case 'switch-off':
      return { kind: 'switch-off', day: Math.round(d / 2), ramp: 5 };
  }
}

export function defaultProfile(kind: BandProfile['kind']): BandProfile {
  switch (kind) {
    case 'trades':
      return { kind: 'trades', edgeLat: 30 };
    case 'cosine':
      return { kind: 'cosine', centre: 0, halfWidth: 10 };
    case 'tanh':
      return { kind: 'tanh', south: -10, north: 10, edge: 2 };
    case 'gap':
      return { kind: 'gap', centre: 6, width: 2, depth: 0.7 };
  }
}

export function defaultShape(kind: ShapeSpec['kind'], basin: { lonWest: number; lonEast: number }): ShapeSpec {
  switch (kind) {
    case 'uniform':
      return { kind: 'uniform' };
    case 'band':
      return { kind: 'band', profile: defaultProfile('trades') };
    case 'patch':
      return {
        kind: 'patch',
        lon: Number(((basin.lonWest + basin.lonEast) / 2).toFixed(2)),
        lat: 0,
        lonWidth: Math.max(1, Number(((basin.lonEast - basin.lonWest) / 20).toFixed(1))),
        latWidth: 4,
      };
    case 'formula':
      return { kind: 'formula', expression: 'exp(-(lat/10)^2)' };
  }
}

/** The fields of a shape (patch or band profile) at a path inside a part. */
function shapeFields(at: string, sh: ShapeSpec, f: FieldSpec[]): void {
  if (sh.kind === 'patch') {
    f.push({ path: `${at}.lon`, label: 'Centre longitude', units: '°E', type: 'number' });
    f.push({ path: `${at}.lat`, label: 'Centre latitude', units: '°N', type: 'number' });
    f.push({ path: `${at}.lonWidth`, label: "Width along x'", units: '°', type: 'number' });
    f.push({ path: `${at}.latWidth`, label: "Width along y'", units: '°', type: 'number' });
    f.push({ path: `${at}.tiltDeg`, label: 'Tilt (anticlockwise)', units: '°', type: 'number', optional: true });
  } else if (sh.kind === 'band') {
    const p = sh.profile;
    const pp = (k: string) => `${at}.profile.${k}`;
    if (p.kind === 'trades')
      f.push({ path: pp('edgeLat'), label: 'Falls to zero at', units: '° from the equator', type: 'number' });
    if (p.kind === 'cosine') {
      f.push({ path: pp('centre'), label: 'Centre', units: '°N', type: 'number' });
      f.push({ path: pp('halfWidth'), label: 'Half-width', units: '°', type: 'number' });
    }
    if (p.kind === 'tanh') {
      f.push({ path: pp('south'), label: 'South edge', units: '°N', type: 'number' });
      f.push({ path: pp('north'), label: 'North edge', units: '°N', type: 'number' });
      f.push({ path: pp('edge'), label: 'Edge width', units: '°', type: 'number' });
    }
    if (p.kind === 'gap') {
      f.push({ path: pp('centre'), label: 'Gap centre', units: '°N', type: 'number' });
      f.push({ path: pp('width'), label: 'Gap width', units: '°', type: 'number' });
      f.push({ path: pp('depth'), label: 'Fraction removed', units: '0-1', type: 'number' });
    }
  }
}

/** The fields of an answering part: coupling, background wind, the SST's region and relation, the atmosphere. */
function answeringFields(part: Extract<WindPart, { kind: 'answering' }>): FieldSpec[] {
  const f: FieldSpec[] = [
    { path: 'strength', label: 'Coupling strength mu', units: 'm s-1 per K', type: 'number' },
    { path: 'everySteps', label: 'Couple every', units: 'ocean steps', type: 'number' },
    { path: 'background.x', label: 'Background wind, eastward', units: 'm s-1', type: 'number' },
    { path: 'background.y', label: 'Background wind, northward', units: 'm s-1', type: 'number' },
  ];
  shapeFields('sst.region', part.sst.region, f);
  f.push(
    { path: 'sst.upwellingDays', label: 'Upwelling renews the surface in', units: 'days', type: 'number' },
    { path: 'sst.dampingDays', label: 'SST damping time', units: 'days', type: 'number' },
    { path: 'sst.subsurface.warm', label: 'Subsurface warming at most', units: 'K', type: 'number' },
    { path: 'sst.subsurface.warmDepth', label: '... over a deepening of', units: 'm', type: 'number' },
    { path: 'sst.subsurface.cold', label: 'Subsurface cooling at most', units: 'K', type: 'number' },
    { path: 'sst.subsurface.coldDepth', label: '... over a shoaling of', units: 'm', type: 'number' },
    {
      path: 'sst.meanGradient',
      label: 'Mean zonal SST gradient (0: no advection)',
      units: 'K per 1000 km',
      type: 'number',
    },
    { path: 'sst.initial', label: 'SST anomaly at the start, times the region', units: 'K', type: 'number' },
    { path: 'atmosphere.speed', label: 'Atmosphere wave speed c_a', units: 'm s-1', type: 'number' },
    { path: 'atmosphere.dampingDays', label: 'Atmosphere damping time 1/eps', units: 'days', type: 'number' },
    { path: 'atmosphere.heatingModes', label: 'Heating projected onto', units: 'Hermite functions', type: 'number' },
  );
  return f;
}

/** The numeric and text fields of a part (selects and special editors are added by the editor). */
export function fieldsOf(part: WindPart): FieldSpec[] {
  if (part.kind === 'answering') return answeringFields(part);
  const q = part.quantity === 'wind' ? 'm s-1' : 'N m-2';
  const f: FieldSpec[] = [];
  if (part.kind === 'bursts') {
    const pair = (key: string, label: string, units: string) => {
      f.push({ path: `${key}.0`, label: `${label}, from`, units, type: 'number' });
      f.push({ path: `${key}.1`, label: `${label}, to`, units, type: 'number' });
    };
    f.push({ path: 'ratePerYear', label: 'Bursts per year', units: '1/365 d', type: 'number' });
    pair('window', 'Start day', 'day');
    pair('amplitude', 'Amplitude (eastward)', q);
    pair('lon', 'Centre longitude', '°E');
    pair('lat', 'Centre latitude', '°N');
    pair('lonWidth', 'Width in longitude', '°');
    pair('latWidth', 'Width in latitude', '°');
    pair('duration', 'Duration', 'days');
    f.push({ path: 'ramp', label: 'Ramp at each end', units: 'days', type: 'number' });
    return f;
  }
  const src = part.source;
  if (src.kind === 'shaped') {
    f.push({ path: 'source.x', label: 'Eastward component x', units: q, type: 'number' });
    f.push({ path: 'source.y', label: 'Northward component y', units: q, type: 'number' });
    shapeFields('source.shape', src.shape, f);
  } else if (src.kind === 'file') {
    f.push({ path: 'source.path', label: 'File (relative to the scenario)', units: '', type: 'text' });
    f.push({ path: 'source.xVariable', label: 'Eastward variable', units: '', type: 'text', optional: true });
    f.push({ path: 'source.yVariable', label: 'Northward variable', units: '', type: 'text', optional: true });
  }
  const env = part.envelope;
  const e = (k: string) => `envelope.${k}`;
  if (env.kind === 'ramp') {
    f.push({ path: e('start'), label: 'Ramp starts', units: 'day', type: 'number' });
    f.push({ path: e('duration'), label: 'Ramp length', units: 'days', type: 'number' });
  } else if (env.kind === 'pulse') {
    f.push({ path: e('start'), label: 'Pulse starts', units: 'day', type: 'number' });
    f.push({ path: e('duration'), label: 'Pulse length', units: 'days', type: 'number' });
    f.push({ path: e('ramp'), label: 'Ramps inside it', units: 'days', type: 'number' });
  } else if (env.kind === 'harmonics') {
    f.push({ path: e('mean'), label: 'Mean factor', units: '', type: 'number' });
    env.terms.forEach((_, k) => {
      f.push({ path: e(`terms.${k}.period`), label: `Term ${k + 1} period`, units: 'days', type: 'number' });
      f.push({ path: e(`terms.${k}.amplitude`), label: `Term ${k + 1} amplitude`, units: '', type: 'number' });
      f.push({ path: e(`terms.${k}.peakDay`), label: `Term ${k + 1} peak day`, units: 'day', type: 'number' });
    });
  } else if (env.kind === 'switch-off') {
    f.push({ path: e('day'), label: 'Switches off on', units: 'day', type: 'number' });
    f.push({ path: e('ramp'), label: 'Fall to zero over', units: 'days', type: 'number' });
  }
  return f;
}

/** What a box's text means: a number when it reads as one, else the text (the validator says why). */
export function readNumber(text: string): unknown {
  const t = text.trim();
  if (t === '') return '';
  const n = Number(t);
  return Number.isFinite(n) && /^[-+0-9.eE]+$/.test(t) ? n : t;
}

/** A box's text for a value. */
export function showValue(part: WindPart, path: string): string {
  const v = getAt(part, path);
  return v === undefined || v === null ? '' : String(v);
}

/** Table points as lines "day, factor" and back; a line that does not read gives its number. */
export function tableText(points: Array<[number, number]>): string {
  return points.map(([d, v]) => `${d}, ${v}`).join('\n');
}

export function parseTable(
  text: string,
): { ok: true; points: Array<[number, number]> } | { ok: false; message: string } {
  const points: Array<[number, number]> = [];
  const lines = text.split('\n');
  for (let n = 0; n < lines.length; n++) {
    const line = lines[n].trim();
    if (line === '') continue;
    const m = line.split(/[,;\s]+/).filter(Boolean);
    const a = Number(m[0]);
    const b = Number(m[1]);
    if (m.length !== 2 || !Number.isFinite(a) || !Number.isFinite(b)) {
      return { ok: false, message: `line ${n + 1}: '${line}' is not "day, factor" (two numbers)` };
    }
    points.push([a, b]);
  }
  if (points.length === 0) return { ok: false, message: 'a table needs at least one "day, factor" line' };
  return { ok: true, points };
}
