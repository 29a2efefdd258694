// Bulk formula tau = rho_a C_D |U| U against check values.
import { describe, expect, it } from 'vitest';
import { bulkStress, largePondDrag, makeBulkFormula } from '../../model/forcing/bulk.ts';

describe('bulk formula', () => {
  const lp = makeBulkFormula({ airDensity: 1.2, drag: 'large-pond', dragCoefficient: 0 });

  it('Large & Pond (1981) drag coefficient in its fitted range', () => {
    // Large & Pond 1981, JPO 11, 324: 10^3 C_D = 1.2 for 4 <= U < 11; 0.49 + 0.065 U for 11 <= U <= 25.
    expect(largePondDrag(4)).toBeCloseTo(1.2e-3, 15);
    expect(largePondDrag(10.99)).toBeCloseTo(1.2e-3, 15);
    expect(largePondDrag(11)).toBeCloseTo(1.205e-3, 15);
    expect(largePondDrag(20)).toBeCloseTo(1.79e-3, 15);
    expect(largePondDrag(25)).toBeCloseTo(2.115e-3, 15);
  });

  it('holds the end values outside 4..25 m/s (our choice, see bulk.ts)', () => {
    expect(largePondDrag(0)).toBe(largePondDrag(4));
    expect(largePondDrag(2)).toBe(1.2e-3);
    expect(largePondDrag(40)).toBe(largePondDrag(25));
  });

  it('stress magnitudes match the Large & Pond check values', () => {
    // check-values.md section 0 (derived from Large & Pond 1981 with rho_a = 1.2 kg m-3,
    // McPhaden & Taft 1988): U = 5: 0.036; 7: 0.071; 10: 0.144; 15: 0.396 N m-2 (3 decimals).
    const cases: Array<[number, number]> = [
      [5, 0.036],
      [7, 0.071],
      [10, 0.144],
      [15, 0.396],
    ];
    for (const [speed, tau] of cases) {
      const [tx, ty] = bulkStress(lp, speed, 0);
      expect(Math.abs(tx - tau)).toBeLessThan(0.0005 + 1e-12);
      expect(ty).toBe(0);
    }
  });

  it('is a vector formula: direction kept, magnitude from |U|', () => {
    // 3-4-5 wind: |U| = 5, C_D = 1.2e-3: tau = 1.2 * 1.2e-3 * 5 * (-3, 4)
    const [tx, ty] = bulkStress(lp, -3, 4);
    expect(tx).toBeCloseTo(1.2 * 1.2e-3 * 5 * -3, 15);
    expect(ty).toBeCloseTo(1.2 * 1.2e-3 * 5 * 4, 15);
    expect(Math.hypot(tx, ty)).toBeCloseTo(0.036, 12);
  });

  it('constant drag coefficient', () => {
    // McPhaden & Hayes 1990: C_D = 1.2e-3, rho_a = 1.2. At 7 m/s: 1.2 * 1.2e-3 * 49 = 0.07056.
    const c = makeBulkFormula({ airDensity: 1.2, drag: 'constant', dragCoefficient: 1.2e-3 });
    expect(bulkStress(c, 7, 0)[0]).toBeCloseTo(0.07056, 12);
    expect(bulkStress(c, 30, 0)[0]).toBeCloseTo(1.2 * 1.2e-3 * 900, 12);
  });

  it('rejects bad settings', () => {
    expect(() => makeBulkFormula({ airDensity: 0, drag: 'constant', dragCoefficient: 1e-3 })).toThrow(/airDensity/);
    expect(() => makeBulkFormula({ airDensity: 1.2, drag: 'constant', dragCoefficient: -1 })).toThrow(
      /dragCoefficient/,
    );
  });
});
