// The wind designer's reducer, in Node: every list change is one undo step and selects the part a
// user expects; undo and redo restore the design exactly; a gesture (a drag, a paint stroke) is one
// step however many changes it makes; the state given is never changed; the validator's issues go
// to the selected part's editor or to the list under the parts; the preview day is the liveliest.

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { WindPart } from '../../model/forcing/spec.ts';
import type { ScenarioIssue } from '../../model/scenario/errors.ts';
import { newPart } from '../../viewer/wind/design.ts';
import {
  basinOf,
  canRedo,
  canUndo,
  emptyDesign,
  liveliestDay,
  notApplied,
  reduceDesign,
  routeIssues,
  runDaysOf,
  seedOf,
  type DesignAction,
  type DesignState,
} from '../../viewer/wind/design-state.ts';
import { emptyTimeline, HISTORY_LIMIT } from '../../viewer/wind/history.ts';
import { dab } from '../../viewer/wind/paint.ts';

const base = JSON.parse(readFileSync(new URL('../../configs/westerly-burst.json', import.meta.url), 'utf8')) as Record<
  string,
  unknown
>;
const basin = basinOf(base);

/** Run actions from a state; each step's input must come out unchanged. */
function run(s: DesignState, ...actions: DesignAction[]): DesignState {
  for (const a of actions) {
    const before = JSON.stringify(s);
    const next = reduceDesign(s, a);
    expect(JSON.stringify(s), `${a.kind} changed the state it was given`).toBe(before);
    s = next;
  }
  return s;
}

const names = (s: DesignState) => s.wind.parts.map((p) => p.name);
const loaded = () => run(emptyDesign(), { kind: 'load', scenario: base });
/** Parts a, b, c (c selected) with nothing to undo. */
const three = (): DesignState => {
  const s = loaded();
  const made = run(
    { ...s, wind: { ...s.wind, parts: [] } },
    { kind: 'edit', edit: { kind: 'append', parts: [{ ...newPart('uniform', basin), name: 'a' }] } },
    { kind: 'edit', edit: { kind: 'append', parts: [{ ...newPart('band', basin), name: 'b' }] } },
    { kind: 'edit', edit: { kind: 'append', parts: [{ ...newPart('patch', basin), name: 'c' }] } },
  );
  return { ...made, timeline: emptyTimeline() };
};

describe('loading a scenario', () => {
  it('takes its wind as the applied design with the first part selected', () => {
    const s = loaded();
    const parts = (base.wind as { parts: WindPart[] }).parts;
    expect(s.wind.parts).toEqual(parts);
    expect(s.selected).toBe(parts.length ? 0 : null);
    expect(notApplied(s)).toBe(false);
    expect(canUndo(s) || canRedo(s)).toBe(false);
  });

  it('keeps the undo steps when the same scenario comes back, and forgets them for another one', () => {
    const edited = run(loaded(), { kind: 'edit', edit: { kind: 'clear' } });
    expect(canUndo(edited)).toBe(true);
    expect(canUndo(run(edited, { kind: 'load', scenario: base }))).toBe(true);
    const other = { ...base, name: 'another basin' };
    expect(canUndo(run(edited, { kind: 'load', scenario: other }))).toBe(false);
    expect(
      canUndo(run(edited, { kind: 'load', scenario: { ...base, basin: { ...basin, lonEast: basin.lonEast + 10 } } })),
    ).toBe(false);
  });
});

