// Painting stress (or wind) vectors onto a grid of its own resolution, stored in the scenario as a
// 'painted' source (model/forcing/spec.ts GriddedVectors). Pure maths, no DOM.
//
// A dab has a footprint w(r) in 0..1 around its centre (r in degrees): 1 inside the core, then a
// cosine-squared fall to 0 at the brush radius; `softEdge` is the fraction of the radius given to
// that fall (0 a hard disc, 1 all soft). The three actions, applied with weight w at each point:
//   paint:  v <- v + w (target - v)   a full-weight dab sets the target vector exactly
//   erase:  v <- (1 - w) v
//   soften: v <- v + w (mean of the 3 x 3 neighbours - v), from the values before the dab
// Painting moves values toward the target instead of adding, so going over a place twice does not
// pile up stress: what the brush says is what the grid gets.

import type { GriddedVectors } from '../../model/forcing/spec.ts';

export interface Brush {
  /** Radius, degrees. */
  radius: number;
  /** Fraction of the radius over which the footprint falls to 0, 0..1. */
  softEdge: number;
  /** Target magnitude (N m-2 or m s-1, the part's quantity). */
  strength: number;
  /** Direction the vector points to, degrees anticlockwise from east (0 eastward, 90 northward). */
  directionDeg: number;
  mode: 'paint' | 'erase' | 'soften';
}

/** A zero grid covering a basin at `spacing` degrees, samples at the centres of its cells. */
export function blankGrid(
  basin: { lonWest: number; lonEast: number; latSouth: number; latNorth: number },
  spacing: number,
): GriddedVectors {
  const nLon = Math.max(1, Math.round((basin.lonEast - basin.lonWest) / spacing));
  const nLat = Math.max(1, Math.round((basin.latNorth - basin.latSouth) / spacing));
  // The spacing that fits the basin exactly, so the samples sit at cell centres edge to edge.
  const dLon = Number(((basin.lonEast - basin.lonWest) / nLon).toFixed(6));
  const dLat = Number(((basin.latNorth - basin.latSouth) / nLat).toFixed(6));
  return {
    lon0: Number((basin.lonWest + dLon / 2).toFixed(6)),
    lat0: Number((basin.latSouth + dLat / 2).toFixed(6)),
    dLon,
    dLat,
    nLon,
    nLat,
    x: new Array(nLon * nLat).fill(0),
    y: new Array(nLon * nLat).fill(0),
  };
}

/** The footprint weight at distance r (degrees) from the dab's centre. */
export function footprint(r: number, radius: number, softEdge: number): number {
  if (!(radius > 0) || r >= radius) return 0;
  const s = Math.min(1, Math.max(0, softEdge));
  const core = radius * (1 - s);
  if (r <= core) return 1;
  const f = (r - core) / (radius - core);
  const c = Math.cos((Math.PI / 2) * f);
  return c * c;
}

/** Stored values are rounded to 1e-6: far below any stress that matters, and the file stays short. */
function keep(v: number): number {
  const r = Math.round(v * 1e6) / 1e6;
  return r === 0 ? 0 : r;
}

/** Apply one dab at (lon, lat) in place. Returns the number of grid points it changed. */
export function dab(g: GriddedVectors, lon: number, lat: number, brush: Brush): number {
  const { lon0, lat0, dLon, dLat, nLon, nLat } = g;
  const i0 = Math.max(0, Math.floor((lon - brush.radius - lon0) / dLon));
  const i1 = Math.min(nLon - 1, Math.ceil((lon + brush.radius - lon0) / dLon));
  const j0 = Math.max(0, Math.floor((lat - brush.radius - lat0) / dLat));
  const j1 = Math.min(nLat - 1, Math.ceil((lat + brush.radius - lat0) / dLat));
  if (i0 > i1 || j0 > j1) return 0;
  const t = (brush.directionDeg * Math.PI) / 180;
  const tx = brush.strength * Math.cos(t);
  const ty = brush.strength * Math.sin(t);
  // Soften reads the values from before this dab, so the result does not depend on loop order.
  const before = brush.mode === 'soften' ? { x: g.x.slice(), y: g.y.slice() } : null;
  let changed = 0;
  for (let j = j0; j <= j1; j++) {
    for (let i = i0; i <= i1; i++) {
      const w = footprint(Math.hypot(lon0 + i * dLon - lon, lat0 + j * dLat - lat), brush.radius, brush.softEdge);
      if (w === 0) continue;
      const k = j * nLon + i;
      let nx: number;
      let ny: number;
      if (brush.mode === 'paint') {
        nx = g.x[k] + w * (tx - g.x[k]);
        ny = g.y[k] + w * (ty - g.y[k]);
      } else if (brush.mode === 'erase') {
        nx = (1 - w) * g.x[k];
        ny = (1 - w) * g.y[k];
      } else {
        const [mx, my] = neighbourMean(before!, nLon, nLat, i, j);
        nx = g.x[k] + w * (mx - g.x[k]);
        ny = g.y[k] + w * (my - g.y[k]);
      }
      nx = keep(nx);
      ny = keep(ny);
      if (nx !== g.x[k] || ny !== g.y[k]) changed++;
      g.x[k] = nx;
      g.y[k] = ny;
    }
  }
  return changed;
}

/** Mean of the 3 x 3 block around (i, j), the centre included, cut at the grid's edges. */
export function neighbourMean(
  g: { x: number[]; y: number[] },
  nLon: number,
  nLat: number,
  i: number,
  j: number,
): [number, number] {
  let sx = 0;
  let sy = 0;
  let n = 0;
  for (let jj = Math.max(0, j - 1); jj <= Math.min(nLat - 1, j + 1); jj++) {
    for (let ii = Math.max(0, i - 1); ii <= Math.min(nLon - 1, i + 1); ii++) {
      sx += g.x[jj * nLon + ii];
      sy += g.y[jj * nLon + ii];
      n++;
    }
  }
  return [sx / n, sy / n];
}

/**
 * Dab centres along a stroke from (lon1, lat1) to (lon2, lat2), a third of the radius apart, the
 * start excluded (it was dabbed when the stroke reached it) and the end included.
 */
export function strokePoints(
  lon1: number,
  lat1: number,
  lon2: number,
  lat2: number,
  radius: number,
): Array<[number, number]> {
  const d = Math.hypot(lon2 - lon1, lat2 - lat1);
  const n = Math.max(1, Math.ceil(d / Math.max(1e-6, radius / 3)));
  const out: Array<[number, number]> = [];
  for (let k = 1; k <= n; k++) out.push([lon1 + ((lon2 - lon1) * k) / n, lat1 + ((lat2 - lat1) * k) / n]);
  return out;
}

/** Largest vector length in a grid (for the panel's summary). */
export function largestVector(g: GriddedVectors): number {
  let m = 0;
  for (let k = 0; k < g.x.length; k++) m = Math.max(m, Math.hypot(g.x[k], g.y[k]));
  return m;
}
