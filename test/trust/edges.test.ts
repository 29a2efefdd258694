// Numbers at the edges: the smallest grids, a basin all land, one without land, the largest grid
// the memory budget allows and one beyond it (refused before any allocation, with the budget and
// the estimate in the message), a time step exactly at the stability limit.

import { describe, expect, it } from 'vitest';
import type { BlowUpError } from '../../model/errors.ts';
import { buildPrepared, parseScenario } from '../../model/scenario/load-inputs.ts';
import { MAX_CELLS, MEMORY_BUDGET } from '../../model/scenario/semantic.ts';
import { memoryEstimate } from '../../model/scenario/derived.ts';

function scenario(basin: object, extra: Record<string, unknown> = {}) {
  return JSON.stringify({
    format: 'pycno-scenario/1',
    name: 'edge',
    basin: { sponge: { widthDeg: 0 }, ...basin },
    physics: { reducedGravity: 0.03, layerThickness: 150 },
    time: { days: 1 },
    initial: { kind: 'bump', lon: 150.5, lat: 0.5, radiusDeg: 1, amplitude: 2 },
    hovmoller: { lat: [0.5] },
    wind: {
      parts: [
        {
          kind: 'fixed',
          quantity: 'stress',
          source: { kind: 'shaped', shape: { kind: 'uniform' }, x: 0.02, y: 0.01 },
          envelope: { kind: 'constant' },
        },
      ],
    },
    ...extra,
  });
}

function runSteps(text: string, steps: number, sets: string[] = []) {
  const p = parseScenario(text, 'edge.json', sets);
  const m = buildPrepared(p, { files: new Map(), notes: [] }).model;
  const v0 = m.integrals().volume;
  m.advance(steps);
  m.checkHealth();
  return { m, v0 };
}

describe('numbers at the edges', () => {
  for (const mode of ['linear', 'nonlinear']) {
    it(`a 1 x 1 basin (${mode}): runs, stays finite, keeps its volume`, () => {
      const { m, v0 } = runSteps(
        scenario({ lonWest: 150, lonEast: 151, latSouth: 0, latNorth: 1, resolution: 1 }),
        200,
        [`physics.dynamics=${mode}`],
      );
      expect(m.grid.nx * m.grid.ny).toBe(1);
      expect(m.state.h.every(Number.isFinite)).toBe(true);
      expect(Math.abs(m.integrals().volume - v0)).toBeLessThanOrEqual(1e-12 * v0);
    });
    it(`2 x N and N x 2 basins (${mode})`, () => {
      for (const b of [
        { lonWest: 150, lonEast: 152, latSouth: -10, latNorth: 10 },
        { lonWest: 150, lonEast: 190, latSouth: 0, latNorth: 2 },
      ]) {
        const { m, v0 } = runSteps(scenario({ ...b, resolution: 1 }), 200, [`physics.dynamics=${mode}`]);
        expect(Math.min(m.grid.nx, m.grid.ny)).toBe(2);
        expect(Math.abs(m.integrals().volume - v0)).toBeLessThanOrEqual(1e-12 * v0);
      }
    });
  }

  it('a basin all land is refused clearly', () => {
    const text = scenario({
      lonWest: 150,
      lonEast: 160,
      latSouth: -5,
      latNorth: 5,
      resolution: 1,
      land: [{ kind: 'rectangle', lonWest: 150, lonEast: 160, latSouth: -5, latNorth: 5 }],
    });
    expect(() => parseScenario(text, 'land.json')).toThrow(
      /^land\.json: line 1: basin\.land: covers every cell of the basin: no ocean is left/,
    );
  });

  it('a basin without land (open to nothing, walls all round) runs', () => {
    const { m } = runSteps(
      scenario({ lonWest: 150, lonEast: 160, latSouth: -5, latNorth: 5, resolution: 1, land: [] }),
      100,
    );
    expect(m.grid.oceanCells).toBe(100);
  });

  it('the largest grid the budget allows is accepted by the checks; one more row is refused with the budget and the estimate, before any allocation', () => {
    // 2000 x 2000 = MAX_CELLS exactly. Only parsed (validation builds the land mask: a few MB).
    const big = scenario(
      { lonWest: 0, lonEast: 200, latSouth: -50, latNorth: 50, resolution: { lon: 0.1, lat: 0.05 } },
      { hovmoller: { lat: [0] }, initial: { kind: 'rest' } },
    );
    const p = parseScenario(big, 'big.json');
    expect(Math.round(200 / 0.1) * Math.round(100 / 0.05)).toBe(MAX_CELLS);
    expect(p.resolved.model.basin.dLon).toBe(0.1);
    const before = process.memoryUsage().arrayBuffers;
    const beyond = scenario(
      { lonWest: 0, lonEast: 200.1, latSouth: -50, latNorth: 50, resolution: { lon: 0.1, lat: 0.05 } },
      { hovmoller: { lat: [0] }, initial: { kind: 'rest' } },
    );
    const mb = (x: number) => `${Math.round(x / 1048576).toLocaleString('en-US')} MB`;
    expect(() => parseScenario(beyond, 'beyond.json')).toThrow(
      `gives 4,002,000 cells; at most 4,000,000, the memory budget of ${mb(MEMORY_BUDGET)} (this 2001 x 2000 grid would need about ${mb(memoryEstimate(2001, 2000, 'linear', 10))} while running): choose coarser cells`,
    );
    // Refused before the grid was made: no tens of MB of typed arrays appeared.
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(16 * 1048576);
  });

  it('dt exactly at the stability limit is accepted and stays stable for a bounded run; just above it is refused, giving the limit', () => {
    const text = scenario({ lonWest: 150, lonEast: 170, latSouth: -5, latNorth: 5, resolution: 1 });
    const limit = buildPrepared(parseScenario(text, 'dt.json'), { files: new Map(), notes: [] }).model.limit.dtMax;
    // The limit itself must divide the output interval into whole steps: an interval of two steps.
    const at = parseScenario(text, 'dt.json', [
      `time.dtSeconds=${limit}`,
      `time.outputEveryDays=${(2 * limit) / 86400}`,
    ]);
    const m = buildPrepared(at, { files: new Map(), notes: [] }).model;
    expect(m.dt).toBe(limit);
    const e0 = m.integrals().energy;
    try {
      m.advance(300);
      m.checkHealth();
    } catch (e) {
      expect.unreachable(`blew up at the limit: ${(e as BlowUpError).message}`);
    }
    expect(m.state.h.every(Number.isFinite)).toBe(true);
    expect(m.integrals().energy).toBeLessThan(1e6 * Math.max(e0, 1));
    expect(() => parseScenario(text, 'dt.json', [`time.dtSeconds=${limit * 1.001}`])).toThrow(
      new RegExp(`time\\.dtSeconds: .*${Math.floor(limit)}`),
    );
  });
});
