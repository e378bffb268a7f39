import { describe, expect, it } from 'vitest';
import { combineMasks, countExcluded } from '../../../../core/rings/mask-combine';
import { mulberry32 } from '../../../support/seeded-random';

/** The rule written out flag by flag: excluded where any input is non-zero. */
function plainUnion(masks: Uint8Array[], n: number): number[] {
  return Array.from({ length: n }, (_, p) => (masks.some((m) => m[p] !== 0) ? 1 : 0));
}

describe('combineMasks / countExcluded', () => {
  it('excludes a pixel when any mask does, as 1, for any size and alignment (seed 811)', () => {
    const rand = mulberry32(811);
    for (let trial = 0; trial < 120; trial++) {
      const width = 1 + Math.floor(rand() * 40);
      const height = 1 + Math.floor(rand() * 20);
      const n = width * height;
      const k = 1 + (trial % 4);
      const masks = Array.from({ length: k }, (_, q) => {
        const offset = (trial + q) % 3; // views that start off a 4-byte boundary
        const e = new Uint8Array(n + 4).subarray(offset, offset + n);
        for (let p = 0; p < n; p++) {
          const r = rand();
          e[p] = r < 0.1 ? 1 : r < 0.13 ? Math.floor(rand() * 256) : 0; // flags other than 1 count as excluded
        }
        return { width, height, excluded: e };
      });
      const union = combineMasks(...masks);
      const want = plainUnion(masks.map((m) => m.excluded), n);
      expect(Array.from(union.excluded)).toEqual(want);
      expect(countExcluded(union)).toBe(want.reduce((a, b) => a + b, 0));
      expect(countExcluded(masks[0]!)).toBe(Array.from(masks[0]!.excluded).filter((v) => v !== 0).length);
    }
  });
  it('refuses no masks and masks of different sizes, naming the one', () => {
    expect(() => combineMasks()).toThrow(/at least one mask/);
    const a = { width: 4, height: 2, excluded: new Uint8Array(8) };
    const b = { width: 2, height: 4, excluded: new Uint8Array(8) };
    expect(() => combineMasks(a, a, b)).toThrow(/masks\[2\] is 2 x 4; every mask must be 4 x 2/);
  });
});
