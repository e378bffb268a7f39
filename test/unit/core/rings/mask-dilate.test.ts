import { describe, expect, it } from 'vitest';
import { dilateMask } from '../../../../core/rings/mask-dilate';
import { combineMasks, countExcluded, checkMaskSize } from '../../../../core/rings/mask-combine';
import { emptyMask } from '../../../../core/rings/pixel-mask';
import { mulberry32 } from '../../../support/seeded-random';

describe('dilateMask', () => {
  it('grows one pixel into a (2r+1)^2 square, clipped at the edges', () => {
    const m = emptyMask(9, 7);
    m.excluded[3 * 9 + 4] = 1;
    const d = dilateMask(m, 2);
    expect(countExcluded(d)).toBe(25);
    for (let j = 0; j < 7; j++) for (let i = 0; i < 9; i++) {
      expect(d.excluded[j * 9 + i]).toBe(Math.abs(i - 4) <= 2 && Math.abs(j - 3) <= 2 ? 1 : 0);
    }
    const corner = emptyMask(5, 5);
    corner.excluded[0] = 1;
    expect(countExcluded(dilateMask(corner, 1))).toBe(4);
    expect(m.excluded.reduce((a, b) => a + b, 0)).toBe(1);
  });
  it('equals brute-force square dilation on random sparse masks (seed 7, radii 1-4)', () => {
    const rand = mulberry32(7);
    for (const r of [1, 2, 3, 4]) {
      const m = emptyMask(37, 23);
      for (let p = 0; p < m.excluded.length; p++) m.excluded[p] = rand() < 0.01 ? 1 : 0;
      const d = dilateMask(m, r);
      for (let j = 0; j < 23; j++) for (let i = 0; i < 37; i++) {
        let want = 0;
        for (let jj = Math.max(0, j - r); jj <= Math.min(22, j + r); jj++) for (let ii = Math.max(0, i - r); ii <= Math.min(36, i + r); ii++) want |= m.excluded[jj * 37 + ii]!;
        expect(d.excluded[j * 37 + i]).toBe(want);
      }
    }
  });
  it('returns a copy for radius 0 and refuses a fractional radius', () => {
    const m = emptyMask(3, 3);
    m.excluded[4] = 1;
    const d = dilateMask(m, 0);
    expect(d.excluded).not.toBe(m.excluded);
    expect(countExcluded(d)).toBe(1);
    expect(() => dilateMask(m, 1.5)).toThrow(/radiusPx must be a non-negative integer/);
  });
});

describe('combineMasks / countExcluded / checkMaskSize', () => {
  it('unites masks and counts', () => {
    const a = emptyMask(4, 2), b = emptyMask(4, 2);
    a.excluded[1] = 1; b.excluded[1] = 1; b.excluded[6] = 1;
    expect(Array.from(combineMasks(a, b).excluded)).toEqual([0, 1, 0, 0, 0, 0, 1, 0]);
  });
  it('refuses masks of different sizes, naming the mask', () => {
    expect(() => combineMasks(emptyMask(4, 2), emptyMask(2, 4))).toThrow(/masks\[1\] is 2 x 4/);
    expect(() => combineMasks()).toThrow(/at least one mask/);
    expect(() => checkMaskSize(emptyMask(3, 3), 4, 4)).toThrow(/mask is 3 x 3 .* the image is 4 x 4/);
  });
});
