/**
 * Multiplicities follow International Tables Vol. A, ch. 10 (tables of the
 * crystallographic forms of each point group: the number of faces of a form is the
 * multiplicity of its reflections in the Laue class; values here from memory and
 * consistent with the gemmi cross-check in test/reference).
 */
import { describe, expect, it } from 'vitest';
import { familyRepresentative, laueRotations, preparedStructureOf, reflectionFamilies, type Phase, type ReflectionFamily } from '../../../../core/crystal';
import { AU, SI_ORIGIN_1, makePhase } from './phases.fixture';

const GENERAL: [string, string, number, number, number] = ['X1', 'Fe', 0.1234, 0.2345, 0.3456];
const byHkl = (families: ReflectionFamily[]): Map<string, ReflectionFamily> => new Map(families.map((f) => [f.hkl.join(''), f]));
const multiplicities = (phase: Phase, keys: string[]): number[] => {
  const m = byHkl(reflectionFamilies(phase, { dMinA: 0.9, includeAbsent: true }));
  return keys.map((k) => m.get(k)?.multiplicity ?? -1);
};

describe('reflectionFamilies multiplicities (International Tables Vol. A point-group forms)', () => {
  it('m-3m: {100} 6, {110} 12, {111} 8, {210} 24, {211} 24, {221} 24, {321} 48', () => {
    const p = makePhase('cubic', 'Pm-3m', { aA: 4, bA: 4, cA: 4, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    expect(multiplicities(p, ['100', '110', '111', '210', '211', '221', '321'])).toEqual([6, 12, 8, 24, 24, 24, 48]);
  });

  it('m-3 (Pa-3): {210} and {120} are separate families of 12 each; {321} and {231} of 24', () => {
    const p = makePhase('pa3', 'Pa-3', { aA: 5.4, bA: 5.4, cA: 5.4, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    expect(multiplicities(p, ['100', '110', '111', '210', '120', '321', '231'])).toEqual([6, 12, 8, 12, 12, 24, 24]);
  });

  it('6/mmm: {100} 6, {001} 2, {110} 6, {101} 12, {210} 12, {211} 24', () => {
    const p = makePhase('hex', 'P6/mmm', { aA: 3, bA: 3, cA: 5, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 }, [GENERAL]);
    expect(multiplicities(p, ['100', '001', '110', '101', '210', '211'])).toEqual([6, 2, 6, 12, 12, 24]);
  });

  it('6/m: {210} and {120} are separate families of 6', () => {
    const p = makePhase('hex6m', 'P6/m', { aA: 3, bA: 3, cA: 5, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 }, [GENERAL]);
    expect(multiplicities(p, ['210', '120', '211', '121'])).toEqual([6, 6, 12, 12]);
  });

  it('4/mmm: {100} 4, {110} 4, {001} 2, {101} 8, {111} 8, {210} 8, {211} 16', () => {
    const p = makePhase('tet', 'P4/mmm', { aA: 3, bA: 3, cA: 5, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    expect(multiplicities(p, ['100', '110', '001', '101', '111', '210', '211'])).toEqual([4, 4, 2, 8, 8, 8, 16]);
  });

  it('mmm: {100} 2, {110} 4, {111} 8; 2/m (unique b): {010} 2, {100} 2, {110} 4; -1: every family 2', () => {
    const o = makePhase('ortho', 'Pmmm', { aA: 3, bA: 4, cA: 5, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    expect(multiplicities(o, ['100', '110', '111'])).toEqual([2, 4, 8]);
    const m = makePhase('mono', 'P2/m', { aA: 3, bA: 4, cA: 5, alphaDeg: 90, betaDeg: 100, gammaDeg: 90 }, [GENERAL]);
    expect(multiplicities(m, ['010', '100', '110'])).toEqual([2, 2, 4]);
    const t = makePhase('tric', 'P-1', { aA: 3, bA: 4, cA: 5, alphaDeg: 80, betaDeg: 100, gammaDeg: 95 }, [GENERAL]);
    expect(new Set(reflectionFamilies(t, { dMinA: 1, includeAbsent: true }).map((f) => f.multiplicity))).toEqual(new Set([2]));
  });

  it('sum of multiplicities equals the number of hkl with dMin <= d <= dMax (counted by brute force)', () => {
    const p = makePhase('tet', 'P42/mnm', { aA: 4.59, bA: 4.59, cA: 2.96, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    const fam = reflectionFamilies(p, { dMinA: 0.8, dMaxA: 3, includeAbsent: true });
    let n = 0;
    for (let h = -6; h <= 6; h++) for (let k = -6; k <= 6; k++) for (let l = -4; l <= 4; l++) {
      const q = (h * h + k * k) / 4.59 ** 2 + (l * l) / 2.96 ** 2;
      if (q > 0 && q <= 1 / 0.64 && q >= 1 / 9) n++;
    }
    expect(fam.reduce((s, f) => s + f.multiplicity, 0)).toBe(n);
  });
});

describe('reflectionFamilies representatives', () => {
  it('are h >= k >= l >= 0 forms for cubic m-3m: Au gives 111, 200, 220, 311, 222, 400, 331, 420, 422, 511, 333', () => {
    const fam = reflectionFamilies(AU, { dMinA: 0.78 });
    expect(fam.map((f) => f.hkl.join(''))).toEqual(['111', '200', '220', '311', '222', '400', '331', '420', '422', '511', '333']);
    for (const f of fam) expect(f.hkl[0] >= f.hkl[1] && f.hkl[1] >= f.hkl[2] && f.hkl[2] >= 0).toBe(true);
  });

  it('pick (1 0 1) for hexagonal 101 and (1 2 0) for the m-3 family of 120, from any member', () => {
    const hex = makePhase('hex', 'P63/mmc', { aA: 3, bA: 3, cA: 5, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 }, [GENERAL]);
    const rh = laueRotations(preparedStructureOf(hex).operations);
    expect(familyRepresentative([-1, 1, -1], rh)).toEqual({ hkl: [1, 0, 1], multiplicity: 12 });
    expect(familyRepresentative([0, -1, 1], rh).hkl).toEqual([1, 0, 1]);
    const pa3 = makePhase('pa3', 'Pa-3', { aA: 5.4, bA: 5.4, cA: 5.4, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 }, [GENERAL]);
    const rc = laueRotations(preparedStructureOf(pa3).operations);
    expect(familyRepresentative([0, -1, 2], rc).hkl).toEqual([1, 2, 0]);
    expect(familyRepresentative([0, 2, -1], rc).hkl).toEqual([2, 1, 0]);
  });
});

describe('reflectionFamilies', () => {
  it('sorts by d descending and gives d = a / sqrt(h^2 + k^2 + l^2) for cubic', () => {
    const fam = reflectionFamilies(SI_ORIGIN_1, { dMinA: 0.7 });
    for (let i = 1; i < fam.length; i++) expect(fam[i]!.dA).toBeLessThanOrEqual(fam[i - 1]!.dA);
    for (const f of fam) expect(f.dA).toBeCloseTo(5.431 / Math.hypot(...f.hkl), 12);
  });

  it('drops absent families (|F|^2 <= 1e-8 max) unless includeAbsent: Au 100, 110, 210 only with includeAbsent', () => {
    const present = byHkl(reflectionFamilies(AU, { dMinA: 1 }));
    const all = byHkl(reflectionFamilies(AU, { dMinA: 1, includeAbsent: true }));
    expect([...present.keys()]).toEqual(['111', '200', '220', '311', '222', '400']);
    expect([...all.keys()]).toContain('100');
    expect(all.get('100')!.fSquaredA2).toBeLessThan(1e-20);
    const si = byHkl(reflectionFamilies(SI_ORIGIN_1, { dMinA: 1 }));
    expect(si.has('200')).toBe(false);
    expect(si.has('222')).toBe(false); // absent by the single 8a site
  });

  it('keeps dMinA <= d <= dMaxA', () => {
    const fam = reflectionFamilies(AU, { dMinA: 1.0, dMaxA: 2.1 });
    expect(fam.map((f) => f.hkl.join(''))).toEqual(['200', '220', '311', '222', '400']);
  });

  it('throws for dMinA below 0.25 Å or not finite and for dMaxA <= dMinA', () => {
    expect(() => reflectionFamilies(AU, { dMinA: 0.2 })).toThrow(/dMinA must be a finite number of Å >= 0.25/);
    expect(() => reflectionFamilies(AU, { dMinA: Number.NaN })).toThrow(/dMinA/);
    expect(() => reflectionFamilies(AU, { dMinA: 1, dMaxA: 1 })).toThrow(/dMaxA/);
  });
});

describe('reflectionFamilies at the edge of the scattering-factor table', () => {
  it('accepts dMinA = 0.25 Å exactly (s = 2 1/Å) and returns only d >= 0.25 Å', () => {
    const fam = reflectionFamilies(AU, { dMinA: 0.25 });
    expect(fam.length).toBeGreaterThan(100);
    expect(Math.min(...fam.map((f) => f.dA))).toBeGreaterThanOrEqual(0.25 * (1 - 1e-12));
  });
});

describe('reflectionFamilies absences do not depend on the range', () => {
  it('drops the absent 1 0 0 of gold even when it is the only family in range', async () => {
    const { findPhase, reflectionFamilies: families } = await import('../../../../core/crystal');
    const au = findPhase('Au')!;
    // d(100) = a = 4.08 Å; only 100 lies in [3, 5] Å, and F-centring makes it absent (International Tables Vol. A).
    expect(families(au, { dMinA: 3, dMaxA: 5 })).toEqual([]);
    expect(families(au, { dMinA: 3, dMaxA: 5, includeAbsent: true }).map((f) => f.hkl.join(''))).toEqual(['100']);
  });
});

describe('reflectionFamilies representatives', () => {
  it('never carry a negative zero index', async () => {
    const { phaseLibrary, reflectionFamilies: families } = await import('../../../../core/crystal');
    for (const phase of phaseLibrary()) {
      for (const f of families(phase, { dMinA: 0.9 })) {
        for (const i of f.hkl) expect(Object.is(i, -0)).toBe(false);
      }
    }
  });
});
