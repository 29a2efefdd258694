// The quantities the map can show, built from a frame's output fields. Only bookkeeping lives
// here (a depth is H plus the anomaly, a speed is the length of a vector): no physics.

import { FIELD_INFO, type FieldName } from '../../model/diagnostics/fields.ts';

export type DisplayKey =
  | 'h_anom'
  | 'depth'
  | 'ssh'
  | 'u'
  | 'v'
  | 'speed'
  | 'surf_speed'
  | 'stress'
  | 'sst_anom'
  | 'atm_speed';

export type ColourKind = 'diverging' | 'sequential';

export interface DisplayField {
  key: DisplayKey;
  label: string;
  units: string;
  kind: ColourKind;
  /** Output fields it is made of; the field is offered only when the run writes all of them. */
  needs: FieldName[];
}

export const DISPLAY_FIELDS: DisplayField[] = [
  {
    key: 'h_anom',
    label: 'Thermocline depth anomaly (positive down)',
    units: FIELD_INFO.h_anom.units,
    kind: 'diverging',
    needs: ['h_anom'],
  },
  { key: 'depth', label: 'Thermocline depth H + h\u2032', units: 'm', kind: 'sequential', needs: ['h_anom'] },
  { key: 'ssh', label: 'Sea-surface height', units: FIELD_INFO.ssh.units, kind: 'diverging', needs: ['ssh'] },
  { key: 'u', label: 'Eastward velocity u (layer mean)', units: FIELD_INFO.u.units, kind: 'diverging', needs: ['u'] },
  { key: 'v', label: 'Northward velocity v (layer mean)', units: FIELD_INFO.v.units, kind: 'diverging', needs: ['v'] },
  { key: 'speed', label: 'Speed (layer mean)', units: 'm s-1', kind: 'sequential', needs: ['u', 'v'] },
  {
    key: 'surf_speed',
    label: 'Surface current speed',
    units: 'm s-1',
    kind: 'sequential',
    needs: ['u_surf', 'v_surf'],
  },
  { key: 'stress', label: 'Wind stress magnitude', units: 'N m-2', kind: 'sequential', needs: ['taux', 'tauy'] },
  {
    key: 'sst_anom',
    label: 'Sea-surface temperature anomaly (answering wind)',
    units: FIELD_INFO.sst_anom.units,
    kind: 'diverging',
    needs: ['sst_anom'],
  },
  { key: 'atm_speed', label: 'Answering wind speed', units: 'm s-1', kind: 'sequential', needs: ['u_atm', 'v_atm'] },
];

/**
 * The page's own label of every output field, for the views that list the file's variables (the
 * comparison): the same words as the map's list, never the variable name.
 */
const OUTPUT_LABELS: Record<FieldName, string> = {
  h_anom: 'Thermocline depth anomaly (positive down)',
  ssh: 'Sea-surface height',
  u: 'Eastward velocity u (layer mean)',
  v: 'Northward velocity v (layer mean)',
  u_surf: 'Eastward surface current',
  v_surf: 'Northward surface current',
  u_below: 'Eastward velocity below the surface layer',
  v_below: 'Northward velocity below the surface layer',
  taux: 'Eastward wind stress',
  tauy: 'Northward wind stress',
  sst_anom: 'Sea-surface temperature anomaly (answering wind)',
  u_atm: 'Eastward answering wind',
  v_atm: 'Northward answering wind',
};

/** "Sea-surface height (m)": an output field as the page names it, with its units. */
export function fieldLabel(f: FieldName): string {
  return `${OUTPUT_LABELS[f] ?? f} (${FIELD_INFO[f]?.units ?? ''})`;
}

/** The label of an output field without units. */
export function fieldName(f: FieldName): string {
  return OUTPUT_LABELS[f] ?? f;
}

export function displayField(key: DisplayKey): DisplayField {
  const f = DISPLAY_FIELDS.find((d) => d.key === key);
  if (!f) throw new Error(`unknown display field ${key}`);
  return f;
}

/** The display fields a run with these output fields can show. */
export function availableDisplays(fields: readonly FieldName[]): DisplayField[] {
  const have = new Set(fields);
  return DISPLAY_FIELDS.filter((d) => d.needs.every((n) => have.has(n)));
}

type Fields = Partial<Record<FieldName, Float32Array>>;

/**
 * Fill `out` with a display field (NaN stays NaN on land). Returns false when the frame lacks a
 * needed field. `layerThickness` is the run's H, used only for the depth.
 */
export function fillDisplay(key: DisplayKey, fields: Fields, layerThickness: number, out: Float32Array): boolean {
  const f = displayField(key);
  for (const n of f.needs) if (!fields[n]) return false;
  const n = out.length;
  switch (key) {
    case 'depth': {
      const h = fields.h_anom!;
      for (let k = 0; k < n; k++) out[k] = layerThickness + h[k];
      return true;
    }
    case 'speed':
      return magnitude(fields.u!, fields.v!, out);
    case 'surf_speed':
      return magnitude(fields.u_surf!, fields.v_surf!, out);
    case 'stress':
      return magnitude(fields.taux!, fields.tauy!, out);
    case 'atm_speed':
      return magnitude(fields.u_atm!, fields.v_atm!, out);
    default:
      out.set(fields[key]!.subarray(0, n));
      return true;
  }
}

function magnitude(a: Float32Array, b: Float32Array, out: Float32Array): true {
  for (let k = 0; k < out.length; k++) out[k] = Math.hypot(a[k], b[k]);
  return true;
}

/** Value of a display field at one cell (for the read-out and probes). */
export function displayAt(
  key: DisplayKey,
  fields: Partial<Record<FieldName, ArrayLike<number>>>,
  layerThickness: number,
  k: number,
): number {
  const get = (n: FieldName) => (fields[n] ? fields[n]![k] : NaN);
  switch (key) {
    case 'depth':
      return layerThickness + get('h_anom');
    case 'speed':
      return Math.hypot(get('u'), get('v'));
    case 'surf_speed':
      return Math.hypot(get('u_surf'), get('v_surf'));
    case 'stress':
      return Math.hypot(get('taux'), get('tauy'));
    case 'atm_speed':
      return Math.hypot(get('u_atm'), get('v_atm'));
    default:
      return get(key);
  }
}
