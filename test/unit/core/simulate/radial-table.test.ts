import { describe, expect, it } from 'vitest';
import { radialTableValue, tabulateRadial } from '../../../../core/simulate';

describe('tabulateRadial / radialTableValue', () => {
  it('reproduces a linear function exactly between nodes and is 0 outside the table', () => {
    const table = tabulateRadial(2, 0.25, 41, (r) => 3 * r - 1);
    expect(radialTableValue(table, 2)).toBe(5);
    expect(radialTableValue(table, 5.3)).toBeCloseTo(14.9, 12);
    expect(radialTableValue(table, 12)).toBe(35);
    expect(radialTableValue(table, 1.99)).toBe(0);
    expect(radialTableValue(table, 12.01)).toBe(0);
  });

  it('interpolates a Gaussian of FWHM 1 px at step 1/64 px to within ln 2 (h / FWHM)^2 of its peak (the bound in radial-table.ts)', () => {
    const f = (r: number): number => Math.exp((-4 * Math.LN2 * (r - 5.0071) ** 2) / 1);
    const table = tabulateRadial(0, 1 / 64, 641, f);
    let worst = 0;
    for (let r = 1; r < 9; r += 0.001) worst = Math.max(worst, Math.abs(radialTableValue(table, r) - f(r)));
    expect(worst).toBeLessThan(Math.LN2 / 64 ** 2);
    expect(worst).toBeGreaterThan(0.1 * (Math.LN2 / 64 ** 2));
  });
});
