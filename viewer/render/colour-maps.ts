// Colour maps as 256-entry RGBA lookup tables sampled from d3-scale-chromatic's perceptually
// designed schemes (no hand-typed tables). Diverging: blue below zero, red above, white at zero.
// Sequential: cividis for depths, viridis for speeds and stress.

import { interpolateCividis, interpolateRdBu, interpolateViridis } from 'd3-scale-chromatic';
import type { DisplayKey } from '../state/display-fields.ts';

export type MapName = 'diverging' | 'depth' | 'magnitude';

export const LUT_SIZE = 256;

/** Neutral grey for land, RGB 0-255: it belongs to none of the maps. */
export const LAND_GREY: [number, number, number] = [150, 150, 150];

const interpolators: Record<MapName, (t: number) => string> = {
  // RdBu runs red to blue; flipped so that positive (deeper thermocline, higher sea, eastward) is red.
  diverging: (t) => interpolateRdBu(1 - t),
  depth: interpolateCividis,
  magnitude: interpolateViridis,
};

export function mapFor(key: DisplayKey): MapName {
  if (key === 'depth') return 'depth';
  if (key === 'speed' || key === 'surf_speed' || key === 'stress' || key === 'atm_speed') return 'magnitude';
  return 'diverging';
}

/** Parse the "rgb(r, g, b)" or "#rrggbb" strings d3 gives. */
export function parseColour(s: string): [number, number, number] {
  const m = /^rgb\((\d+),\s*(\d+),\s*(\d+)\)$/.exec(s.trim());
  if (m) return [Number(m[1]), Number(m[2]), Number(m[3])];
  const h = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(s.trim());
  if (h) return [parseInt(h[1], 16), parseInt(h[2], 16), parseInt(h[3], 16)];
  throw new Error(`cannot read colour ${s}`);
}

const cache = new Map<MapName, Uint8Array>();

/** LUT_SIZE x RGBA, entry i for t = i / (LUT_SIZE - 1). */
export function lookupTable(name: MapName): Uint8Array {
  const hit = cache.get(name);
  if (hit) return hit;
  const lut = new Uint8Array(LUT_SIZE * 4);
  const f = interpolators[name];
  for (let i = 0; i < LUT_SIZE; i++) {
    const [r, g, b] = parseColour(f(i / (LUT_SIZE - 1)));
    lut.set([r, g, b, 255], i * 4);
  }
  cache.set(name, lut);
  return lut;
}

/** Colour of a position 0..1 (NaN gives land grey), for 2-D canvases (Hovmoller, colour bar). */
export function colourAt(lut: Uint8Array, t: number): [number, number, number] {
  if (Number.isNaN(t)) return LAND_GREY;
  const i = Math.max(0, Math.min(LUT_SIZE - 1, Math.round(t * (LUT_SIZE - 1))));
  return [lut[i * 4], lut[i * 4 + 1], lut[i * 4 + 2]];
}
