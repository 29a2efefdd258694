import { describe, expect, it } from 'vitest';
import { colourAt, LAND_GREY, LUT_SIZE, lookupTable, mapFor, parseColour } from '../../viewer/render/colour-maps.ts';

describe('colour lookup tables', () => {
  it('are 256 RGBA entries sampled from the library', () => {
    const lut = lookupTable('diverging');
    expect(lut.length).toBe(LUT_SIZE * 4);
    for (let i = 0; i < LUT_SIZE; i++) expect(lut[i * 4 + 3]).toBe(255);
  });
  it('the diverging map is blue below zero, near white at zero, red above', () => {
    const lut = lookupTable('diverging');
    const [r0, , b0] = colourAt(lut, 0);
    const [rm, gm, bm] = colourAt(lut, 0.5);
    const [r1, , b1] = colourAt(lut, 1);
    expect(b0).toBeGreaterThan(r0);
    expect(r1).toBeGreaterThan(b1);
    expect(Math.min(rm, gm, bm)).toBeGreaterThan(230);
  });
  it('sequential maps grow lighter with the value', () => {
    for (const name of ['depth', 'magnitude'] as const) {
      const lut = lookupTable(name);
      const lum = (t: number) => colourAt(lut, t).reduce((s, c) => s + c, 0);
      expect(lum(1)).toBeGreaterThan(lum(0.5));
      expect(lum(0.5)).toBeGreaterThan(lum(0));
    }
  });
  it('land is neutral grey, not a colour of any map', () => {
    expect(colourAt(lookupTable('diverging'), NaN)).toEqual(LAND_GREY);
    expect(LAND_GREY[0]).toBe(LAND_GREY[1]);
    expect(LAND_GREY[1]).toBe(LAND_GREY[2]);
  });
  it('picks diverging maps for signed fields and sequential for depths and magnitudes', () => {
    expect([mapFor('h_anom'), mapFor('u'), mapFor('depth'), mapFor('speed'), mapFor('stress')]).toEqual(['diverging', 'diverging', 'depth', 'magnitude', 'magnitude']);
  });
  it('reads both colour notations', () => {
    expect(parseColour('rgb(1, 2, 3)')).toEqual([1, 2, 3]);
    expect(parseColour('#ff0080')).toEqual([255, 0, 128]);
  });
});
