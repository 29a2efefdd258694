// Page logic of saving: the default snapshot interval keeps a saved run small enough that a
// browser holds dozens of them; an edited scenario is downloaded under a name of its own.

import { describe, expect, it } from 'vitest';
import { DEFAULT_SAVE_BYTES, defaultSnapshotChoice } from '../../viewer/library-panel/library-page.ts';
import { snapshotChoices } from '../../viewer/library-panel/live-run.ts';
import { savedName } from '../../viewer/wind/wind-panel.ts';

describe('saving defaults', () => {
  it('picks the finest interval within the default size, else the coarsest', () => {
    // 241 records of 0.56 MB of maps each (the westerly burst at 0.5°) and 2 MB of series.
    const size = (k: number) => 2e6 + Math.ceil(241 / k) * 0.56e6;
    const choices = snapshotChoices(1, 241);
    const k = defaultSnapshotChoice(choices, size);
    expect(size(k)).toBeLessThanOrEqual(DEFAULT_SAVE_BYTES);
    const finer = choices.filter((c) => c < k);
    for (const c of finer) expect(size(c)).toBeGreaterThan(DEFAULT_SAVE_BYTES);
    expect(k).toBe(10);
    expect(defaultSnapshotChoice([1, 2], () => 1e9)).toBe(2);
  });
  it('names an edited scenario after the edit, and leaves an unedited or renamed one alone', () => {
    const opened = { name: 'Westerly burst', physics: { reducedGravity: 0.05 } };
    expect(savedName(opened, opened, false)).toBe(opened);
    const edited = { name: 'Westerly burst', physics: { reducedGravity: 0.03 } };
    expect(savedName(edited, opened, true)).toEqual({
      name: 'Westerly burst (edited)',
      physics: { reducedGravity: 0.03 },
    });
    const renamed = { name: 'Slow burst', physics: { reducedGravity: 0.03 } };
    expect(savedName(renamed, opened, true)).toBe(renamed);
  });
});
