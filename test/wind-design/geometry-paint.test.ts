// The maths behind the wind designer's map tools: patch handles and drags, band drags, the brush.

import { describe, expect, it } from 'vitest';
import { compileShape } from '../../model/forcing/shapes.ts';
import {
  bandFromDrag,
  dragEdge,
  hitHandle,
  insidePatch,
  moveCentre,
  patchHandles,
  scaleWidth,
  turnBy,
  turnTowards,
  type PatchGeometry,
} from '../../viewer/wind/patch-geometry.ts';
import { blankGrid, dab, footprint, neighbourMean, strokePoints, type Brush } from '../../viewer/wind/paint.ts';
import { emptyTimeline, recorded, redone, undone, type Timeline } from '../../viewer/wind/history.ts';

const P: PatchGeometry = { lon: 100, lat: 0, lonWidth: 10, latWidth: 4 };

describe('patch geometry', () => {
  it('puts the edge handles one width out along the turned axes, where the model shape is exp(-1/2)', () => {
    for (const tilt of [0, 30, -75, 140]) {
      const p = { ...P, tiltDeg: tilt };
      const shape = compileShape({ kind: 'patch', ...p });
      for (const h of patchHandles(p)) {
        const v = shape.at(h.lon, h.lat, 0);
        if (h.kind === 'centre') expect(v).toBeCloseTo(1, 12);
        else if (h.kind === 'turn') expect(v).toBeCloseTo(Math.exp(-0.5 * 1.6 * 1.6), 12);
        else expect(v).toBeCloseTo(Math.exp(-0.5), 12);
      }
    }
  });

  it('moves the centre by the drag and leaves the widths alone', () => {
    expect(moveCentre(P, 3.5, -1.25)).toEqual({ lon: 103.5, lat: -1.25, lonWidth: 10, latWidth: 4 });
  });

  it('resizes along the handle axis only: a sideways wobble does not change the width', () => {
    expect(dragEdge(P, 'east', 112, 0).lonWidth).toBe(12);
    expect(dragEdge(P, 'east', 112, 3).lonWidth).toBe(12);
    expect(dragEdge(P, 'west', 95, 7).lonWidth).toBe(5);
    expect(dragEdge(P, 'north', 130, 6).latWidth).toBe(6);
    // On a patch turned by 90 degrees, x' points north: dragging the east handle north widens it.
    const turned = { ...P, tiltDeg: 90 };
    expect(dragEdge(turned, 'east', 100, 8).lonWidth).toBeCloseTo(8, 10);
    expect(dragEdge(turned, 'east', 120, 0).lonWidth).toBe(0.1); // across the axis only: the narrowest
  });

  it('turns toward the pointer, in (-180, 180], and by steps from the keyboard', () => {
    expect(turnTowards(P, 110, 10).tiltDeg).toBe(45);
    expect(turnTowards(P, 90, 0).tiltDeg).toBe(180);
    expect(turnTowards(P, 100, -5).tiltDeg).toBe(-90);
    expect(turnBy({ ...P, tiltDeg: 175 }, 10).tiltDeg).toBe(-175);
    expect(scaleWidth(P, 'lat', 1.5).latWidth).toBe(6);
  });

  it('finds the handle under the pointer, the turning handle first, and the inside of the patch', () => {
    const toPixel = (lon: number, lat: number): [number, number] => [lon * 4, -lat * 4];
    expect(hitHandle(P, 400, 0, toPixel)).toBe('centre');
    expect(hitHandle(P, 440 + 3, 0, toPixel)).toBe('east');
    expect(hitHandle(P, 464, 2, toPixel)).toBe('turn');
    expect(hitHandle(P, 400, -16, toPixel)).toBe('north');
    expect(hitHandle(P, 300, 50, toPixel)).toBeNull();
    expect(insidePatch(P, 105, 2)).toBe(true);
    expect(insidePatch(P, 109, 3.9)).toBe(false);
  });

  it('draws a band from two latitudes in the part profile kind', () => {
    expect(bandFromDrag({ kind: 'tanh', south: 0, north: 1, edge: 1.5 }, 8, 3)).toEqual({
      kind: 'tanh',
      south: 3,
      north: 8,
      edge: 1.5,
    });
    expect(bandFromDrag({ kind: 'cosine', centre: 0, halfWidth: 1 }, -4, 6)).toEqual({
      kind: 'cosine',
      centre: 1,
      halfWidth: 5,
    });
    expect(bandFromDrag({ kind: 'gap', centre: 0, width: 1, depth: 0.6 }, 4, 8)).toEqual({
      kind: 'gap',
      centre: 6,
      width: 1,
      depth: 0.6,
    });
    expect(bandFromDrag({ kind: 'trades', edgeLat: 10 }, -12, 20)).toEqual({ kind: 'trades', edgeLat: 20 });
    // A click without a drag still gives a valid band (north > south).
    const b = bandFromDrag({ kind: 'tanh', south: 0, north: 1, edge: 1 }, 2, 2);
    expect(b.kind === 'tanh' && b.north > b.south).toBe(true);
  });
});

