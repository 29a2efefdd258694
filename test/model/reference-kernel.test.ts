import { describe, expect, it } from 'vitest';
import { referenceChecksum, referenceModel } from '../../model/reference-kernel.ts';
import { record } from '../support/physics-kit.ts';

// Checksums of the shared reference kernel (C double -O2 and NumPy float64 agree in all 16 digits;
// table "Reference checksums" of the refbench README). Agreement to 1e-10 is a real test there:
// swapping f_u for f_v in the v equation moves them by 3e-4 and 5e-3.
describe('linear step against the reference kernel', () => {
  it('320 x 120, 200 steps', () => {
    const m = referenceModel(320, 120);
    m.advance(200);
    const { sumEta, energy } = referenceChecksum(m);
    expect(Math.abs(sumEta / -3.501896485640523e3 - 1)).toBeLessThan(1e-10);
    expect(Math.abs(energy / 2.255786051698253e17 - 1)).toBeLessThan(1e-10);
  });
  it('320 x 120, 200 steps, WebAssembly SIMD', () => {
    const m = referenceModel(320, 120, 'wasm');
    m.advance(200);
    const { sumEta, energy } = referenceChecksum(m);
    expect(Math.abs(sumEta / -3.501896485640523e3 - 1)).toBeLessThan(1e-10);
    expect(Math.abs(energy / 2.255786051698253e17 - 1)).toBeLessThan(1e-10);
  });
  it('320 x 120, 2000 steps', () => {
    const m = referenceModel(320, 120);
    m.advance(2000);
    const { sumEta, energy } = referenceChecksum(m);
    const worst = Math.max(Math.abs(sumEta / 3.941168231540554e4 - 1), Math.abs(energy / 2.459213520838915e18 - 1));
    record('linear step against the reference kernel, 320 x 120, 2000 steps (largest relative checksum difference)', worst, 0, '', { source: 'shared refbench C and NumPy checksums', tolerance: '1e-10' });
    expect(Math.abs(sumEta / 3.941168231540554e4 - 1)).toBeLessThan(1e-10);
    expect(Math.abs(energy / 2.459213520838915e18 - 1)).toBeLessThan(1e-10);
  });
});
