// The Arakawa C grid of a rectangular lon/lat basin on the equatorial beta plane.
//
// Layout: every field lives in one padded array of (ny + 3) rows x W columns, W = nx + 3, with a
// halo of zeros that is never written. Logical (i, j) sits at (j + 1) * W + (i + 1).
//   h (thickness anomaly) at cell centres: i = 0..nx-1, j = 0..ny-1
//   u on west faces of cell (i, j):        i = 0..nx,   j = 0..ny-1
//   v on south faces of cell (i, j):       i = 0..nx-1, j = 0..ny
// Distances are R times radians, without cos(lat): the beta-plane approximation.

import type { BasinConfig } from './config.ts';
import { InputError } from './errors.ts';
import { insideShape, shapeBounds } from './land.ts';

export class GridError extends InputError {
  override name = 'GridError';
}

export class Grid {
  readonly nx: number;
  readonly ny: number;
  /** Row stride of the padded arrays. */
  readonly W: number;
  /** Length of every padded field array. */
  readonly size: number;
  readonly dLon: number;
  readonly dLat: number;
  /** Cell sizes in metres. */
  readonly dx: number;
  readonly dy: number;
  readonly earthRadius: number;
  readonly basin: BasinConfig;
  /** Longitudes of cell centres (nx) and of west faces (nx + 1), degrees east. */
  readonly lonCentre: Float64Array;
  readonly lonFace: Float64Array;
  /** Latitudes of cell centres (ny) and of south faces (ny + 1), degrees north. */
  readonly latCentre: Float64Array;
  readonly latFace: Float64Array;
  /** Distance north of the equator, m, of cell centres and of south faces. */
  readonly yCentre: Float64Array;
  readonly yFace: Float64Array;
  /** 1 for ocean cells, 0 for land; padded layout, halo = land. */
  readonly ocean: Uint8Array;
  /** 1 where a u face / v face carries flow (ocean on both sides), else 0. Padded layout. */
  readonly maskU: Float64Array;
  readonly maskV: Float64Array;
  /** Number of ocean cells. */
  readonly oceanCells: number;

  constructor(basin: BasinConfig, earthRadius: number) {
    const { lonWest, lonEast, latSouth, latNorth, dLon, dLat } = basin;
    for (const [name, v] of Object.entries({ lonWest, lonEast, latSouth, latNorth, dLon, dLat })) {
      if (!Number.isFinite(v)) throw new GridError(`basin.${name} must be a finite number (got ${v})`);
    }
    if (!(dLon > 0) || !(dLat > 0))
      throw new GridError(`the resolution must be positive (got ${dLon} x ${dLat} degrees)`);
    if (!(lonEast > lonWest))
      throw new GridError(`the eastern edge (${lonEast}) must lie east of the western edge (${lonWest})`);
    if (!(latNorth > latSouth))
      throw new GridError(`the northern edge (${latNorth}) must lie north of the southern edge (${latSouth})`);
    if (latSouth < -90 || latNorth > 90)
      throw new GridError(`latitudes must lie within -90..90 (got ${latSouth}..${latNorth})`);
    const nxReal = (lonEast - lonWest) / dLon;
    const nyReal = (latNorth - latSouth) / dLat;
    const nx = Math.round(nxReal);
    const ny = Math.round(nyReal);
    if (Math.abs(nxReal - nx) > 1e-6 * Math.max(1, nx) || Math.abs(nyReal - ny) > 1e-6 * Math.max(1, ny)) {
      throw new GridError(
        `the basin (${lonEast - lonWest} x ${latNorth - latSouth} degrees) is not a whole number of ${dLon} x ${dLat} degree cells`,
      );
    }
    if (nx < 1 || ny < 1) throw new GridError('the basin must hold at least one cell');
    this.basin = basin;
    this.nx = nx;
    this.ny = ny;
    this.W = nx + 3;
    this.size = this.W * (ny + 3);
    this.dLon = dLon;
    this.dLat = dLat;
    this.earthRadius = earthRadius;
    const mPerDeg = (earthRadius * Math.PI) / 180;
    this.dx = dLon * mPerDeg;
    this.dy = dLat * mPerDeg;

    this.lonCentre = Float64Array.from({ length: nx }, (_, i) => lonWest + (i + 0.5) * dLon);
    this.lonFace = Float64Array.from({ length: nx + 1 }, (_, i) => lonWest + i * dLon);
    this.latCentre = Float64Array.from({ length: ny }, (_, j) => latSouth + (j + 0.5) * dLat);
    this.latFace = Float64Array.from({ length: ny + 1 }, (_, j) => latSouth + j * dLat);
    this.yCentre = this.latCentre.map((lat) => lat * mPerDeg);
    this.yFace = this.latFace.map((lat) => lat * mPerDeg);

    this.ocean = new Uint8Array(this.size);
    for (let j = 0; j < ny; j++) this.ocean.fill(1, this.idx(0, j), this.idx(nx, j));
    // Each shape is tested only on the cells inside its bounding box, so a fine grid with a long
    // coast polygon costs cells-in-box x corners, not cells x corners x shapes.
    for (const shape of basin.land) {
      const b = shapeBounds(shape);
      const i0 = Math.max(0, Math.floor((b.lonWest - lonWest) / dLon - 0.5));
      const i1 = Math.min(nx - 1, Math.ceil((b.lonEast - lonWest) / dLon - 0.5));
      const j0 = Math.max(0, Math.floor((b.latSouth - latSouth) / dLat - 0.5));
      const j1 = Math.min(ny - 1, Math.ceil((b.latNorth - latSouth) / dLat - 0.5));
      for (let j = j0; j <= j1; j++) {
        for (let i = i0; i <= i1; i++) {
          const k = this.idx(i, j);
          if (this.ocean[k] && insideShape(shape, this.lonCentre[i], this.latCentre[j])) this.ocean[k] = 0;
        }
      }
    }
    let count = 0;
    for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) count += this.ocean[this.idx(i, j)];
    this.oceanCells = count;
    this.maskU = new Float64Array(this.size);
    this.maskV = new Float64Array(this.size);
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i <= nx; i++) {
        const k = this.idx(i, j);
        this.maskU[k] = this.ocean[k - 1] & this.ocean[k];
      }
    }
    for (let j = 0; j <= ny; j++) {
      for (let i = 0; i < nx; i++) {
        const k = this.idx(i, j);
        this.maskV[k] = this.ocean[k - this.W] & this.ocean[k];
      }
    }
  }

  /** Padded index of logical (i, j). */
  idx(i: number, j: number): number {
    return (j + 1) * this.W + (i + 1);
  }

  /** A zeroed field array in the padded layout. */
  field(): Float64Array {
    return new Float64Array(this.size);
  }

  /** Index of the cell containing (lon, lat), or null outside the basin. */
  cellAt(lon: number, lat: number): { i: number; j: number } | null {
    const i = Math.floor((lon - this.basin.lonWest) / this.dLon);
    const j = Math.floor((lat - this.basin.latSouth) / this.dLat);
    if (i < 0 || i >= this.nx || j < 0 || j >= this.ny) return null;
    return { i, j };
  }

  /** Row j whose centre is nearest to the latitude. */
  nearestRow(lat: number): number {
    const j = Math.round((lat - this.basin.latSouth) / this.dLat - 0.5);
    return Math.min(this.ny - 1, Math.max(0, j));
  }
}
