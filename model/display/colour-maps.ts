// Pycno's own colour maps, laid out in OKLCh (oklab.ts) so that equal steps along a map are
// about equal steps to the eye:
//   "Pycno Split"  diverging, for anomalies (h′, sea level, u, v, differences): teal-blue below
//                  zero, a pale neutral at zero, copper above; the lightness falls the same way on
//                  both sides, so +x and -x look equally strong.
//   "Pycno Deep"   sequential, for the thermocline depth: pale aqua (shallow) to indigo (deep),
//                  darker with depth as in the ocean.
//   "Pycno Glow"   sequential, for strengths (speeds, wind stress): pale straw (weak) through
//                  amber to plum (strong).
// Blue against orange-copper is the axis that red-green colour blindness keeps; the sequential
// maps carry their order in lightness, which every colour-vision deficiency keeps.
// test/viewer/colour-maps.test.ts checks the lightness and the deficiency simulations.

import { lchToSrgb8, type Rgb } from './oklab.ts';
import * as pm from '../portable-math.ts';

export type MapName = 'anomaly' | 'depth' | 'strength';

export const MAP_TITLES: Record<MapName, string> = {
  anomaly: 'Pycno Split',
  depth: 'Pycno Deep',
  strength: 'Pycno Glow',
};

export const LUT_SIZE = 256;

/** Neutral grey for land, RGB 0-255: it belongs to none of the maps (no hue, mid lightness). */
export const LAND_GREY: Rgb = [150, 150, 150];

const lerp = (a: number, b: number, t: number) => a + (b - a) * t;

/** A point of a map in OKLCh: lightness, chroma, hue (degrees) at position t in 0..1. */
type Path = (t: number) => [number, number, number];

const PATHS: Record<MapName, Path> = {
  anomaly: (t) => {
    const s = 2 * t - 1;
    const a = Math.abs(s);
    // Lightness: the same curve on both sides (symmetric), from 0.975 at zero to 0.40.
    const L = 0.975 - 0.575 * pm.pow(a, 0.95);
    const C = 0.16 * pm.pow(a, 0.75);
    // Hue turns a little along each arm so the strong ends are deeper, not just darker.
    const h = s < 0 ? lerp(215, 262, a) : lerp(70, 38, a);
    return [L, C, h];
  },
  depth: (t) => [lerp(0.94, 0.27, t), 0.03 + 0.1 * pm.sin(Math.PI * Math.min(1, t * 1.1)), lerp(175, 282, t)],
  strength: (t) => [
    lerp(0.97, 0.3, t),
    0.035 + 0.14 * pm.sin(Math.PI * Math.min(1, 0.15 + t * 0.8)),
    lerp(100, -15, t),
  ],
};

/** The colour of a map at t in 0..1, 8-bit sRGB. */
export function mapColour(name: MapName, t: number): Rgb {
  const [L, C, h] = PATHS[name](Math.min(1, Math.max(0, t)));
  return lchToSrgb8(L, C, h);
}

const cache = new Map<MapName, Uint8Array>();

/** LUT_SIZE x RGBA, entry i for t = i / (LUT_SIZE - 1). */
export function lookupTable(name: MapName): Uint8Array {
  const hit = cache.get(name);
  if (hit) return hit;
  const lut = new Uint8Array(LUT_SIZE * 4);
  for (let i = 0; i < LUT_SIZE; i++) lut.set([...mapColour(name, i / (LUT_SIZE - 1)), 255], i * 4);
  cache.set(name, lut);
  return lut;
}

/** Colour of a position 0..1 (NaN gives land grey). */
export function colourAt(lut: Uint8Array, t: number): Rgb {
  if (Number.isNaN(t)) return LAND_GREY;
  const i = Math.max(0, Math.min(LUT_SIZE - 1, Math.round(t * (LUT_SIZE - 1))));
  return [lut[i * 4], lut[i * 4 + 1], lut[i * 4 + 2]];
}
