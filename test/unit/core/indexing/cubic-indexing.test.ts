import { describe, expect, it } from 'vitest';
import { indexCubic, type MeasuredRing } from '../../../../core/indexing';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

/** Ring of a cubic cell of edge aA at N, with sigma = rel d and optional seeded relative noise. */
function ring(aA: number, n: number, rel = 0.001, noise?: () => number): MeasuredRing {
  const d = aA / Math.sqrt(n);
  return { dA: noise ? d * (1 + rel * noise()) : d, dSigmaA: rel * d };
}

describe('indexCubic', () => {
  it('indexCubic(cP rings N = 1..6) reports cP a and cI a sqrt 2 as equivalent, deciding at d = a / sqrt 7', () => {
    const a = 3;
    const r = indexCubic([1, 2, 3, 4, 5, 6].map((n) => ring(a, n)));
    const [first, second] = r.candidates;
    expect(first!.lattice).toBe('cP'); // the smaller primitive cell wins the tie
    expect(second!.lattice).toBe('cI');
    expect(second!.aA).toBeCloseTo(a * Math.SQRT2, 6);
    const amb = r.ambiguities.find((x) => x.candidates[0] === 0 && x.candidates[1] === 1)!;
    expect(amb.decidingDA).toBeCloseTo(a / Math.sqrt(7), 6);
    expect(amb.reason).toMatch(/predicted only by cI bcc/);
  });

  it('indexCubic(cP rings N = 1..6 and 8) ranks cP first with no cP/cI equivalence; cI misses N\' = 14', () => {
    const a = 3;
    const r = indexCubic([1, 2, 3, 4, 5, 6, 8].map((n) => ring(a, n)));
    expect(r.candidates[0]!.lattice).toBe('cP');
    const ci = r.candidates.find((c) => c.lattice === 'cI' && Math.abs(c.aA - a * Math.SQRT2) < 1e-3)!;
    expect(ci.missing.map((m) => m.n)).toEqual([14]);
    expect(ci.missing[0]!.hkl).toEqual([3, 2, 1]);
    expect(r.ambiguities.some((x) => x.candidates.includes(0) && x.candidates.includes(r.candidates.indexOf(ci)))).toBe(false);
  });

  it('indexCubic(cI rings N = 2..14) ranks cI first: cP of edge a / sqrt 2 has no ring for N\' = 7', () => {
    const a = 3.1652;
    const r = indexCubic([2, 4, 6, 8, 10, 12, 14].map((n) => ring(a, n)));
    expect(r.candidates[0]!.structure).toBe('bcc');
    expect(r.candidates[0]!.aA).toBeCloseTo(a, 6);
    const cp = r.candidates.find((c) => c.lattice === 'cP' && Math.abs(c.aA - a / Math.SQRT2) < 1e-3)!;
    expect(cp.unexplained.map((u) => u.dA)).toEqual([a / Math.sqrt(14)]);
    expect(r.candidates.indexOf(cp)).toBeGreaterThan(0);
  });

  it('lists a spurious ring as unexplained and a predicted ring that is absent as missing', () => {
    const a = 4.0786;
    const rings = [3, 4, 8, 11, 16, 19].map((n) => ring(a, n)); // 2 2 2 (N = 12) left out
    rings.push({ dA: 1.6, dSigmaA: 0.0016 });
    const best = indexCubic(rings).candidates[0]!;
    expect(best.structure).toBe('fcc');
    expect(best.unexplained).toEqual([{ ringIndex: 6, dA: 1.6 }]);
    expect(best.missing.map((m) => [m.n, m.hkl])).toEqual([[12, [2, 2, 2]]]);
    expect(best.explainedCount).toBe(6);
  });

  it('reports each assignment with hkl, N, d_calc = a / sqrt N and the residual in sigmas', () => {
    const rand = mulberry32(20261203);
    const a = 3.6149;
    const rings = [3, 4, 8, 11, 12, 16].map((n) => ring(a, n, 0.002, () => gaussian(rand)));
    const best = indexCubic(rings).candidates[0]!;
    expect(best.assignments.map((x) => x.hkl)).toEqual([[1, 1, 1], [2, 0, 0], [2, 2, 0], [3, 1, 1], [2, 2, 2], [4, 0, 0]]);
    for (const x of best.assignments) {
      expect(x.dCalcA).toBeCloseTo(best.aA / Math.sqrt(x.n), 12);
      expect(x.residualA).toBeCloseTo(x.dA - x.dCalcA, 12);
      expect(x.residualSigma).toBeCloseTo(x.residualA / x.dSigmaA, 9);
    }
    expect(best.figureOfMeritName).toBe('de Wolff M6');
    expect(best.figureOfMerit).toBe(best.deWolff.value);
  });

  it('adds the calibration uncertainty to sigma_a in quadrature', () => {
    const rand = mulberry32(20261204);
    const rings = [2, 4, 6, 8, 10].map((n) => ring(3.3, n, 0.002, () => gaussian(rand)));
    const plain = indexCubic(rings).candidates[0]!;
    const calibrated = indexCubic(rings, { calibrationRelativeSigma: 0.005 }).candidates[0]!;
    expect(calibrated.aA).toBe(plain.aA);
    expect(calibrated.aSigmaA).toBeCloseTo(Math.hypot(plain.aSigmaA, 0.005 * plain.aA), 12);
  });

  it('seeds from the strongest rings when intensities are given', () => {
    // Three weak rings at large d that belong to nothing, before gold's pattern.
    const junk = [7.9, 6.1, 5.3].map((d) => ({ dA: d, dSigmaA: d * 1e-3, intensity: 1 }));
    const au = [3, 4, 8, 11, 12].map((n, i) => ({ ...ring(4.0786, n), intensity: [100, 50, 30, 35, 10][i]! }));
    const withIntensity = indexCubic([...junk, ...au]).candidates[0]!;
    expect(withIntensity.structure).toBe('fcc');
    expect(withIntensity.aA).toBeCloseTo(4.0786, 6);
    const without = indexCubic([...junk, ...au].map(({ dA, dSigmaA }) => ({ dA, dSigmaA }))).candidates[0]!;
    expect(Math.abs(without.aA - 4.0786)).toBeGreaterThan(0.01);
  });

  it('notes that diamond is favoured when the fcc-only rings in range are not observed', () => {
    const r = indexCubic([3, 8, 11, 16, 19, 24].map((n) => ring(5.4311946, n)));
    expect(r.candidates[0]!.structure).toBe('diamond');
    expect(r.notes.join('\n')).toMatch(/rings only fcc has, 2 0 0 \(d = 2\.7156 Å\), 2 2 2 .* not observed, which favours diamond/);
  });

  it('notes that fcc-only rings are observed for an fcc pattern', () => {
    const r = indexCubic([3, 4, 8, 11, 12].map((n) => ring(4.0786, n)));
    expect(r.candidates[0]!.structure).toBe('fcc');
    expect(r.notes.join('\n')).toMatch(/rings only fcc has are observed, 2 0 0 .*2 2 2 .*diamond cannot explain them/);
  });

  it('returns no candidate and a note when nothing explains two rings', () => {
    const r = indexCubic([{ dA: 2, dSigmaA: 2e-6 }, { dA: 2.0004, dSigmaA: 2e-6 }], { windowFloorRelative: 0 });
    expect(r.candidates).toEqual([]);
    expect(r.notes[0]).toMatch(/no cubic lattice explains two or more of the 2 rings/);
  });

  it('returns candidates in the same order whatever the order of the rings', () => {
    const rings = [3, 4, 8, 11, 12, 16].map((n) => ring(4.0494, n));
    const forward = indexCubic(rings).candidates.map((c) => c.label);
    const backward = indexCubic([...rings].reverse()).candidates.map((c) => c.label);
    expect(backward).toEqual(forward);
  });

  it('rejects bad options by name', () => {
    const rings = [ring(4, 3), ring(4, 4)];
    expect(() => indexCubic(rings, { windowSigmas: 0 })).toThrow(/options\.windowSigmas must be a positive/);
    expect(() => indexCubic(rings, { spuriousFraction: 1 })).toThrow(/options\.spuriousFraction/);
    expect(() => indexCubic(rings, { structures: ['hcp' as never] })).toThrow(/unknown structure hcp/);
    expect(() => indexCubic(rings, { structures: [] })).toThrow(/at least one/);
    expect(() => indexCubic(rings, { maxCandidates: 0 })).toThrow(/options\.maxCandidates must be a positive integer/);
    expect(() => indexCubic([ring(4, 3)])).toThrow(/at least 2 measured rings/);
  });
});
