// Conservation in a closed basin without sponges, forcing, friction or entrainment.
// Volume: flux-form continuity telescopes, so the total changes only by round-off
// (common practice, no source; the reference kernel's notes measure 4e-13 for sum(h')).
// Energy: the linear forward-backward scheme on the C grid is neutral below its CFL limit
// (Mesinger & Arakawa 1976), so kinetic plus available potential energy stays bounded.

import { describe, expect, it } from 'vitest';
import { Model } from '../../model/model.ts';
import { basin, config, record, FLOAT32, FLOAT32_ENERGY, FLOAT32_VOLUME, tolerance } from '../support/physics-kit.ts';

// A small basin with an island and a coast polygon, so that land boundaries take part.
const land = [
  { kind: 'rectangle' as const, lonWest: 150, lonEast: 153, latSouth: -1, latNorth: 2 },
  {
    kind: 'polygon' as const,
    points: [
      [170, -10],
      [175, -10],
      [175, 0],
      [172, 4],
    ] as Array<[number, number]>,
  },
];
const b = basin(140, 180, -10, 10, 0.5, land);

/** Energy 1/2 rho0 dA (H |u^{n+1}|^2 + g' h^n . h^{n+1}): forward-backward's exact invariant when f = 0. */
function forwardBackwardInvariant(m: Model, hOld: Float64Array): number {
  const { grid, state } = m;
  let ke = 0;
  let pe = 0;
  for (let k = 0; k < grid.size; k++) {
    ke += grid.maskU[k] * state.u[k] ** 2 + grid.maskV[k] * state.v[k] ** 2;
    pe += grid.ocean[k] * hOld[k] * state.h[k];
  }
  return 0.5 * m.physics.density * grid.dx * grid.dy * (m.physics.layerThickness * ke + m.physics.reducedGravity * pe);
}

const bump = { kind: 'bump' as const, lon: 160, lat: 3, radiusDeg: 3, amplitude: 20 };

