import { describe, expect, it } from 'vitest';
import { mergeFamiliesIntoRings, predictRings, reflectionFamilies } from '../../../../core/crystal';
import { AU, SPINEL, makePhase } from './phases.fixture';

describe('predictRings', () => {
  const rings = predictRings(AU, { dMinA: 0.75 });

  it('gives profileIntensity / ringPower = d for every Au ring (power m|F|^2 d, profile m|F|^2 d^2)', () => {
    for (const r of rings) {
      expect(r.profileIntensity / r.ringPower).toBeCloseTo(r.dA, 12);
      const f = r.families[0]!;
      expect(r.ringPower).toBeCloseTo(r.families.reduce((s, x) => s + x.multiplicity * x.fSquaredA2 * x.dA, 0), 9);
      expect(f.dA).toBe(r.dA);
    }
  });

  it('merges cubic 511 and 333 (equal d) into one ring of multiplicity 24 + 8', () => {
    const r = rings.find((x) => x.families.some((f) => f.hkl.join('') === '333'))!;
    expect(r.families.map((f) => f.hkl.join(''))).toEqual(['511', '333']);
    expect(r.multiplicity).toBe(32);
    expect(rings.map((x) => x.families.map((f) => f.hkl.join('')).join('/'))).toEqual([
      '111', '200', '220', '311', '222', '400', '331', '420', '422', '511/333',
    ]);
  });

  it('scales relativeIntensity so the strongest ring is 100', () => {
    expect(Math.max(...rings.map((r) => r.relativeIntensity))).toBe(100);
    const max = Math.max(...rings.map((r) => r.profileIntensity));
    for (const r of rings) expect(r.relativeIntensity).toBeCloseTo((100 * r.profileIntensity) / max, 12);
  });

  it('orders the Au rings as polycrystalline gold films show them: 111 strongest, then 200, then 220 and 311, then 222 (TEM texts, from memory)', () => {
    const rel = new Map(rings.map((r) => [r.families[0]!.hkl.join(''), r.relativeIntensity]));
    expect(rel.get('111')).toBe(100);
    expect(rel.get('200')!).toBeGreaterThan(rel.get('220')!);
    expect(rel.get('200')!).toBeGreaterThan(rel.get('311')!);
    expect(Math.min(rel.get('220')!, rel.get('311')!)).toBeGreaterThan(rel.get('222')!);
    expect(rel.get('222')!).toBeGreaterThan(rel.get('400')!);
  });

  it('merges Pa-3 {210} and {120} (same d, different |F|) into one ring of multiplicity 24', () => {
    const p = makePhase('pa3', 'Pa-3', { aA: 5.4, bA: 5.4, cA: 5.4, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [['X1', 'Fe', 0.1234, 0.2345, 0.3456]]);
    const r = predictRings(p, { dMinA: 2, includeAbsent: true }).find((x) => x.families.some((f) => f.hkl.join('') === '210'))!;
    expect(r.families.map((f) => f.hkl.join('')).sort()).toEqual(['120', '210']);
    expect(r.multiplicity).toBe(24);
  });

  it('keeps absent families only with includeAbsent, as rings of zero power', () => {
    const withAbsent = predictRings(AU, { dMinA: 1.5, includeAbsent: true });
    const r100 = withAbsent.find((r) => r.families[0]!.hkl.join('') === '100')!;
    expect(r100.relativeIntensity).toBeLessThan(1e-20);
    expect(predictRings(AU, { dMinA: 1.5 }).map((r) => r.families[0]!.hkl.join(''))).toEqual(['111', '200']);
  });

  it('uses mergeRelativeTolerance: a huge tolerance merges every family into one ring', () => {
    const one = predictRings(SPINEL, { dMinA: 1.2, mergeRelativeTolerance: 10 });
    expect(one).toHaveLength(1);
    expect(one[0]!.multiplicity).toBe(reflectionFamilies(SPINEL, { dMinA: 1.2 }).reduce((s, f) => s + f.multiplicity, 0));
  });

  it('throws for a negative or non-finite mergeRelativeTolerance', () => {
    expect(() => predictRings(AU, { dMinA: 1, mergeRelativeTolerance: -1 })).toThrow(/mergeRelativeTolerance/);
    expect(() => predictRings(AU, { dMinA: 1, mergeRelativeTolerance: Number.NaN })).toThrow(/mergeRelativeTolerance/);
  });
});

describe('mergeFamiliesIntoRings', () => {
  it('returns no rings for no families, and relative intensities 0 when all power is 0', () => {
    expect(mergeFamiliesIntoRings([], 1e-6)).toEqual([]);
    const r = mergeFamiliesIntoRings([{ hkl: [1, 0, 0], multiplicity: 6, dA: 2, fSquaredA2: 0 }], 1e-6);
    expect(r[0]!.relativeIntensity).toBe(0);
  });
});
