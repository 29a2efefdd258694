// Direct manipulation of a Gaussian patch and of a latitude band, as pure maths in degrees.
//
// A patch (model/forcing/shapes.ts) has its own axes turned anticlockwise by tiltDeg in the
// lon/lat plane: x' along (cos t, sin t), y' along (-sin t, cos t). Its handles sit on those axes:
// the centre, one width out on each side (the e^-1/2 contour crosses there) and a turning handle
// further out along x'. Everything is done in degrees, the patch's own space, so the result does
// not depend on how the map is stretched on screen.

import type { BandProfile } from '../../model/forcing/spec.ts';

export interface PatchGeometry {
  lon: number;
  lat: number;
  lonWidth: number;
  latWidth: number;
  tiltDeg?: number;
}

export type HandleKind = 'centre' | 'east' | 'west' | 'north' | 'south' | 'turn';

export interface Handle {
  kind: HandleKind;
  lon: number;
  lat: number;
}

/** Narrowest width a drag can give, degrees: the schema wants > 0, and a sliver is never meant. */
export const MIN_WIDTH = 0.1;
/** How far out along x' the turning handle sits, in lon widths. */
export const TURN_REACH = 1.6;

const RAD = Math.PI / 180;

function axes(p: PatchGeometry): { ax: [number, number]; ay: [number, number] } {
  const t = (p.tiltDeg ?? 0) * RAD;
  return { ax: [Math.cos(t), Math.sin(t)], ay: [-Math.sin(t), Math.cos(t)] };
}

/** The handles of a patch, in lon/lat. */
export function patchHandles(p: PatchGeometry): Handle[] {
  const { ax, ay } = axes(p);
  const at = (kind: HandleKind, a: [number, number], s: number): Handle => ({
    kind,
    lon: p.lon + s * a[0],
    lat: p.lat + s * a[1],
  });
  return [
    { kind: 'centre', lon: p.lon, lat: p.lat },
    at('east', ax, p.lonWidth),
    at('west', ax, -p.lonWidth),
    at('north', ay, p.latWidth),
    at('south', ay, -p.latWidth),
    at('turn', ax, TURN_REACH * p.lonWidth),
  ];
}

/** Round to a step so that dragged values stay readable in the file (0.01 degrees). */
export function tidy(v: number, step = 0.01): number {
  const r = Math.round(v / step) * step;
  // Strip binary noise such as 12.340000000000002.
  return Number(r.toFixed(6));
}

/** Move the patch so that its centre follows a drag by (dLon, dLat). */
export function moveCentre<P extends PatchGeometry>(p: P, dLon: number, dLat: number): P {
  return { ...p, lon: tidy(p.lon + dLon), lat: tidy(p.lat + dLat) };
}

/**
 * Drag an edge handle to (lon, lat): the width becomes the distance of that point from the
 * centre measured along the handle's axis (the component across the axis is ignored, so a
 * sideways wobble of the hand does not change the width).
 */
export function dragEdge<P extends PatchGeometry>(
  p: P,
  kind: 'east' | 'west' | 'north' | 'south',
  lon: number,
  lat: number,
): P {
  const { ax, ay } = axes(p);
  const a = kind === 'east' || kind === 'west' ? ax : ay;
  const d = Math.abs((lon - p.lon) * a[0] + (lat - p.lat) * a[1]);
  const w = Math.max(MIN_WIDTH, tidy(d));
  return kind === 'east' || kind === 'west' ? { ...p, lonWidth: w } : { ...p, latWidth: w };
}

/** Turn the patch so that its x' axis points at (lon, lat); tilt in (-180, 180], whole tenths of a degree. */
export function turnTowards<P extends PatchGeometry>(p: P, lon: number, lat: number): P {
  const dx = lon - p.lon;
  const dy = lat - p.lat;
  if (dx === 0 && dy === 0) return p;
  let t = Math.atan2(dy, dx) / RAD;
  t = tidy(t, 0.1);
  if (t <= -180) t += 360;
  return { ...p, tiltDeg: t };
}

/** Add `deg` to the tilt, kept in (-180, 180]. */
export function turnBy<P extends PatchGeometry>(p: P, deg: number): P {
  let t = tidy((p.tiltDeg ?? 0) + deg, 0.1);
  while (t > 180) t -= 360;
  while (t <= -180) t += 360;
  return { ...p, tiltDeg: t };
}

