// Land in a basin: rectangles and polygons in lon/lat; a cell is land when its centre lies inside
// any shape (model/grid.ts makes the mask from these).

export type LandShape =
  | { kind: 'rectangle'; lonWest: number; lonEast: number; latSouth: number; latNorth: number }
  | { kind: 'polygon'; points: Array<[number, number]> };

/** The lon/lat box a shape lies in. */
export function shapeBounds(s: LandShape): { lonWest: number; lonEast: number; latSouth: number; latNorth: number } {
  if (s.kind === 'rectangle') return s;
  let lonWest = Infinity;
  let lonEast = -Infinity;
  let latSouth = Infinity;
  let latNorth = -Infinity;
  for (const [lon, lat] of s.points) {
    lonWest = Math.min(lonWest, lon);
    lonEast = Math.max(lonEast, lon);
    latSouth = Math.min(latSouth, lat);
    latNorth = Math.max(latNorth, lat);
  }
  return { lonWest, lonEast, latSouth, latNorth };
}

export function insideShape(s: LandShape, lon: number, lat: number): boolean {
  if (s.kind === 'rectangle') {
    return lon >= s.lonWest && lon <= s.lonEast && lat >= s.latSouth && lat <= s.latNorth;
  }
  return insidePolygon(s.points, lon, lat);
}

/** Even-odd ray casting; the polygon closes itself. */
export function insidePolygon(points: ReadonlyArray<readonly [number, number]>, x: number, y: number): boolean {
  let inside = false;
  for (let a = 0, b = points.length - 1; a < points.length; b = a++) {
    const [xa, ya] = points[a];
    const [xb, yb] = points[b];
    if (ya > y !== yb > y && x < ((xb - xa) * (y - ya)) / (yb - ya) + xa) inside = !inside;
  }
  return inside;
}
