import { describe, expect, it } from 'vitest';
import { ringsHaveIntensities, validateMeasuredRings } from '../../../../core/indexing';

const good = [
  { dA: 2.35, dSigmaA: 0.002 },
  { dA: 2.04, dSigmaA: 0.002 },
];

describe('validateMeasuredRings', () => {
  it('accepts positive, finite d and sigma', () => {
    expect(() => validateMeasuredRings(good, 2, 'index')).not.toThrow();
  });
  it('names the count needed and what to do when there are too few rings', () => {
    expect(() => validateMeasuredRings([good[0]!], 2, 'index a cubic lattice')).toThrow(/at least 2 measured rings .*index a cubic lattice; got 1\. Measure more rings/);
  });
  it('names the ring and field for a non-positive, NaN or infinite d', () => {
    expect(() => validateMeasuredRings([good[0]!, { dA: 0, dSigmaA: 0.1 }], 2, 'x')).toThrow(/rings\[1\]\.dA must be a positive, finite d-spacing in Å; got 0/);
    expect(() => validateMeasuredRings([{ dA: Number.NaN, dSigmaA: 0.1 }, good[1]!], 2, 'x')).toThrow(/rings\[0\]\.dA .*got NaN/);
    expect(() => validateMeasuredRings([{ dA: Infinity, dSigmaA: 0.1 }, good[1]!], 2, 'x')).toThrow(/rings\[0\]\.dA/);
  });
  it('rejects a zero or negative sigma and says why a zero cannot be used', () => {
    expect(() => validateMeasuredRings([good[0]!, { dA: 2, dSigmaA: 0 }], 2, 'x')).toThrow(/rings\[1\]\.dSigmaA .*got 0 .*zero uncertainty cannot weight a fit/);
    expect(() => validateMeasuredRings([good[0]!, { dA: 2, dSigmaA: -1 }], 2, 'x')).toThrow(/rings\[1\]\.dSigmaA/);
  });
  it('rejects a negative intensity and a non-array', () => {
    expect(() => validateMeasuredRings([good[0]!, { dA: 2, dSigmaA: 0.1, intensity: -3 }], 2, 'x')).toThrow(/rings\[1\]\.intensity must be a finite number >= 0/);
    expect(() => validateMeasuredRings('2.3' as never, 2, 'x')).toThrow(TypeError);
    expect(() => validateMeasuredRings([null as never, good[1]!], 2, 'x')).toThrow(/rings\[0\] must be an object/);
  });
});

describe('ringsHaveIntensities', () => {
  it('is true only when every ring has one and some are positive', () => {
    expect(ringsHaveIntensities(good)).toBe(false);
    expect(ringsHaveIntensities([{ ...good[0]!, intensity: 5 }, good[1]!])).toBe(false);
    expect(ringsHaveIntensities([{ ...good[0]!, intensity: 0 }, { ...good[1]!, intensity: 0 }])).toBe(false);
    expect(ringsHaveIntensities([{ ...good[0]!, intensity: 5 }, { ...good[1]!, intensity: 0 }])).toBe(true);
  });
});
