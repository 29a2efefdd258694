// The configuration of the shared reference benchmark kernel (a C and a NumPy implementation of one
// linear step, used for speed comparisons): a 160 x 60 degree basin at +-30 deg with an island and a
// block on the western wall, fixed stress, sponges of 10 rows. Reproducing its checksums shows the
// linear step is the same computation; npm run bench times both side by side.

import { defaultPhysics, type ModelConfig } from './config.ts';
import type { WindStress } from './forcing/stress.ts';
import { Grid } from './grid.ts';
import { Model, type LinearKernelName } from './model.ts';
import * as pm from './portable-math.ts';
import type { Precision } from './precision.ts';

const M_PER_DEG = 111.2e3;
const DAY = 86400;

export function referenceConfig(nx: number, ny: number): ModelConfig {
  const dLon = 160 / nx;
  const dLat = 60 / ny;
  const physics = {
    ...defaultPhysics(),
    reducedGravity: 0.03,
    layerThickness: 150,
    density: 1025,
    beta: 2.289e-11,
    earthRadius: (M_PER_DEG * 180) / Math.PI,
    friction: 1 / (30 * DAY),
    viscosity: 1e3,
    sponge: { widthDeg: 10 * dLat, rateAtWall: 1 / (2 * DAY), conserveVolume: false },
  };
  const dx = dLon * M_PER_DEG;
  const dy = dLat * M_PER_DEG;
  return {
    basin: {
      lonWest: 0,
      lonEast: 160,
      latSouth: -30,
      latNorth: 30,
      dLon,
      dLat,
      land: [
        // island: 3nx/8 <= i < 3nx/8 + nx/32, ny/2 - ny/24 <= j < ny/2 + ny/24 (in degrees)
        { kind: 'rectangle', lonWest: 60, lonEast: 65, latSouth: -2.5, latNorth: 2.5 },
        // block on the western wall: i < nx/16, ny/4 <= j < ny/4 + ny/12
        { kind: 'rectangle', lonWest: 0, lonEast: 10, latSouth: -15, latNorth: -10 },
      ],
    },
    physics,
    time: { dt: (0.5 * Math.min(dx, dy)) / Math.sqrt(0.03 * 150), safety: 1 },
  };
}

/** The reference's fixed stress pattern (N m-2). */
export function referenceStress(grid: Grid): WindStress {
  return {
    steady: true,
    fill(_t, taux, tauy) {
      const { nx, ny } = grid;
      taux.fill(0);
      tauy.fill(0);
      for (let j = 0; j < ny; j++) {
        const phic = (j + 0.5 - 0.5 * ny) / (0.5 * ny);
        for (let i = 0; i <= nx; i++) {
          taux[grid.idx(i, j)] = -0.05 * pm.cos(0.5 * Math.PI * phic) * (0.9 + 0.1 * pm.cos((Math.PI * i) / nx));
        }
      }
      for (let j = 0; j <= ny; j++) {
        const phiv = (j - 0.5 * ny) / (0.5 * ny);
        for (let i = 0; i < nx; i++) {
          tauy[grid.idx(i, j)] = 0.01 * pm.sin(Math.PI * phiv) * pm.sin((Math.PI * (i + 0.5)) / nx);
        }
      }
    },
  };
}

export function referenceModel(
  nx: number,
  ny: number,
  kernel: LinearKernelName = 'ts',
  precision: Precision = 'float64',
): Model {
  const config = { ...referenceConfig(nx, ny), precision };
  const grid = new Grid(config.basin, config.physics.earthRadius);
  return new Model(config, { variant: { ghost: 0, coriolis: 'collocated' }, wind: referenceStress(grid), kernel });
}

/** The reference checksums: sum of h' over cells and 0.5 rho0 dx dy (H sum(u^2 + v^2) + g' sum(h'^2)). */
export function referenceChecksum(model: Model): { sumEta: number; energy: number } {
  const { grid, state } = model;
  const p = model.physics;
  const sum = (a: ArrayLike<number>, sq: boolean) => {
    let s = 0;
    let c = 0;
    for (let k = 0; k < a.length; k++) {
      const x = sq ? a[k] * a[k] : a[k];
      const t = s + x;
      c += Math.abs(s) >= Math.abs(x) ? s - t + x : x - t + s;
      s = t;
    }
    return s + c;
  };
  return {
    sumEta: sum(state.h, false),
    energy:
      0.5 *
      p.density *
      grid.dx *
      grid.dy *
      (p.layerThickness * (sum(state.u, true) + sum(state.v, true)) + p.reducedGravity * sum(state.h, true)),
  };
}
