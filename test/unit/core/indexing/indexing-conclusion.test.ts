import { describe, expect, it } from 'vitest';
import { duplicateRingNotes, judgeIndexing } from '../../../../core/indexing';

const rings = (n: number) => Array.from({ length: n }, (_, i) => ({ dA: 3 - 0.2 * i, dSigmaA: 0.003 }));

describe('judgeIndexing', () => {
  it('is conclusive when the best explains at least 3 rings and two thirds of them', () => {
    expect(judgeIndexing(rings(4), 4).conclusive).toBe(true);
    expect(judgeIndexing(rings(9), 6).conclusive).toBe(true);
  });
  it('is not conclusive with fewer than 3 explained rings, naming the count', () => {
    const c = judgeIndexing(rings(2), 2);
    expect(c.conclusive).toBe(false);
    expect(c.reason).toMatch(/only 2 rings/);
  });
  it('is not conclusive when more than a third is unexplained', () => {
    expect(judgeIndexing(rings(9), 5).conclusive).toBe(false);
    expect(judgeIndexing(rings(7), 2).reason).toMatch(/only 2/);
  });
  it('is not conclusive without candidates', () => {
    expect(judgeIndexing(rings(4), null).conclusive).toBe(false);
  });
});

describe('duplicateRingNotes', () => {
  it('names rings whose d agree within their combined uncertainty, and only those', () => {
    const notes = duplicateRingNotes([
      { dA: 2.355, dSigmaA: 0.005 },
      { dA: 2.358, dSigmaA: 0.005 },
      { dA: 2.039, dSigmaA: 0.005 },
    ]);
    expect(notes).toHaveLength(1);
    expect(notes[0]).toMatch(/rings 1 and 2/);
  });
});
