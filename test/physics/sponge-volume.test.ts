// The volume budget of the sponge bands, and the volume-keeping sponge.
//
// Sources: flux-form continuity changes the volume of a closed basin by nothing (it telescopes;
// common practice, no source), so the volume a run gains or loses is what the sponges and
// entrainment did. Sponges are Newtonian relaxation in bands next to the walls, absorbing waves
// that reach them (Israeli & Orszag 1981, from memory; check-values §7). Relaxing h' toward its
// own band mean instead of toward 0 must absorb about as well and keep the volume.

import { describe, expect, it } from 'vitest';
import type { SpongeConfig } from '../../model/config.ts';
import { Model, type LinearKernelName } from '../../model/model.ts';
import { basin, config, record, uniformStress, FLOAT32, FLOAT32_VOLUME, tolerance } from '../support/physics-kit.ts';

const DAY = 86400;
const B = basin(0, 40, -15, 15, 0.5);
const BUMP = { kind: 'bump' as const, lon: 20, lat: 0, amplitude: 10, radiusDeg: 3 };

function sponge(kind: 'none' | 'rest' | 'band-mean'): SpongeConfig {
  return { widthDeg: kind === 'none' ? 0 : 4, rateAtWall: 1 / (2 * DAY), conserveVolume: kind === 'band-mean' };
}

function bumpRun(
  kind: 'none' | 'rest' | 'band-mean',
  mode: 'linear' | 'nonlinear' = 'linear',
  kernel: LinearKernelName = 'ts',
  days = 60,
): Model {
  const m = new Model(
    config(B, { reducedGravity: 0.03, layerThickness: 150, viscosity: 2000, sponge: sponge(kind), mode }),
    { initial: BUMP, kernel },
  );
  m.advance(m.stepsUntil(days * DAY));
  return m;
}

describe('sponge volume budget', () => {
  it('linear: the sponge volume is the whole change of volume, zero without sponges', () => {
    const none = bumpRun('none');
    const rest = bumpRun('rest');
    const v0 = new Model(config(B, { reducedGravity: 0.03, layerThickness: 150 }), { initial: BUMP }).integrals()
      .volume;
    const n = none.integrals();
    const r = rest.integrals();
    expect(Math.abs(n.volume - v0) / v0).toBeLessThan(tolerance(1e-13, 1e-8));
    expect(Math.abs(n.spongeVolume) / v0).toBeLessThan(tolerance(1e-13, 1e-8));
    // The bump's waves reach the bands and leave volume there: a real loss, and all of it the sponges'.
    expect(r.spongeVolume).toBeLessThan(-1e-5 * v0);
    expect(Math.abs(r.spongeVolume - (r.volume - v0)) / v0).toBeLessThan(tolerance(1e-13, 1e-8));
    expect(r.entrainedVolume).toBe(0);
    record(
      'sponge volume after 60 days of a 10 m bump, relaxation to rest (share of the layer)',
      r.spongeVolume / v0,
      (r.volume - v0) / v0,
      '',
      {
        source: "flux form telescopes (common practice): the change of volume is the sponges'",
        tolerance: FLOAT32 ? FLOAT32_VOLUME : '1e-13 of the layer',
      },
    );
  });

  it('nonlinear: the step measures its sponge directly, and it matches the change of volume when nothing entrains', () => {
    const m = bumpRun('rest', 'nonlinear');
    const start = new Model(config(B, { reducedGravity: 0.03, layerThickness: 150, mode: 'nonlinear' }), {
      initial: BUMP,
    }).integrals();
    const e = m.integrals();
    expect(e.minThickness).toBeGreaterThan(100); // far from the entrainment depth (40 m): nothing entrains
    expect(e.spongeVolume).toBeLessThan(-1e-5 * start.volume);
    const gap = Math.abs(e.spongeVolume - (e.volume - start.volume)) / start.volume;
    record(
      'nonlinear, no entrainment: measured sponge volume minus the change of volume (share of the layer)',
      gap,
      0,
      '',
      { source: 'flux form telescopes (common practice)', tolerance: FLOAT32 ? FLOAT32_VOLUME : '1e-12' },
    );
    expect(gap).toBeLessThan(tolerance(1e-12, 1e-8));
    expect(Math.abs(e.entrainedVolume) / start.volume).toBeLessThan(tolerance(1e-12, 1e-8));
  });

  it('nonlinear with entrainment: sponge and entrainment add up to the change of volume, entrainment adds', () => {
    // Easterlies over a thin layer lift the thermocline to the entrainment depth (60 m of 80 m).
    const cfg = config(basin(0, 30, -10, 10, 1), {
      reducedGravity: 0.03,
      layerThickness: 80,
      viscosity: 30_000,
      mode: 'nonlinear',
      sponge: { widthDeg: 3, rateAtWall: 1 / (2 * DAY), conserveVolume: false },
      entrainment: { minThickness: 60, time: DAY },
    });
    const m = new Model(cfg, { wind: uniformStress(cfg, -0.05) });
    const v0 = m.integrals().volume;
    m.advance(m.stepsUntil(60 * DAY));
    const e = m.integrals();
    expect(e.minThickness).toBeLessThan(60);
    expect(e.entrainedVolume).toBeGreaterThan(1e-2 * v0);
    expect(e.spongeVolume).toBeLessThan(0);
    record('nonlinear with entrainment: entrained volume (share of the layer)', e.entrainedVolume / v0, NaN, '', {
      source: 'budget: change of volume = sponge + entrainment (common practice)',
      tolerance: FLOAT32 ? `> 0.01, budget closes to ${FLOAT32_VOLUME}` : '> 0.01, budget closes to 1e-12',
    });
    expect(Math.abs(e.spongeVolume + e.entrainedVolume - (e.volume - v0)) / v0).toBeLessThan(tolerance(1e-12, 1e-8));
  });
});

