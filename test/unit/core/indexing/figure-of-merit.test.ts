import { describe, expect, it } from 'vitest';
import { deWolffM, smithSnyderF } from '../../../../core/indexing';

// A worked example by hand, with the definitions of de Wolff (J. Appl. Cryst. 1 (1968)
// 108-113) and Smith & Snyder (J. Appl. Cryst. 12 (1979) 60-65), lines in Q = 1/d^2.
const lines = [
  { qObsPerA2: 1.01, qCalcPerA2: 1 },
  { qObsPerA2: 3.03, qCalcPerA2: 3 },
  { qObsPerA2: 1.98, qCalcPerA2: 2 },
];
const calculated = [5, 1, 2, 3, 4, 3]; // any order; 3 twice (two families on one ring) counts once

describe('deWolffM', () => {
  it('deWolffM(three lines) = Q_N / (2 <|dQ|> N_calc) = 3.03 / (2 * 0.02 * 3)', () => {
    const m = deWolffM(lines, calculated)!;
    expect(m.n).toBe(3);
    expect(m.nCalculated).toBe(3);
    expect(m.meanAbsDeltaQPerA2).toBeCloseTo(0.02, 12);
    expect(m.value).toBeCloseTo(3.03 / (2 * 0.02 * 3), 9);
  });
  it('uses only the first nMax lines in Q', () => {
    const m = deWolffM(lines, calculated, 2)!;
    expect(m.n).toBe(2);
    expect(m.nCalculated).toBe(2);
    expect(m.value).toBeCloseTo(1.98 / (2 * 0.015 * 2), 9);
  });
  it('counts the line the last ring is assigned to when it lies just above Q_N', () => {
    const m = deWolffM([{ qObsPerA2: 1, qCalcPerA2: 1 }, { qObsPerA2: 1.99, qCalcPerA2: 2 }], [1, 2, 3])!;
    expect(m.nCalculated).toBe(2);
  });
  it('returns null for fewer than two lines and stays finite for exact data', () => {
    expect(deWolffM([lines[0]!], calculated)).toBeNull();
    const exact = deWolffM([{ qObsPerA2: 1, qCalcPerA2: 1 }, { qObsPerA2: 2, qCalcPerA2: 2 }], [1, 2])!;
    expect(Number.isFinite(exact.value)).toBe(true);
    expect(exact.value).toBeGreaterThan(1e9);
  });
  it('rejects a non-integer nMax', () => {
    expect(() => deWolffM(lines, calculated, 2.5)).toThrow(/nMax must be a positive integer/);
  });
});

describe('smithSnyderF', () => {
  it('smithSnyderF(three lines) = N / (N_poss <|1/d_obs - 1/d_calc|>), in Å', () => {
    const f = smithSnyderF(lines, calculated)!;
    const mean = (Math.abs(Math.sqrt(1.01) - 1) + Math.abs(Math.sqrt(1.98) - Math.sqrt(2)) + Math.abs(Math.sqrt(3.03) - Math.sqrt(3))) / 3;
    expect(f.nPossible).toBe(3);
    expect(f.meanAbsDeltaInverseDPerA).toBeCloseTo(mean, 12);
    expect(f.valueA).toBeCloseTo(3 / (3 * mean), 9);
  });
  it('falls as the cell predicts more lines for the same fit', () => {
    const sparse = smithSnyderF(lines, [1, 2, 3])!;
    const dense = smithSnyderF(lines, [1, 1.5, 2, 2.5, 3])!;
    expect(dense.valueA / sparse.valueA).toBeCloseTo(3 / 5, 12);
  });
});