describe('conservation over 10,000 steps in a closed basin with land', () => {
  it('linear mode: volume to round-off; energy (1000-step means) within 1 %, no growth', () => {
    const m = new Model(config(b, { friction: 0, viscosity: 0 }), { initial: bump });
    const first = m.integrals();
    let worstVolume = 0;
    const windowMeans: number[] = [];
    for (let w = 0; w < 10; w++) {
      let sum = 0;
      for (let n = 0; n < 1000; n++) {
        m.advance(1);
        const d = m.integrals();
        sum += d.energy;
        worstVolume = Math.max(worstVolume, Math.abs(d.volume - first.volume) / first.volume);
      }
      windowMeans.push(sum / 1000 / first.energy);
    }
    expect(m.state.steps).toBe(10_000);
    const drift = Math.max(...windowMeans.map((e) => Math.abs(e - 1)));
    record('relative volume drift, linear, 10,000 steps', worstVolume, 0, '', {
      source: 'flux form telescopes (common practice)',
      tolerance: FLOAT32 ? FLOAT32_VOLUME : '1e-12',
    });
    record('energy, largest 1000-step mean deviation from the start, linear, 10,000 steps', drift, 0, '', {
      source: 'Mesinger & Arakawa 1976 (neutral forward-backward)',
      tolerance: '1 %',
    });
    expect(worstVolume).toBeLessThan(tolerance(1e-12, 1e-8));
    expect(drift).toBeLessThan(0.01);
    // No trend: the last window is as energetic as the first.
    expect(Math.abs(windowMeans[9] - windowMeans[0])).toBeLessThan(0.002);
    expect(m.integrals().kinetic).toBeGreaterThan(0.05 * first.energy);
  });

  it('linear mode without rotation: the forward-backward energy invariant holds to round-off', () => {
    const m = new Model(config(b, { beta: 0 }), { initial: bump });
    const hOld = new Float64Array(m.grid.size);
    hOld.set(m.state.h);
    m.advance(1);
    const e0 = forwardBackwardInvariant(m, hOld);
    let worst = 0;
    for (let n = 0; n < 10_000; n++) {
      hOld.set(m.state.h);
      m.advance(1);
      worst = Math.max(worst, Math.abs(forwardBackwardInvariant(m, hOld) / e0 - 1));
    }
    record('forward-backward invariant, f = 0, 10,000 steps', worst, 0, '', {
      source: 'property of forward-backward with adjoint grad/div',
      tolerance: FLOAT32 ? FLOAT32_ENERGY : '1e-12',
    });
    expect(worst).toBeLessThan(tolerance(1e-12, 2e-6));
  });

  for (const slip of ['free', 'no'] as const) {
    it(`linear mode with viscosity, ${slip} slip: energy only decays`, () => {
      const m = new Model(config(b, { viscosity: 2000, slip }), { initial: bump });
      const e0 = m.integrals().energy;
      m.advance(3000);
      expect(m.integrals().energy).toBeLessThan(e0);
      expect(m.integrals().energy).toBeGreaterThan(0.01 * e0);
    });
  }

  it('no slip drains more energy than free slip at the same viscosity', () => {
    const run = (slip: 'free' | 'no') => {
      const m = new Model(config(b, { viscosity: 2000, slip }), { initial: bump });
      m.advance(3000);
      return m.integrals().energy;
    };
    expect(run('no')).toBeLessThan(run('free'));
  });

  it('nonlinear mode (with viscosity): volume to round-off, energy does not grow', () => {
    const m = new Model(
      config(b, { mode: 'nonlinear', viscosity: 500, entrainment: { minThickness: 0, time: 86400 } }),
      { initial: bump },
    );
    const first = m.integrals();
    let worstVolume = 0;
    let worstGain = 0;
    for (let n = 0; n < 100; n++) {
      m.advance(100);
      const d = m.integrals();
      worstVolume = Math.max(worstVolume, Math.abs(d.volume - first.volume) / first.volume);
      worstGain = Math.max(worstGain, d.energy / first.energy - 1);
    }
    record('relative volume drift, nonlinear, 10,000 steps', worstVolume, 0, '', {
      source: 'flux form telescopes (common practice)',
      tolerance: FLOAT32 ? FLOAT32_VOLUME : '1e-12',
    });
    expect(worstVolume).toBeLessThan(tolerance(1e-12, 1e-8));
    expect(worstGain).toBeLessThan(0.01);
    expect(m.integrals().kinetic).toBeGreaterThan(0);
  });

  it('sponges remove energy (they are the only sink here)', () => {
    const m = new Model(config(b, { sponge: { widthDeg: 3, rateAtWall: 1 / (2 * 86400), conserveVolume: false } }), {
      initial: bump,
    });
    const first = m.integrals();
    m.advance(2000);
    expect(m.integrals().energy).toBeLessThan(0.9 * first.energy);
  });
});

describe('entrainment keeps the nonlinear layer from outcropping', () => {
  it('strong upwelling stops near the minimum thickness instead of blowing up', () => {
    const small = basin(140, 170, -10.25, 10.25, 0.5);
    const m = new Model(
      config(small, {
        mode: 'nonlinear',
        layerThickness: 60,
        viscosity: 2000,
        entrainment: { minThickness: 40, time: 0.5 * 86400 },
      }),
      { initial: { kind: 'bump', lon: 155, lat: 0, radiusDeg: 4, amplitude: -30 } },
    );
    const first = m.integrals();
    m.advance(m.stepsUntil(10 * 86400));
    const d = m.integrals();
    // Without entrainment the trough reaches 30 m; entrainment holds it close to 40 m,
    // and the water it brings up adds volume.
    record('thinnest nonlinear layer under strong upwelling, entrainment at 40 m', d.minThickness, 40, 'm', {
      source: 'design: E = (h_min - h) / t_e',
      tolerance: '> 35 m',
    });
    expect(d.minThickness).toBeGreaterThan(35);
    expect(d.volume).toBeGreaterThan(first.volume);
  });
});
