import { describe, expect, it } from 'vitest';
import {
  allowedCubicN,
  cubicMultiplicity,
  cubicRingLadder,
  isReflectionAllowed,
  MAX_CUBIC_N,
  normalisedStructureFactorSquared,
} from '../../../../core/indexing';

describe('cubicMultiplicity', () => {
  // Multiplicities of the cubic forms in m-3m: International Tables Vol. A, the
  // general and special forms of point group m-3m (6, 8, 12, 24, 24, 24, 48).
  it.each([
    [[1, 0, 0], 6],
    [[1, 1, 1], 8],
    [[1, 1, 0], 12],
    [[2, 1, 0], 24],
    [[2, 1, 1], 24],
    [[2, 2, 1], 24],
    [[3, 2, 1], 48],
  ] as const)('cubicMultiplicity(%j) = %i', (hkl, m) => {
    expect(cubicMultiplicity(hkl)).toBe(m);
  });
});

describe('normalisedStructureFactorSquared', () => {
  it('gives diamond |1 + i|^2 / 4 = 1/2 for all-odd hkl and 1 for 4 0 0, 0 for 2 2 2', () => {
    expect(normalisedStructureFactorSquared('diamond', [1, 1, 1])).toBeCloseTo(0.5, 12);
    expect(normalisedStructureFactorSquared('diamond', [4, 0, 0])).toBeCloseTo(1, 12);
    expect(normalisedStructureFactorSquared('diamond', [2, 2, 2])).toBeLessThan(1e-20);
    expect(isReflectionAllowed('diamond', [2, 2, 2])).toBe(false);
  });
  it('rejects an unknown structure by name', () => {
    expect(() => normalisedStructureFactorSquared('hcp' as never, [1, 0, 0])).toThrow(/structure must be one of primitive, bcc, fcc, diamond; got hcp/);
  });
});

describe('cubicRingLadder', () => {
  it('keeps both families of N = 9 (3 0 0, 2 2 1) and N = 27 (5 1 1, 3 3 3)', () => {
    const cp = cubicRingLadder('primitive', 30);
    expect(cp.find((o) => o.n === 9)!.families.map((f) => f.hkl)).toEqual([[3, 0, 0], [2, 2, 1]]);
    expect(cp.find((o) => o.n === 27)!.families.map((f) => f.hkl)).toEqual([[5, 1, 1], [3, 3, 3]]);
    const fcc = cubicRingLadder('fcc', 30);
    expect(fcc.find((o) => o.n === 27)!.families.map((f) => f.hkl)).toEqual([[5, 1, 1], [3, 3, 3]]);
  });
  it('writes every family h >= k >= l >= 0 with h^2 + k^2 + l^2 = N', () => {
    for (const order of cubicRingLadder('primitive', 300)) {
      for (const { hkl } of order.families) {
        expect(hkl[0] >= hkl[1] && hkl[1] >= hkl[2] && hkl[2] >= 0).toBe(true);
        expect(hkl[0] ** 2 + hkl[1] ** 2 + hkl[2] ** 2).toBe(order.n);
      }
    }
  });
  it('returns the same orders whether the cache was built small or large', () => {
    const small = allowedCubicN('bcc', 50);
    allowedCubicN('bcc', 3000);
    expect(allowedCubicN('bcc', 50)).toEqual(small);
    expect(allowedCubicN('bcc', 3000).filter((n) => n <= 50)).toEqual(small);
  });
  it('refuses N beyond MAX_CUBIC_N or below 1', () => {
    expect(() => cubicRingLadder('fcc', MAX_CUBIC_N + 1)).toThrow(/nMax must lie in \[1, 10000\]/);
    expect(() => cubicRingLadder('fcc', 0)).toThrow(/nMax/);
  });
});
