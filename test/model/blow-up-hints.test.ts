// A vanished layer is reported with its likely cause: a smooth hole in the thermocline is the
// wind's doing (the linear model cannot outcrop), a pattern alternating from cell to cell is the
// scheme going unstable (a two-grid-interval mode; common practice, no source), and then the hint
// names the time step against its limit.

import { describe, expect, it } from 'vitest';
import { BlowUpError } from '../../model/errors.ts';
import { Model } from '../../model/model.ts';
import { basin, config } from '../support/physics-kit.ts';

function vanished(fill: (i: number, j: number) => number): BlowUpError {
  const m = new Model(config(basin(0, 20, -5, 5, 0.5), { reducedGravity: 0.03, layerThickness: 150 }));
  for (let j = 0; j < m.grid.ny; j++) for (let i = 0; i < m.grid.nx; i++) m.state.h[m.grid.idx(i, j)] = fill(i, j);
  try {
    m.checkHealth();
  } catch (e) {
    if (e instanceof BlowUpError) return e;
    throw e;
  }
  throw new Error('checkHealth found nothing');
}

describe('blow-up hints', () => {
  it('a smooth hole: the wind and the linear model, not the scheme', () => {
    const e = vanished((i, j) => -160 * Math.exp(-((i - 20) ** 2 + (j - 10) ** 2) / 20));
    expect(e.reason).toBe('layer-vanished');
    expect(e.message).toMatch(/linear model cannot outcrop/);
    expect(e.message).not.toMatch(/unstable/);
  });

  it('a checkerboard: the scheme, with the time step against its limit', () => {
    const e = vanished((i, j) => ((i + j) % 2 === 0 ? -160 : 160) * Math.exp(-((i - 20) ** 2 + (j - 10) ** 2) / 20));
    expect(e.reason).toBe('layer-vanished');
    expect(e.message).toMatch(/alternates in sign from one cell to the next/);
    expect(e.message).toMatch(/The time step is \d+ s, \d+% of the gravity-wave limit \d+ s/);
  });
});
