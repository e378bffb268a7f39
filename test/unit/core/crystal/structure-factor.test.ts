import { describe, expect, it } from 'vitest';
import {
  atomsPerCell,
  electronScatteringFactorA,
  findSpaceGroup,
  prepareStructure,
  preparedStructureOf,
  structureFactorA,
  type Phase,
} from '../../../../core/crystal';
import { AU, CSCL, GAAS, MG, NACL, RUTILE, SI_ORIGIN_1, SI_ORIGIN_2, SPINEL, ZNO, makePhase } from './phases.fixture';

const count = (phase: Phase): number[] => prepareStructure(phase).sites.map((s) => s.positions.length / 3);

describe('prepareStructure', () => {
  it('expands sites to their Wyckoff multiplicities (International Tables Vol. A)', () => {
    expect(count(AU)).toEqual([4]); // Fm-3m 4a
    expect(count(SI_ORIGIN_1)).toEqual([8]); // Fd-3m 8a
    expect(count(SI_ORIGIN_2)).toEqual([8]);
    expect(count(NACL)).toEqual([4, 4]); // 4a, 4b
    expect(count(GAAS)).toEqual([4, 4]); // F-43m 4a, 4c
    expect(count(CSCL)).toEqual([1, 1]); // Pm-3m 1a, 1b
    expect(count(SPINEL)).toEqual([8, 16, 32]); // Fd-3m:2 8a, 16d, 32e
    expect(count(MG)).toEqual([2]); // P63/mmc 2c
    expect(count(ZNO)).toEqual([2, 2]); // P63mc 2b
    expect(count(RUTILE)).toEqual([2, 4]); // P42/mnm 2a, 4f
    expect(atomsPerCell(prepareStructure(SPINEL))).toBe(56);
  });

  it('counts a special position once when its coordinates are rounded (Mg at 0.3333, 0.6667, 1/4)', () => {
    const mg = makePhase('Mg-rounded', 'P63/mmc', MG.cell, [['Mg1', 'Mg', 0.3333, 0.6667, 0.25]]);
    expect(count(mg)).toEqual([2]);
  });

  it('wraps positions into [0, 1)', () => {
    for (const s of prepareStructure(SPINEL).sites) for (const v of s.positions) expect(v >= 0 && v < 1).toBe(true);
  });

  it('throws naming the phase and site for an unknown element, bad occupancy, coordinate or B', () => {
    const bad = (site: Partial<Phase['sites'][number]>): Phase => ({ ...AU, sites: [{ ...AU.sites[0]!, ...site }] });
    expect(() => prepareStructure(bad({ element: 'Xx' }))).toThrow(/phase "Au": site "Au1": unknown element "Xx"/);
    expect(() => prepareStructure(bad({ element: 'Es' }))).toThrow(/site "Au1".*beyond Cf/);
    expect(() => prepareStructure(bad({ occupancy: 0 }))).toThrow(/site "Au1": occupancy must lie in \(0, 1\]; got 0/);
    expect(() => prepareStructure(bad({ occupancy: 1.2 }))).toThrow(/occupancy/);
    expect(() => prepareStructure(bad({ y: Number.NaN }))).toThrow(/site "Au1": fractional coordinate y/);
    expect(() => prepareStructure(bad({ bIsoA2: -0.1 }))).toThrow(/site "Au1": bIsoA2/);
    expect(() => prepareStructure({ ...AU, sites: [] })).toThrow(/no atom sites/);
  });

  it('throws naming the phase for an unreadable operation, an incomplete group or no identity', () => {
    const ops = findSpaceGroup('Fd-3m:2')!.operations;
    expect(() => prepareStructure({ ...SPINEL, symmetryOperations: [...ops, 'x,y,w'] })).toThrow(
      /phase "MgAl2O4": symmetry operation 193: cannot read symmetry operation "x,y,w"/,
    );
    expect(() => prepareStructure({ ...SPINEL, symmetryOperations: ops.slice(0, 100) })).toThrow(/do not form a group.*is missing/);
    expect(() => prepareStructure({ ...AU, symmetryOperations: ['-x,-y,-z'] })).toThrow(/lack the identity/);
    expect(() => prepareStructure({ ...AU, symmetryOperations: [] })).toThrow(/no symmetry operations/);
  });

  it('throws when the cell lacks the symmetry of the operations (a tetragonal cell with cubic operations)', () => {
    expect(() => prepareStructure({ ...AU, cell: { ...AU.cell, cA: 4.2 } })).toThrow(/lacks the symmetry of operation/);
    expect(() => prepareStructure({ ...AU, cell: { ...AU.cell, aA: -1 } })).toThrow(/aA/);
  });
});

