import { describe, expect, it } from 'vitest';
import { FrameHistory, formatBytes, framesInBudget } from '../../viewer/state/frame-history.ts';
import { autoRange, checkFixedRange, niceCeil, steadyRange } from '../../viewer/state/colour-range.ts';
import { characteristics, clipLine, degreesPerDay } from '../../viewer/state/characteristics.ts';
import { availableDisplays, displayAt, fillDisplay } from '../../viewer/state/display-fields.ts';
import { alignSeries, ProbeStore } from '../../viewer/state/probe-store.ts';
import { cellAt, cellOf, graticuleLines, latLabel, lonLabel } from '../../viewer/render/geo.ts';
import { EARTH } from '../../model/config.ts';

const frame = (day: number, n = 10) => ({
  day,
  step: day,
  fields: { h_anom: new Float32Array(n), u: new Float32Array(n) },
});

describe('frame history', () => {
  it('keeps every frame while the budget lasts', () => {
    const h = new FrameHistory(400); // each frame 2 x 10 x 4 = 80 bytes -> 5 frames
    for (let d = 0; d < 5; d++) h.push(frame(d));
    expect(h.maxFrames).toBe(5);
    expect(Array.from({ length: h.length }, (_, i) => h.at(i)!.day)).toEqual([0, 1, 2, 3, 4]);
    expect(h.spacing).toBe(0);
    expect(h.describe()).toBe('keeping 5 frames = 400 B');
    expect(h.nearest(2.6)).toBe(3);
  });
  it('when full, thins the older frames so the slider still reaches the start, and always holds the newest', () => {
    const h = new FrameHistory(800); // 10 frames
    const days: number[][] = [];
    for (let d = 0; d <= 365; d++) {
      h.push(frame(d));
      expect(h.length).toBeLessThanOrEqual(10);
      expect(h.latest()!.day).toBe(d);
      days.push(Array.from({ length: h.length }, (_, i) => h.at(i)!.day));
    }
    const kept = days[days.length - 1];
    expect(kept[0]).toBe(0);
    // Evenly thinned: the gaps between kept frames (all but the newest) are at least the spacing.
    const gaps = kept.slice(1, -1).map((d, i) => d - kept[i]);
    for (const g of gaps) expect(g).toBeGreaterThanOrEqual(h.spacing - 1e-9);
    expect(h.spacing).toBeGreaterThan(20);
    expect(h.spacing).toBeLessThan(80);
    expect(h.describe()).toMatch(
      /^keeping 10 frames = 800 B, thinned to one every \d+ days to reach back to the start$/,
    );
  });
  it('shrinking the budget thins the frames; a new frame size starts over', () => {
    const h = new FrameHistory(800);
    for (let d = 0; d < 10; d++) h.push(frame(d));
    h.setBudget(240);
    expect(h.length).toBe(3);
    expect([h.at(0)!.day, h.at(2)!.day]).toEqual([0, 9]);
    h.push(frame(0, 20));
    expect(h.length).toBe(1);
    expect(h.spacing).toBe(0);
  });
  it('a budget for fewer than 3 frames keeps the newest', () => {
    const h = new FrameHistory(160);
    for (let d = 0; d < 6; d++) h.push(frame(d));
    expect([h.at(0)!.day, h.at(1)!.day]).toEqual([4, 5]);
  });
  it('states sizes the way a user reads them', () => {
    expect(framesInBudget(41e6, 227_000)).toBe(180);
    expect(formatBytes(41e6)).toBe('41 MB');
    expect(formatBytes(2.5e6)).toBe('2.5 MB');
    expect(formatBytes(820e3)).toBe('820 kB');
  });
});

describe('colour ranges', () => {
  it('diverging ranges are symmetric about zero and rounded up', () => {
    expect(autoRange(Float32Array.from([-3, 7.2, NaN]), 'diverging')).toEqual({ min: -10, max: 10 });
    expect(autoRange(Float32Array.from([0.013, -0.02]), 'diverging')).toEqual({ min: -0.02, max: 0.02 });
  });
  it('sequential ranges span the data, ignoring land', () => {
    expect(autoRange(Float32Array.from([NaN, 120, 180]), 'sequential')).toEqual({ min: 120, max: 180 });
  });
  it('a field at rest still has a usable range', () => {
    const r = autoRange(new Float32Array(4), 'diverging');
    expect(r.max).toBeGreaterThan(0);
    expect(r.min).toBe(-r.max);
  });
  it('automatic ranges widen at once and shrink only when the data fall well inside', () => {
    const a = { min: -10, max: 10 };
    expect(steadyRange(a, { min: -5, max: 5 }, 'diverging')).toBe(a);
    expect(steadyRange(a, { min: -20, max: 20 }, 'diverging').max).toBe(20);
    expect(steadyRange(a, { min: -2, max: 2 }, 'diverging').max).toBe(2);
    expect(steadyRange({ min: 100, max: 200 }, { min: 90, max: 150 }, 'sequential')).toEqual({ min: 90, max: 200 });
  });
  it('fixed ranges must be ordered numbers', () => {
    expect(checkFixedRange(1, 0)).toMatch(/upper end/);
    expect(checkFixedRange(NaN, 1)).toMatch(/two numbers/);
    expect(checkFixedRange(-1, 1)).toBeNull();
  });
  it('nice numbers (the ticks: test/viewer/display-conventions.test.ts)', () => {
    expect([niceCeil(0.7), niceCeil(1.2), niceCeil(3), niceCeil(7)]).toEqual([1, 2, 5, 10]);
  });
});