describe('painting', () => {
  const basin = { lonWest: 0, lonEast: 20, latSouth: -5, latNorth: 5 };
  const brush = (o: Partial<Brush> = {}): Brush => ({
    radius: 2,
    softEdge: 0.5,
    strength: 0.1,
    directionDeg: 0,
    mode: 'paint',
    ...o,
  });

  it('makes a grid at its own spacing with samples at cell centres', () => {
    const g = blankGrid(basin, 1);
    expect([g.lon0, g.lat0, g.dLon, g.dLat, g.nLon, g.nLat]).toEqual([0.5, -4.5, 1, 1, 20, 10]);
    expect(g.x.length).toBe(200);
    expect(blankGrid(basin, 0.5).nLon).toBe(40);
  });

  it('has a footprint of 1 in the core, a smooth fall, 0 at and beyond the radius', () => {
    expect(footprint(0, 2, 0.5)).toBe(1);
    expect(footprint(1, 2, 0.5)).toBe(1);
    expect(footprint(1.5, 2, 0.5)).toBeCloseTo(0.5, 12); // cos^2(pi/4)
    expect(footprint(2, 2, 0.5)).toBe(0);
    expect(footprint(1.99, 2, 0)).toBe(1); // a hard disc
    expect(footprint(0.5, 2, 1)).toBeCloseTo(Math.cos((Math.PI / 2) * 0.25) ** 2, 12);
  });

  it('paints toward the target vector (no pile-up) in the brush direction, only inside the radius', () => {
    const g = blankGrid(basin, 1);
    dab(g, 10, 0.5, brush({ directionDeg: 90 }));
    const k = (lon: number, lat: number) => Math.round(lat - g.lat0) * g.nLon + Math.round(lon - g.lon0);
    expect(g.x[k(10.5, 0.5)]).toBeCloseTo(0, 6);
    expect(g.y[k(10.5, 0.5)]).toBe(0.1);
    dab(g, 10, 0.5, brush({ directionDeg: 90 }));
    expect(g.y[k(10.5, 0.5)]).toBe(0.1);
    expect(g.y[k(14.5, 0.5)]).toBe(0);
    expect(g.y[k(10.5, 4.5)]).toBe(0);
  });

  it('erases by the footprint and softens toward the neighbour mean', () => {
    const g = blankGrid(basin, 1);
    dab(g, 10, 0.5, brush({ radius: 0.6, softEdge: 0 })); // one point only
    const k = Math.round(0.5 - g.lat0) * g.nLon + Math.round(9.5 - g.lon0);
    const spike = g.x.findIndex((v) => v !== 0);
    expect(g.x.filter((v) => v !== 0).length).toBe(2); // 9.5 and 10.5 lie 0.5 away
    expect(spike).toBe(k);
    const soft = structuredClone(g);
    const mean = neighbourMean(soft, g.nLon, g.nLat, 10, 5);
    dab(soft, 10.5, 0.5, brush({ mode: 'soften', radius: 0.3, softEdge: 0 }));
    expect(soft.x[5 * g.nLon + 10]).toBeCloseTo(mean[0], 6);
    expect(mean[0]).toBeCloseTo((2 * 0.1) / 9 + 0, 6);
    dab(g, 10, 0.5, brush({ mode: 'erase', radius: 3, softEdge: 0 }));
    expect(g.x.every((v) => v === 0)).toBe(true);
  });

  it('spaces the dabs of a stroke a third of the radius apart, the end included', () => {
    const pts = strokePoints(0, 0, 3, 0, 3);
    expect(pts).toEqual([
      [1, 0],
      [2, 0],
      [3, 0],
    ]);
  });

  it('undoes and redoes strokes by snapshots; a new stroke forgets the redo list', () => {
    const g = blankGrid(basin, 1);
    let h: Timeline<typeof g> = emptyTimeline();
    let cur = g;
    const stroke = (lon: number, mode: Brush['mode'] = 'paint') => {
      h = recorded(h, cur);
      dab(cur, lon, 0.5, brush({ mode }));
    };
    const back = (f: typeof undone) => {
      const r = f(h, cur)!;
      h = r.timeline;
      cur = r.value;
    };
    stroke(5);
    const after1 = structuredClone(cur);
    stroke(15);
    back(undone);
    expect(cur).toEqual(after1);
    back(undone);
    expect(cur.x.every((v) => v === 0)).toBe(true);
    expect(undone(h, cur)).toBeNull();
    back(redone);
    expect(cur).toEqual(after1);
    stroke(10, 'erase');
    expect(h.future.length).toBe(0);
  });
});
