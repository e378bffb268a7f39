import { describe, expect, it } from 'vitest';
import { medianInPlace, selectInPlace, selectTwoInPlace } from '../../../../core/rings/sample-median';
import { randomStream } from '../../../../core/simulate/seeded-random';

describe('selection (sample-median.ts)', () => {
  it('gives exactly the elements a numeric sort puts at each rank, with many ties, sorted and reversed input (seed 9101)', () => {
    const stream = randomStream(9101);
    const rand = () => stream.uniform();
    let checked = 0;
    for (let trial = 0; trial < 600; trial++) {
      const n = 1 + Math.floor(rand() * (trial % 5 === 0 ? 2000 : 30));
      const levels = 1 + Math.floor(rand() * 6);
      const a = Float64Array.from({ length: n }, () => (rand() < 0.5 ? Math.floor(rand() * levels) : rand() * levels - levels / 2));
      if (trial % 7 === 0) a.sort();
      if (trial % 11 === 0) a.reverse();
      const sorted = Float64Array.from(a).sort();
      const median = n % 2 ? sorted[(n - 1) >> 1]! : 0.5 * (sorted[n / 2 - 1]! + sorted[n / 2]!);
      expect(medianInPlace(Float64Array.from(a))).toBe(median);
      const rank = Math.floor(rand() * n);
      const b = Float64Array.from(a);
      expect(selectInPlace(b, rank)).toBe(sorted[rank]);
      // Partitioned around the rank; the multiset is unchanged.
      for (let k = 0; k < rank; k++) expect(b[k]!).toBeLessThanOrEqual(b[rank]!);
      for (let k = rank + 1; k < n; k++) expect(b[k]!).toBeGreaterThanOrEqual(b[rank]!);
      expect(Array.from(Float64Array.from(b).sort())).toEqual(Array.from(sorted));
      const lo = Math.floor(rand() * n), hi = lo + Math.floor(rand() * (n - lo));
      expect(selectTwoInPlace(Float64Array.from(a), lo, hi)).toEqual([sorted[lo], sorted[hi]]);
      checked++;
    }
    expect(checked).toBe(600);
  });

  it('keeps the sort order of NaN (last) and refuses ranks out of range', () => {
    expect(medianInPlace(Float64Array.from([3, Number.NaN, 1]))).toBe(3);
    expect(selectInPlace(Float64Array.from([Number.NaN, 2, 1]), 1)).toBe(2);
    expect(Number.isNaN(medianInPlace(new Float64Array(0)))).toBe(true);
    expect(() => selectInPlace(Float64Array.from([1, 2]), 2)).toThrow(/rank must be an integer in \[0, 2\); got 2/);
    expect(() => selectTwoInPlace(Float64Array.from([1, 2]), 1, 0)).toThrow(/0 <= lo <= hi < 2; got 1, 0/);
  });
});
