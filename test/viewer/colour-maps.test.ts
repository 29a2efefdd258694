// Pycno's own colour maps (model/display/colour-maps.ts): perceptually ordered in OKLab, and still
// readable under the common colour-vision deficiencies.
//
// Sources:
// - OKLab: Björn Ottosson, "A perceptual color space for image processing" (2020). The sRGB
//   primaries' OKLab values below are from his published table, from memory (4 decimals).
// - Colour-vision deficiencies: Machado, Oliveira and Fernandes (2009), "A physiologically-based
//   model for simulation of color vision deficiency", IEEE TVCG 15(6). The severity-1.0 matrices
//   for protanopia, deuteranopia and tritanopia, applied to linear RGB, from memory of the
//   published table (each row sums to 1, which the test checks: white stays white).

import { describe, expect, it } from 'vitest';
import {
  colourAt,
  LAND_GREY,
  LUT_SIZE,
  lookupTable,
  MAP_TITLES,
  mapColour,
  type MapName,
} from '../../model/display/colour-maps.ts';
import {
  deltaE,
  fromLinear,
  linearToOklab,
  oklabToLinear,
  srgb8ToOklab,
  toLinear,
  type Lab,
} from '../../model/display/oklab.ts';
import { mapFor } from '../../viewer/render/colour-maps.ts';

const MACHADO_2009: Record<string, number[][]> = {
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};

/** An 8-bit sRGB colour as a viewer with the deficiency sees it, in OKLab. */
function simulated(rgb: readonly number[], m: number[][] | null): Lab {
  const lin = [0, 1, 2].map((k) => toLinear(rgb[k] / 255));
  if (!m) return linearToOklab(lin as [number, number, number]);
  const out = m.map((row) => Math.min(1, Math.max(0, row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2])));
  return linearToOklab(out as [number, number, number]);
}

const MAPS: MapName[] = ['anomaly', 'depth', 'strength'];
const lightness = (name: MapName) =>
  Array.from({ length: LUT_SIZE }, (_, i) => srgb8ToOklab(colourAt(lookupTable(name), i / (LUT_SIZE - 1)))[0]);

describe('OKLab, written from Ottosson (2020)', () => {
  it('puts white at L = 1 with no colour and the sRGB primaries where his table has them', () => {
    const w = linearToOklab([1, 1, 1]);
    expect(w[0]).toBeCloseTo(1, 4);
    expect(Math.hypot(w[1], w[2])).toBeLessThan(1e-4);
    // From memory of the published values: red (0.6280, 0.2249, 0.1258), green (0.8664, -0.2339, 0.1795), blue (0.4520, -0.0325, -0.3115).
    const near = (p: Lab, q: Lab) => p.forEach((x, k) => expect(x).toBeCloseTo(q[k], 3));
    near(linearToOklab([1, 0, 0]), [0.628, 0.2249, 0.1258]);
    near(linearToOklab([0, 1, 0]), [0.8664, -0.2339, 0.1795]);
    near(linearToOklab([0, 0, 1]), [0.452, -0.0325, -0.3115]);
  });
  it('goes back to the same colour, and the sRGB curve inverts', () => {
    for (const c of [
      [0.2, 0.5, 0.9],
      [0.9, 0.1, 0.05],
      [0.01, 0.01, 0.02],
    ] as const) {
      const back = oklabToLinear(linearToOklab([...c]));
      // The published matrices have ten digits: the round trip holds to about 1e-7.
      back.forEach((x, k) => expect(x).toBeCloseTo(c[k], 6));
    }
    for (const v of [0, 0.002, 0.04, 0.3, 1]) expect(fromLinear(toLinear(v))).toBeCloseTo(v, 12);
  });
});

