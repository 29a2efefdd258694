// Sections and probes read the centred fields: a linear field is reproduced exactly by the
// bilinear probe (common practice, no source), and a coast takes no weight.

import { describe, expect, it } from 'vitest';
import { probeStencil, sampleAt, sectionAlong } from '../../model/diagnostics/sampling.ts';
import { Grid } from '../../model/grid.ts';
import { Model } from '../../model/model.ts';
import { basin, config } from '../support/physics-kit.ts';
import { EARTH } from '../../model/config.ts';

describe('sampling', () => {
  const g = new Grid(
    basin(100, 110, -5, 5, 0.5, [{ kind: 'rectangle', lonWest: 108, lonEast: 110, latSouth: -5, latNorth: 5 }]),
    EARTH.radius,
  );
  const linear = Float64Array.from(
    { length: g.nx * g.ny },
    (_, o) => 2 * g.lonCentre[o % g.nx] - 3 * g.latCentre[Math.floor(o / g.nx)],
  );

  it('a probe reproduces a linear field exactly away from land', () => {
    const s = probeStencil(g, 103.37, 1.21)!;
    expect(sampleAt(s, linear)).toBeCloseTo(2 * 103.37 - 3 * 1.21, 10);
  });

  it('a probe next to the coast reads only ocean cells; inside land or outside the basin there is none', () => {
    const s = probeStencil(g, 107.9, 0.1)!;
    for (const o of s.index) expect(g.ocean[g.idx(o % g.nx, Math.floor(o / g.nx))]).toBe(1);
    expect(probeStencil(g, 109.5, 0)).toBeNull();
    expect(probeStencil(g, 120, 0)).toBeNull();
  });

  it('a section is the row nearest the latitude, NaN on land', () => {
    const m = new Model(
      config(
        basin(100, 110, -5, 5, 0.5, [{ kind: 'rectangle', lonWest: 108, lonEast: 110, latSouth: -5, latNorth: 5 }]),
      ),
      {
        initial: { kind: 'bump', lon: 104, lat: 0, radiusDeg: 2, amplitude: 5 },
      },
    );
    const row = new Float32Array(m.grid.nx);
    const lat = sectionAlong(m.fieldContext(), 'h_anom', 0.3, row);
    expect(lat).toBe(0.25);
    const full = m.field('h_anom');
    const j = m.grid.nearestRow(0.3);
    for (let i = 0; i < m.grid.nx; i++) {
      if (Number.isNaN(full[j * m.grid.nx + i])) expect(Number.isNaN(row[i])).toBe(true);
      else expect(row[i]).toBeCloseTo(full[j * m.grid.nx + i], 5);
    }
    expect(Number.isNaN(row[m.grid.nx - 1])).toBe(true);
  });
});