/** Scale one width by a factor (keyboard: narrower / wider). */
export function scaleWidth<P extends PatchGeometry>(p: P, which: 'lon' | 'lat', factor: number): P {
  const key = which === 'lon' ? 'lonWidth' : 'latWidth';
  return { ...p, [key]: Math.max(MIN_WIDTH, tidy(p[key] * factor)) };
}

/**
 * The handle nearest to a screen point within `tolerancePx`, or null. `toPixel` maps lon/lat to
 * screen pixels; the turning handle wins over an edge handle at the same place, then edges over
 * the centre, so a small patch can still be resized.
 */
export function hitHandle(
  p: PatchGeometry,
  x: number,
  y: number,
  toPixel: (lon: number, lat: number) => [number, number],
  tolerancePx = 9,
): HandleKind | null {
  const order: HandleKind[] = ['turn', 'east', 'west', 'north', 'south', 'centre'];
  let best: HandleKind | null = null;
  let bestD = Infinity;
  const hs = patchHandles(p);
  for (const kind of order) {
    const h = hs.find((q) => q.kind === kind)!;
    const [hx, hy] = toPixel(h.lon, h.lat);
    const d = Math.hypot(hx - x, hy - y);
    // Strictly nearer only: on a tie the earlier (more specific) handle stays.
    if (d <= tolerancePx && d < bestD - 1e-9) {
      best = kind;
      bestD = d;
    }
  }
  return best;
}

/** True when (lon, lat) lies inside the patch's one-width ellipse (a drag there moves it). */
export function insidePatch(p: PatchGeometry, lon: number, lat: number): boolean {
  const { ax, ay } = axes(p);
  const xr = (lon - p.lon) * ax[0] + (lat - p.lat) * ax[1];
  const yr = (lon - p.lon) * ay[0] + (lat - p.lat) * ay[1];
  return (xr / p.lonWidth) ** 2 + (yr / p.latWidth) ** 2 <= 1;
}

/** Points of the one-width ellipse, for drawing its outline. */
export function patchOutline(p: PatchGeometry, n = 48): Array<[number, number]> {
  const { ax, ay } = axes(p);
  const out: Array<[number, number]> = [];
  for (let k = 0; k <= n; k++) {
    const a = (2 * Math.PI * k) / n;
    const xr = p.lonWidth * Math.cos(a);
    const yr = p.latWidth * Math.sin(a);
    out.push([p.lon + xr * ax[0] + yr * ay[0], p.lat + xr * ax[1] + yr * ay[1]]);
  }
  return out;
}

// ---- latitude bands ---------------------------------------------------------------------------

/**
 * A band drawn by dragging from one latitude to another, in the kind of profile the part already
 * has: tanh keeps its edge width and takes the two latitudes as south and north; cosine takes them
 * as its full width; a gap is centred between them with a width of a quarter of the span (so the
 * drawn span holds about +-2 widths); trades reach the farther of the two latitudes.
 */
export function bandFromDrag(profile: BandProfile, lat1: number, lat2: number): BandProfile {
  const south = tidy(Math.min(lat1, lat2), 0.1);
  let north = tidy(Math.max(lat1, lat2), 0.1);
  if (north - south < 0.2) north = tidy(south + 0.2, 0.1);
  const centre = tidy((south + north) / 2, 0.05);
  const span = north - south;
  switch (profile.kind) {
    case 'tanh':
      return { kind: 'tanh', south, north, edge: profile.edge };
    case 'cosine':
      return { kind: 'cosine', centre, halfWidth: tidy(span / 2, 0.05) };
    case 'gap':
      return { kind: 'gap', centre, width: tidy(span / 4, 0.05), depth: profile.depth };
    case 'trades':
      return { kind: 'trades', edgeLat: Math.max(0.1, tidy(Math.max(Math.abs(south), Math.abs(north)), 0.1)) };
  }
}

/** The latitudes that outline a band on the map (where it is at half strength or its edges). */
export function bandOutline(profile: BandProfile): number[] {
  switch (profile.kind) {
    case 'tanh':
      return [profile.south, profile.north];
    case 'cosine':
      return [profile.centre - profile.halfWidth, profile.centre + profile.halfWidth];
    case 'gap':
      return [profile.centre - 2 * profile.width, profile.centre + 2 * profile.width];
    case 'trades':
      return [-profile.edgeLat, profile.edgeLat];
  }
}