describe('Hovmoller characteristic lines', () => {
  const R = EARTH.radius;
  it('converts a speed to degrees of longitude per day along the equator', () => {
    // 1 degree = R pi / 180 = 111.19 km; 2.74 m/s x 86400 s = 236.7 km/day = 2.129 deg/day.
    expect(degreesPerDay(2.74, R)).toBeCloseTo(2.129, 3);
  });
  it('Kelvin runs east at c and long Rossby west at c/3, clipped at the walls', () => {
    const lines = characteristics({ lon: 30, day: 17 }, 2.74, R, { lonWest: 0, lonEast: 140, days: 240 });
    const k = lines.find((l) => l.name === 'kelvin')!;
    const r = lines.find((l) => l.name === 'rossby')!;
    expect(k.to[0]).toBeCloseTo(140, 9);
    expect(k.to[1]).toBeCloseTo(17 + 110 / degreesPerDay(2.74, R), 9);
    expect(r.degPerDay).toBeCloseTo(-k.degPerDay / 3, 12);
    expect(r.to[0]).toBeCloseTo(0, 9);
    expect(r.to[1] - 17).toBeCloseTo((3 * 30) / k.degPerDay, 9);
  });
  it('stops at the end of the run when a wall is not reached', () => {
    expect(clipLine(10, 0, 1, 0, 100, 20)!.to).toEqual([30, 20]);
    expect(clipLine(10, 30, 1, 0, 100, 20)).toBeNull();
  });
});

describe('display fields', () => {
  const fields = {
    h_anom: Float32Array.from([10, NaN]),
    u: Float32Array.from([3, NaN]),
    v: Float32Array.from([4, NaN]),
  };
  it('offers only what the run writes', () => {
    expect(availableDisplays(['h_anom', 'u', 'v']).map((d) => d.key)).toEqual(['h_anom', 'depth', 'u', 'v', 'speed']);
  });
  it('depth is H plus the anomaly, speed the length of the vector; land stays NaN', () => {
    const out = new Float32Array(2);
    expect(fillDisplay('depth', fields, 150, out)).toBe(true);
    expect(out[0]).toBe(160);
    expect(Number.isNaN(out[1])).toBe(true);
    fillDisplay('speed', fields, 150, out);
    expect(out[0]).toBe(5);
    expect(displayAt('speed', fields, 150, 0)).toBe(5);
    expect(fillDisplay('stress', fields, 150, out)).toBe(false);
  });
});

describe('probes', () => {
  it('scenario probes fill from samples, page probes from frames', () => {
    const s = new ProbeStore();
    s.reset(['h_anom', 'u'], [{ name: 'east', lon: 100, lat: 0 }]);
    s.addSample(0, [Float32Array.from([1, 2])]);
    const p = s.addPageProbe(50, 1, 1);
    s.addFrame(0.5, { h_anom: Float32Array.from([0, 7]), u: Float32Array.from([0, 8]) });
    s.addFrame(0.5, { h_anom: Float32Array.from([0, 9]), u: Float32Array.from([0, 9]) });
    expect(s.probes[0].values.u).toEqual([2]);
    expect(p.days).toEqual([0.5]);
    expect(p.values.h_anom).toEqual([7]);
  });
  it('aligns series on the union of their days', () => {
    const a = alignSeries([
      { days: [0, 1, 2], values: [1, 2, NaN] },
      { days: [1.5], values: [5] },
    ]);
    expect(a.x).toEqual([0, 1, 1.5, 2]);
    expect(a.ys).toEqual([
      [1, 2, null, null],
      [null, null, 5, null],
    ]);
  });
});

describe('map geometry', () => {
  it('labels longitudes and latitudes', () => {
    expect([lonLabel(160), lonLabel(210), lonLabel(0), lonLabel(180), lonLabel(-30)]).toEqual([
      '160°E',
      '150°W',
      '0°',
      '180°',
      '30°W',
    ]);
    expect([latLabel(-5), latLabel(0), latLabel(2.5)]).toEqual(['5°S', '0°', '2.5°N']);
    expect(graticuleLines(-25, 25, 10)).toEqual([-20, -10, 0, 10, 20]);
  });
  it('finds the cell under a point (rows counted from the south)', () => {
    expect(cellAt(0, 0, 10, 4)).toEqual({ i: 0, j: 3 });
    expect(cellAt(0.999, 0.999, 10, 4)).toEqual({ i: 9, j: 0 });
    expect(cellAt(1, 0.5, 10, 4)).toBeNull();
    expect(cellOf(30.2, 0.1, { lonWest: 0, lonEast: 140, latSouth: -25, latNorth: 25 }, 280, 100)).toEqual({
      i: 60,
      j: 50,
    });
  });
});