describe('list edits', () => {
  it('select the part a user expects after each change', () => {
    let s = three();
    expect(names(s)).toEqual(['a', 'b', 'c']);
    expect(s.selected).toBe(2); // the part just added
    s = run(s, { kind: 'edit', edit: { kind: 'move', index: 2, by: -1 } });
    expect([names(s), s.selected]).toEqual([['a', 'c', 'b'], 1]); // the moved part stays selected
    s = run(s, { kind: 'edit', edit: { kind: 'duplicate', index: 0 } });
    expect([names(s), s.selected]).toEqual([['a', 'a (copy)', 'c', 'b'], 1]); // the copy
    s = run(s, { kind: 'edit', edit: { kind: 'delete', index: 0 } });
    expect([names(s), s.selected]).toEqual([['a (copy)', 'c', 'b'], 0]); // the one before, or the first
    s = run(s, { kind: 'edit', edit: { kind: 'delete', index: 2 } });
    expect([names(s), s.selected]).toEqual([['a (copy)', 'c'], 1]);
    s = run(s, { kind: 'edit', edit: { kind: 'enable', index: 0, on: false } });
    expect([s.wind.parts[0].enabled, s.selected]).toEqual([false, 0]);
    s = run(s, { kind: 'edit', edit: { kind: 'enable', index: 0, on: true } });
    expect('enabled' in s.wind.parts[0]).toBe(false); // "on" is the default, written as no key
    s = run(s, { kind: 'edit', edit: { kind: 'clear' } });
    expect([s.wind.parts.length, s.selected]).toEqual([0, null]);
  });

  it('moving the first part up changes nothing and keeps a valid selection', () => {
    const s = run(three(), { kind: 'select', index: 0 }, { kind: 'edit', edit: { kind: 'move', index: 0, by: -1 } });
    expect([names(s), s.selected]).toEqual([['a', 'b', 'c'], 0]);
  });

  it('are one undo step each; undo and redo give back each design exactly; a new edit forgets the redo', () => {
    const start = three();
    const steps: DesignAction[] = [
      { kind: 'edit', edit: { kind: 'duplicate', index: 1 } },
      { kind: 'edit', edit: { kind: 'move', index: 0, by: 1 } },
      { kind: 'edit', edit: { kind: 'enable', index: 2, on: false } },
      { kind: 'edit', edit: { kind: 'delete', index: 3 } },
      { kind: 'edit', edit: { kind: 'clear' } },
    ];
    const seen = [start.wind];
    let s = start;
    for (const a of steps) {
      s = run(s, a);
      seen.push(s.wind);
    }
    for (let k = seen.length - 2; k >= 0; k--) {
      s = run(s, { kind: 'undo' });
      expect(s.wind).toEqual(seen[k]);
      expect(s.selected === null || s.selected < s.wind.parts.length).toBe(true);
    }
    expect(run(s, { kind: 'undo' })).toBe(s); // nothing more to undo: the same state
    for (let k = 1; k < seen.length; k++) {
      s = run(s, { kind: 'redo' });
      expect(s.wind).toEqual(seen[k]);
    }
    s = run(s, { kind: 'undo' }, { kind: 'undo' });
    expect(canRedo(s)).toBe(true);
    s = run(s, { kind: 'edit', edit: { kind: 'delete', index: 0 } });
    expect(canRedo(s)).toBe(false);
  });

  it('keeps the last hundred steps', () => {
    let s = three();
    for (let k = 0; k < HISTORY_LIMIT + 20; k++)
      s = run(s, { kind: 'edit', edit: { kind: 'enable', index: 0, on: k % 2 === 1 } });
    let undos = 0;
    while (canUndo(s)) {
      s = reduceDesign(s, { kind: 'undo' });
      undos++;
    }
    expect(undos).toBe(HISTORY_LIMIT);
  });
});