describe("Pycno's colour maps", () => {
  it('have names of our own and 256 opaque entries each', () => {
    expect(MAP_TITLES).toEqual({ anomaly: 'Pycno Split', depth: 'Pycno Deep', strength: 'Pycno Glow' });
    for (const m of MAPS) {
      const lut = lookupTable(m);
      expect(lut.length).toBe(LUT_SIZE * 4);
      for (let i = 0; i < LUT_SIZE; i++) expect(lut[i * 4 + 3]).toBe(255);
    }
  });

  it('sequential maps: lightness falls monotonically from the low end to the high end, over a wide span', () => {
    for (const m of ['depth', 'strength'] as const) {
      const L = lightness(m);
      // 8-bit rounding moves L by up to about 0.002; over every 4 entries the fall is strict.
      for (let i = 1; i < L.length; i++) expect(L[i] - L[i - 1]).toBeLessThan(0.002);
      for (let i = 4; i < L.length; i += 4) expect(L[i]).toBeLessThan(L[i - 4]);
      expect(L[0] - L[L.length - 1]).toBeGreaterThan(0.6);
    }
  });

  it('the anomaly map: lightest at zero, the same lightness at +x and -x, blue below and copper above', () => {
    const L = lightness('anomaly');
    const mid = (LUT_SIZE - 1) / 2;
    for (let i = 0; i < LUT_SIZE; i++) {
      const j = LUT_SIZE - 1 - i;
      expect(Math.abs(L[i] - L[j])).toBeLessThan(0.004);
      // Falling away from the middle on both arms.
      if (i > 0 && i <= mid) expect(L[i] - L[i - 1]).toBeGreaterThan(-0.002);
    }
    expect(L[128]).toBeGreaterThan(0.95);
    const [r0, , b0] = mapColour('anomaly', 0);
    const [r1, , b1] = mapColour('anomaly', 1);
    expect(b0).toBeGreaterThan(r0 + 60);
    expect(r1).toBeGreaterThan(b1 + 60);
  });

  for (const [name, matrix] of [['normal vision', null], ...Object.entries(MACHADO_2009)] as Array<
    [string, number[][] | null]
  >) {
    it(`stays readable for ${name} (Machado et al. 2009 simulation)`, () => {
      if (matrix) for (const row of matrix) expect(row[0] + row[1] + row[2]).toBeCloseTo(1, 5);
      for (const m of MAPS) {
        const lut = lookupTable(m);
        const at = (t: number) => simulated(colourAt(lut, t), matrix);
        // 12 steps along the map: each neighbour pair is well above a just-noticeable difference
        // (about 0.02 in OKLab), and the lightness order survives the simulation.
        const steps = Array.from({ length: 13 }, (_, k) => at(k / 12));
        for (let k = 1; k < steps.length; k++) expect(deltaE(steps[k], steps[k - 1])).toBeGreaterThan(0.025);
        if (m !== 'anomaly') for (let k = 1; k < steps.length; k++) expect(steps[k][0]).toBeLessThan(steps[k - 1][0]);
      }
      // The two arms of the anomaly map stay apart at equal strength: +x never passes for -x.
      const lut = lookupTable('anomaly');
      for (const s of [0.25, 0.5, 0.75, 1]) {
        expect(
          deltaE(simulated(colourAt(lut, 0.5 - s / 2), matrix), simulated(colourAt(lut, 0.5 + s / 2), matrix)),
        ).toBeGreaterThan(0.08 * s);
      }
      // Land grey is not mistaken for any map colour.
      for (const m of MAPS)
        for (let k = 0; k <= 16; k++)
          expect(
            deltaE(simulated(LAND_GREY, matrix), simulated(colourAt(lookupTable(m), k / 16), matrix)),
          ).toBeGreaterThan(0.03);
    });
  }

  it('land (NaN) is neutral grey; signed fields get the anomaly map, depths and strengths their own', () => {
    expect(colourAt(lookupTable('anomaly'), NaN)).toEqual(LAND_GREY);
    expect(LAND_GREY[0]).toBe(LAND_GREY[1]);
    expect([mapFor('h_anom'), mapFor('u'), mapFor('depth'), mapFor('speed'), mapFor('stress')]).toEqual([
      'anomaly',
      'anomaly',
      'depth',
      'strength',
      'strength',
    ]);
  });
});