describe('preparedStructureOf', () => {
  it('returns the cached preparation for the same unchanged phase and prepares anew after a change', () => {
    const phase: Phase = structuredClone(AU);
    const a = preparedStructureOf(phase);
    expect(preparedStructureOf(phase)).toBe(a);
    phase.sites[0]!.bIsoA2 = 1.0;
    const b = preparedStructureOf(phase);
    expect(b).not.toBe(a);
    expect(b.sites[0]!.bIsoA2).toBe(1.0);
  });
});

describe('structureFactorA', () => {
  const s = (phase: Phase, h: number, k: number, l: number): number => {
    const a = phase.cell.aA;
    return Math.sqrt(h * h + k * k + l * l) / (2 * a);
  };
  const mag = (f: { re: number; im: number }): number => Math.hypot(f.re, f.im);

  it('gives fcc F = 4 f exp(-B s^2) for unmixed hkl and 0 for mixed (kinematic selection rule, e.g. Cullity, Elements of X-Ray Diffraction, ch. 4, from memory)', () => {
    const p = prepareStructure(AU);
    const fe = (h: number, k: number, l: number) => electronScatteringFactorA('Au', s(AU, h, k, l)) * Math.exp(-0.62 * s(AU, h, k, l) ** 2);
    expect(mag(structureFactorA(p, [1, 1, 1]))).toBeCloseTo(4 * fe(1, 1, 1), 12);
    expect(mag(structureFactorA(p, [2, 0, 0]))).toBeCloseTo(4 * fe(2, 0, 0), 12);
    expect(mag(structureFactorA(p, [1, 0, 0]))).toBeLessThan(1e-12);
    expect(mag(structureFactorA(p, [2, 1, 0]))).toBeLessThan(1e-12);
  });

  it('gives CsCl F = f_Cs + f_Cl for h+k+l even and f_Cs - f_Cl for odd', () => {
    const p = prepareStructure(CSCL);
    const dw = (el: string, b: number, ss: number) => electronScatteringFactorA(el, ss) * Math.exp(-b * ss * ss);
    const s100 = s(CSCL, 1, 0, 0);
    const s110 = s(CSCL, 1, 1, 0);
    expect(structureFactorA(p, [1, 0, 0]).re).toBeCloseTo(dw('Cs', 1.9, s100) - dw('Cl', 1.7, s100), 12);
    expect(structureFactorA(p, [1, 1, 0]).re).toBeCloseTo(dw('Cs', 1.9, s110) + dw('Cl', 1.7, s110), 12);
  });

  it('gives diamond Si |F(111)| = 4 sqrt(2) f, F(222) = 0, |F(400)| = 8 f in both origin choices', () => {
    for (const phase of [SI_ORIGIN_1, SI_ORIGIN_2]) {
      const p = prepareStructure(phase);
      const f = (h: number, k: number, l: number) => electronScatteringFactorA('Si', s(phase, h, k, l)) * Math.exp(-0.46 * s(phase, h, k, l) ** 2);
      expect(mag(structureFactorA(p, [1, 1, 1]))).toBeCloseTo(4 * Math.SQRT2 * f(1, 1, 1), 12);
      expect(mag(structureFactorA(p, [2, 2, 2]))).toBeLessThan(1e-12);
      expect(mag(structureFactorA(p, [4, 0, 0]))).toBeCloseTo(8 * f(4, 0, 0), 12);
    }
  });

  it('at s = 0 gives F(000) = sum of occ f_e(0) over the cell', () => {
    const p = prepareStructure(NACL);
    expect(structureFactorA(p, [0, 0, 0], 0).re).toBeCloseTo(4 * electronScatteringFactorA('Na', 0) + 4 * electronScatteringFactorA('Cl', 0), 12);
  });

  it('scales with occupancy', () => {
    const half = makePhase('Au-half', 'Fm-3m', AU.cell, [['Au1', 'Au', 0, 0, 0, 0.5, 0.62]]);
    const full = structureFactorA(prepareStructure(AU), [3, 1, 1]).re;
    expect(structureFactorA(prepareStructure(half), [3, 1, 1]).re).toBeCloseTo(full / 2, 12);
  });

  it('throws for non-integer indices and for s beyond 2 1/Å', () => {
    const p = prepareStructure(AU);
    expect(() => structureFactorA(p, [1.5, 0, 0])).toThrow(/hkl must be three integers/);
    expect(() => structureFactorA(p, [20, 0, 0])).toThrow(/outside \[0, 2\]/);
    expect(() => structureFactorA(p, [1, 1, 1], 2.5)).toThrow(/outside/);
  });
});
