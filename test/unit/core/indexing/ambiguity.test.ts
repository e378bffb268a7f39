import { describe, expect, it } from 'vitest';
import { findAmbiguities, firstDifference, type AmbiguityInput } from '../../../../core/indexing';

function input(label: string, linesQ: number[], explained: number[], relativeSigma = 1e-4): AmbiguityInput {
  return { label, explainedRingIndices: explained, linesQ: (qMax) => linesQ.filter((q) => q <= qMax), relativeSigma };
}

describe('firstDifference', () => {
  it('finds the first Q only one list has, and which list has it', () => {
    expect(firstDifference([1, 2, 3, 5], [1, 2, 3, 4, 5], 1e-6)).toEqual({ qPerA2: 4, onlyIn: 'b' });
    expect(firstDifference([1, 2.5], [1, 2], 1e-6)).toEqual({ qPerA2: 2, onlyIn: 'b' });
    expect(firstDifference([1, 2], [1, 2 * (1 + 1e-7)], 1e-6)).toBeNull();
  });
});

describe('findAmbiguities', () => {
  it('pairs candidates with the same explained rings and lines, giving the deciding d', () => {
    const a = input('A', [1, 2, 3, 4, 5, 6, 8, 9], [0, 1, 2]);
    const b = input('B', [1, 2, 3, 4, 5, 6, 7, 8, 9], [2, 1, 0]);
    const [amb] = findAmbiguities([a, b], 6);
    expect(amb!.candidates).toEqual([0, 1]);
    expect(amb!.decidingDA).toBeCloseTo(1 / Math.sqrt(7), 12);
    expect(amb!.reason).toMatch(/A and B explain the same 3 rings .* predicted only by B\./);
  });
  it('does not pair candidates that explain different rings', () => {
    expect(findAmbiguities([input('A', [1, 2], [0, 1]), input('B', [1, 2], [0, 2])], 2)).toEqual([]);
  });
  it('does not pair candidates whose lines differ inside the measured range', () => {
    expect(findAmbiguities([input('A', [1, 2, 3], [0, 1]), input('B', [1, 2, 2.5, 3], [0, 1])], 3)).toEqual([]);
  });
  it('reports decidingDA null when no difference appears within 8x the measured Q', () => {
    const lines = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    const [amb] = findAmbiguities([input('A', lines, [0]), input('B', lines, [0])], 1);
    expect(amb!.decidingDA).toBeNull();
  });
});