describe('part changes and gestures', () => {
  it('a change with record is one step, one without joins the step before', () => {
    const s0 = three();
    const moved = (lon: number) =>
      ({
        ...s0.wind.parts[2],
        source: {
          ...(s0.wind.parts[2] as { source: object }).source,
          shape: { kind: 'patch', lon, lat: 0, lonWidth: 5, latWidth: 4 },
        },
      }) as WindPart;
    // A drag: one record, then several changes of the part.
    const s = run(
      s0,
      { kind: 'record' },
      { kind: 'set-part', index: 2, part: moved(150), record: false },
      { kind: 'set-part', index: 2, part: moved(160), record: false },
    );
    expect(s.wind.parts[2]).toEqual(moved(160));
    const back = run(s, { kind: 'undo' });
    expect(back.wind).toEqual(s0.wind);
    // Typing in the editor: each recorded change is its own step.
    const typed = run(
      s0,
      { kind: 'set-part', index: 2, part: moved(150), record: true },
      { kind: 'set-part', index: 2, part: moved(151), record: true },
    );
    expect(run(typed, { kind: 'undo' }).wind.parts[2]).toEqual(moved(150));
    // A part that is not there changes nothing.
    expect(reduceDesign(s0, { kind: 'set-part', index: 7, part: moved(1), record: true })).toBe(s0);
  });

  it('a paint stroke that changes the grid in place after its record cannot change the past', () => {
    const s0 = run(
      loaded(),
      { kind: 'edit', edit: { kind: 'clear' } },
      { kind: 'edit', edit: { kind: 'append', parts: [newPart('painted', basin, 2)] } },
    );
    const before = structuredClone(s0.wind);
    const s = run(s0, { kind: 'record' });
    const part = s.wind.parts[0] as WindPart & {
      source: {
        grid: {
          x: number[];
          y: number[];
          nLon: number;
          nLat: number;
          lon0: number;
          lat0: number;
          dLon: number;
          dLat: number;
        };
      };
    };
    dab(part.source.grid as never, (basin.lonWest + basin.lonEast) / 2, 0, {
      radius: 6,
      strength: 0.1,
      directionDeg: 0,
      softEdge: 0,
      mode: 'paint',
    });
    expect(part.source.grid.x.some((v) => v !== 0)).toBe(true);
    const painted = run(s, { kind: 'set-part', index: 0, part, record: false });
    expect(run(painted, { kind: 'undo' }).wind).toEqual(before);
  });

  it('knows when the design differs from the applied wind', () => {
    let s = loaded();
    s = run(s, { kind: 'edit', edit: { kind: 'clear' } });
    expect(notApplied(s)).toBe(true);
    s = run(s, { kind: 'applied' });
    expect(notApplied(s)).toBe(false);
    s = run(s, { kind: 'undo' });
    expect(notApplied(s)).toBe(true);
  });
});

describe('issue routing', () => {
  const issue = (path: string): ScenarioIssue => ({ path, message: `bad ${path}` }) as ScenarioIssue;
  const issues = [
    issue('wind.parts[1].source.shape.lon'),
    issue('wind.parts[1].window[0]'),
    issue('wind.parts[1]'),
    issue('wind.parts[0].envelope'),
    issue('wind.parts[10].amplitude'),
    issue('physics.reducedGravity'),
  ];

  it('gives the selected part its own issues with paths inside the part, and lists the rest', () => {
    const r = routeIssues(issues, 1, 11);
    expect(r.editor.map((i) => i.rel)).toEqual(['source.shape.lon', 'window.0', '']);
    // wind.parts[10] is not a part of wind.parts[1].
    expect(r.elsewhere.map((i) => i.path)).toEqual([
      'wind.parts[0].envelope',
      'wind.parts[10].amplitude',
      'physics.reducedGravity',
    ]);
    expect(r.invalid.map((v, k) => (v ? k : -1)).filter((k) => k >= 0)).toEqual([0, 1, 10]);
  });

  it('with no part selected, lists everything under the parts', () => {
    const r = routeIssues(issues, null, 2);
    expect(r.editor).toEqual([]);
    expect(r.elsewhere).toEqual(issues);
    expect(r.invalid).toEqual([true, true]);
  });
});

describe('what the design reads from the edited scenario', () => {
  it('falls back to a unit basin, 100 days and seed 0 while the values are missing', () => {
    expect(basinOf({})).toEqual({ lonWest: 0, lonEast: 1, latSouth: -1, latNorth: 1 });
    expect(runDaysOf({ time: { days: 'x' } })).toBe(100);
    expect(runDaysOf({ time: { days: -3 } })).toBe(100);
    expect(runDaysOf({ time: { days: 30 } })).toBe(30);
    expect(seedOf({})).toBe('0');
    expect(seedOf({ seed: 'abc' })).toBe('abc');
  });

  it('previews the day a pulse blows at full strength, and ignores parts that are off', () => {
    const pulse = {
      ...newPart('patch', basin),
      envelope: { kind: 'pulse', start: 40, duration: 20, ramp: 5 },
    } as WindPart;
    const day = liveliestDay({ parts: [pulse] }, 100, '0');
    // Full strength from day 45 to 55 (pulseFactor in model/forcing/envelopes.ts); the first such day of the axis.
    expect(day).toBeGreaterThanOrEqual(45);
    expect(day).toBeLessThanOrEqual(46);
    expect(liveliestDay({ parts: [{ ...pulse, enabled: false } as WindPart] }, 100, '0')).toBe(0);
  });
});
