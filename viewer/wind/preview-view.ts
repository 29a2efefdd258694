// The preview on the map: the stress field at a chosen day (preview.ts, the model's own
// buildWindStress) as a colour map of one layer with the stress arrows on top. The page shows it
// in place of the run's field while "show on the map" is on; the run itself is untouched.

import { lookupTable, type MapName } from '../render/colour-maps.ts';
import type { MapView } from '../render/map-view.ts';
import { drawColourBar, formatValue } from '../panels/colour-bar.ts';
import {
  finiteRange,
  LAYER_INFO,
  layerValues,
  previewSetup,
  stressAt,
  type PreviewLayer,
  type StressField,
} from './preview.ts';

export interface PreviewResult {
  field: StressField;
  values: Float32Array;
  layer: PreviewLayer;
  range: { min: number; max: number };
  /** Largest |tau| and where. */
  peak: { value: number; lon: number; lat: number };
}

/** Compute the preview of a scenario's wind; throws with the validator's or the forcing's message. */
export function computePreview(json: unknown, day: number, layer: PreviewLayer): PreviewResult {
  const { resolved, grid } = previewSetup(json);
  const field = stressAt(resolved, grid, day);
  const values = layerValues(field, layer, grid, resolved.model.physics);
  const [lo, hi] = finiteRange(values);
  let range: { min: number; max: number };
  if (LAYER_INFO[layer].diverging) {
    const m = Math.max(Math.abs(lo), Math.abs(hi)) || 1e-12;
    range = { min: -m, max: m };
  } else range = { min: 0, max: hi > 0 ? hi : 1e-12 };
  let peak = { value: 0, lon: NaN, lat: NaN };
  for (let k = 0; k < values.length; k++) {
    const m = Math.hypot(field.taux[k], field.tauy[k]);
    if (m > peak.value)
      peak = { value: m, lon: grid.lonCentre[k % grid.nx], lat: grid.latCentre[Math.floor(k / grid.nx)] };
  }
  return { field, values, layer, range, peak };
}

export function mapNameFor(layer: PreviewLayer): MapName {
  return LAYER_INFO[layer].diverging ? 'anomaly' : 'strength';
}

/** Draw a preview on the map and the colour bar. False when the map's grid is another basin. */
export function drawPreview(map: MapView, colourBar: HTMLCanvasElement, p: PreviewResult, arrows: boolean): boolean {
  const g = map.extent as { nx?: number; ny?: number } | null;
  if (!g || g.nx !== p.field.nx || g.ny !== p.field.ny) return false;
  const name = mapNameFor(p.layer);
  map.forgetArrows();
  map.gl.setColourMap(name, lookupTable(name));
  const layers = arrows
    ? [
        {
          name: 'designed stress',
          u: p.field.taux,
          v: p.field.tauy,
          units: 'N m-2',
          colour: [0, 0, 0] as [number, number, number],
        },
      ]
    : [];
  map.draw(p.values, p.range, layers, [], null);
  const info = LAYER_INFO[p.layer];
  drawColourBar(
    colourBar,
    lookupTable(name),
    p.range,
    `preview: ${info.label}, day ${formatValue(p.field.day)}`,
    info.units,
  );
  return true;
}
