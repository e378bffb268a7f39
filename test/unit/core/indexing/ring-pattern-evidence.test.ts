import { describe, expect, it } from 'vitest';
import { lowerBound, ringPatternEvidence } from '../../../../core/indexing';

const sigma = 0.002;
const ringsAt = (qs: number[]) => qs.map((q) => ({ qPerA2: q, qSigmaPerA2: sigma }));

describe('ringPatternEvidence', () => {
  it('is n ln(eps) when no line lies in range', () => {
    expect(ringPatternEvidence(ringsAt([0.3, 0.4]), [5, 6], 0.2)).toBeCloseTo(2 * Math.log(0.2), 12);
    expect(ringPatternEvidence(ringsAt([0.3, 0.4]), [], 0.2)).toBeCloseTo(2 * Math.log(0.2), 12);
  });
  it('equals the mixture formula for one ring on one line', () => {
    const qTop = 0.5 + 3 * sigma;
    const expected = Math.log(0.8 * qTop * (1 / Math.sqrt(2 * Math.PI)) / sigma + 0.2);
    expect(ringPatternEvidence(ringsAt([0.5]), [0.5], 0.2)).toBeCloseTo(expected, 12);
  });
  it('prefers the cell with fewer lines when both explain every ring', () => {
    const rings = ringsAt([0.1, 0.2, 0.3, 0.4]);
    const sparse = ringPatternEvidence(rings, [0.1, 0.2, 0.3, 0.4], 0.2);
    const dense = ringPatternEvidence(rings, [0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4], 0.2);
    expect(sparse - dense).toBeCloseTo(4 * Math.log(2), 1);
  });
  it('uses line weights when given and rejects a weight list of the wrong length', () => {
    const rings = ringsAt([0.1]);
    // Both lines lie below Q_top = 0.1 + 3 sigma; the ring sits on the first.
    const strong = ringPatternEvidence(rings, [0.1, 0.105], 0.2, [9, 1]);
    const weak = ringPatternEvidence(rings, [0.1, 0.105], 0.2, [1, 9]);
    expect(strong).toBeGreaterThan(weak);
    expect(() => ringPatternEvidence(rings, [0.1, 0.3], 0.2, [1])).toThrow(/one weight per line/);
    expect(() => ringPatternEvidence(rings, [0.1], 1)).toThrow(/spuriousFraction/);
  });
});

describe('lowerBound', () => {
  it('finds the first element >= value', () => {
    expect(lowerBound([1, 2, 2, 4], 2)).toBe(1);
    expect(lowerBound([1, 2, 2, 4], 3)).toBe(3);
    expect(lowerBound([1, 2, 2, 4], 9)).toBe(4);
  });
});
