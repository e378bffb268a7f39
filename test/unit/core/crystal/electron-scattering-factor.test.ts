import { describe, expect, it } from 'vitest';
import { electronScatteringCoefficients, electronScatteringFactorA } from '../../../../core/crystal';

describe('electronScatteringFactorA', () => {
  it('is the sum of the a_i at s = 0: Au 10.5714 Å (International Tables Vol. C Table 4.3.2.2 coefficients)', () => {
    const c = electronScatteringCoefficients(79);
    expect(electronScatteringFactorA('Au', 0)).toBeCloseTo(c.slice(0, 5).reduce((a, b) => a + b, 0), 12);
    expect(electronScatteringFactorA('Au', 0)).toBeCloseTo(10.5714, 10);
  });

  it('evaluates sum a_i exp(-b_i s^2) at s = 0.5 1/Å', () => {
    const c = electronScatteringCoefficients(14);
    let f = 0;
    for (let i = 0; i < 5; i++) f += c[i]! * Math.exp(-c[i + 5]! * 0.25);
    expect(electronScatteringFactorA('Si', 0.5)).toBeCloseTo(f, 14);
  });

  it('falls monotonically with s for every element from H to Cf', () => {
    for (let z = 1; z <= 98; z++) {
      let prev = Infinity;
      for (let s = 0; s <= 2; s += 0.1) {
        const f = electronScatteringFactorA(z, s);
        expect(f).toBeLessThan(prev);
        expect(f).toBeGreaterThan(0);
        prev = f;
      }
    }
  });

  it('grows with Z at s = 0 across the table (C < Si < Fe < Au)', () => {
    const f = ['C', 'Si', 'Fe', 'Au'].map((e) => electronScatteringFactorA(e, 0));
    expect([...f].sort((a, b) => a - b)).toEqual(f);
  });

  it('takes a symbol, a CIF type symbol or Z alike', () => {
    expect(electronScatteringFactorA('O2-', 0.3)).toBe(electronScatteringFactorA(8, 0.3));
  });

  it('accepts s = 2 and throws beyond the fit range 0 <= s <= 2 1/Å, naming sPerA', () => {
    expect(electronScatteringFactorA('Au', 2)).toBeGreaterThan(0);
    for (const s of [2.0001, -0.1, Number.NaN, Infinity]) expect(() => electronScatteringFactorA('Au', s)).toThrow(/sPerA/);
  });

  it('throws for Z outside 1..98 and unknown symbols', () => {
    expect(() => electronScatteringFactorA(99, 0.1)).toThrow(/1 to 98/);
    expect(() => electronScatteringFactorA(0, 0.1)).toThrow(RangeError);
    expect(() => electronScatteringFactorA('Es', 0.1)).toThrow(/beyond Cf/);
    expect(() => electronScatteringFactorA('Zz', 0.1)).toThrow(/unknown element "Zz"/);
  });
});