describe('volume-keeping sponge (basin.sponge.conserveVolume)', () => {
  it('absorbs the waves about as well as relaxation to rest, and keeps the volume to round-off', () => {
    const e0 = new Model(config(B, { reducedGravity: 0.03, layerThickness: 150, viscosity: 2000 }), {
      initial: BUMP,
    }).integrals();
    const none = bumpRun('none').integrals();
    const rest = bumpRun('rest').integrals();
    const mean = bumpRun('band-mean').integrals();
    const absorbedRest = none.energy - rest.energy;
    const absorbedMean = none.energy - mean.energy;
    record(
      'energy the band-mean sponge absorbed, as a share of what relaxation to rest absorbed',
      absorbedMean / absorbedRest,
      1,
      '',
      { source: 'sponge layers absorb (Israeli & Orszag 1981, from memory)', tolerance: '> 0.9' },
    );
    expect(absorbedRest).toBeGreaterThan(0.2 * e0.energy);
    expect(absorbedMean).toBeGreaterThan(0.9 * absorbedRest);
    const kept = Math.abs(mean.volume - e0.volume) / e0.volume;
    record('volume-keeping sponge: change of volume after 60 days (share of the layer)', kept, 0, '', {
      source: 'relaxation toward the band mean conserves by construction (common practice)',
      tolerance: FLOAT32 ? FLOAT32_VOLUME : '1e-13',
    });
    expect(kept).toBeLessThan(tolerance(1e-13, 1e-8));
    expect(Math.abs(mean.spongeVolume) / e0.volume).toBeLessThan(tolerance(1e-13, 1e-8));
  });

  it('keeps the volume in the nonlinear mode and on the WebAssembly kernel, with the same bits as TypeScript', () => {
    const v0 = new Model(config(B, { reducedGravity: 0.03, layerThickness: 150 }), { initial: BUMP }).integrals()
      .volume;
    const nl = bumpRun('band-mean', 'nonlinear').integrals();
    expect(Math.abs(nl.volume - v0) / v0).toBeLessThan(tolerance(1e-12, 1e-8));
    expect(Math.abs(nl.spongeVolume) / v0).toBeLessThan(tolerance(1e-12, 1e-8));
    const ts = bumpRun('band-mean', 'linear', 'ts', 20);
    const wasm = bumpRun('band-mean', 'linear', 'wasm', 20);
    expect(wasm.kernel).toBe('wasm');
    expect(
      Buffer.from(wasm.state.h.buffer, wasm.state.h.byteOffset, wasm.state.h.byteLength).equals(
        Buffer.from(ts.state.h.buffer, ts.state.h.byteOffset, ts.state.h.byteLength),
      ),
    ).toBe(true);
  });
});
