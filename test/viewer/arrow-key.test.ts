// The automatic key arrow of the map (viewer/render/map-view.ts): a high percentile of the arrows'
// lengths, rounded, so one fast jet does not make every other arrow a dot.

import { describe, expect, it } from 'vitest';
import { keyMagnitude } from '../../viewer/render/map-view.ts';

describe('the automatic key arrow', () => {
  it('follows the bulk of the arrows, not the extreme', () => {
    const lengths = new Float32Array(1000).fill(0.08);
    for (let k = 0; k < 20; k++) lengths[k] = 5; // a narrow jet, 2 % of the arrows
    expect(keyMagnitude(lengths)).toBe(0.1);
  });
  it('is a round number: 1, 2, 2.5 or 5 times a power of ten', () => {
    expect(keyMagnitude(Float32Array.from({ length: 100 }, (_, k) => (k + 1) * 0.003))).toBe(0.5);
    expect(keyMagnitude(Float32Array.from([0.021]))).toBe(0.025);
    expect(keyMagnitude(new Float32Array(0))).toBe(0);
  });
});
