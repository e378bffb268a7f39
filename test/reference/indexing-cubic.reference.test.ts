/**
 * The cubic indexer against outside facts:
 * 1. ring sequences from the reflection conditions of International Tables for
 *    Crystallography Vol. A (cP none; cI h+k+l = 2n; cF h,k,l all even or all odd;
 *    F d -3 m site 8a additionally h = 2n+1 or h+k+l = 4n) and Legendre's
 *    three-square theorem (N = 4^p (8q + 7) is no sum of three squares);
 * 2. handbook lattice constants: rings generated from them are indexed back to the
 *    right structure and the same a within 3 sigma;
 * 3. python3-gemmi 0.5.7 (Debian): UnitCell.calculate_d for d-spacings,
 *    SpaceGroup operations' is_systematically_absent for P m -3 m, I m -3 m,
 *    F m -3 m, F d -3 m, and gemmi's structure factor of Si on site 8a for the
 *    site's extra extinctions.
 */
import { describe, expect, it } from 'vitest';
import {
  allowedCubicN,
  cubicRingLadder,
  indexCubic,
  isReflectionAllowed,
  type CubicStructure,
} from '../../core/indexing';
import { gaussian, mulberry32 } from '../support/seeded-random';
import { referenceAvailable, runPythonJson } from './python-reference';

// International Tables Vol. A reflection conditions, written out as N = h^2 + k^2 + l^2 sequences.
const SEQUENCES: Record<CubicStructure, number[]> = {
  fcc: [3, 4, 8, 11, 12, 16, 19, 20, 24, 27],
  bcc: [2, 4, 6, 8, 10, 12, 14, 16, 18],
  diamond: [3, 8, 11, 16, 19, 24, 27, 32],
  primitive: [1, 2, 3, 4, 5, 6, 8, 9, 10, 11, 12, 13, 14, 16, 17, 18, 19, 20, 21, 22, 24, 25, 26, 27, 29],
};

describe('allowedCubicN against International Tables reflection conditions', () => {
  for (const structure of ['fcc', 'bcc', 'diamond', 'primitive'] as const) {
    const seq = SEQUENCES[structure];
    it(`allowedCubicN('${structure}', ${seq[seq.length - 1]}) = ${seq.join(', ')}`, () => {
      expect(allowedCubicN(structure, seq[seq.length - 1]!)).toEqual(seq);
    });
  }
  it("allowedCubicN('primitive', 2000) lacks exactly N = 4^p (8q + 7) (Legendre's three-square theorem)", () => {
    const allowed = new Set(allowedCubicN('primitive', 2000));
    for (let n = 1; n <= 2000; n++) {
      let m = n;
      while (m % 4 === 0) m /= 4;
      expect(allowed.has(n), `N = ${n}`).toBe(m % 8 !== 7);
    }
    expect([7, 15, 23, 28].some((n) => allowed.has(n))).toBe(false);
  });
});

// Handbook lattice constants (room temperature). NBS Circular 539 = H. E. Swanson et al.,
// Standard X-ray Diffraction Powder Patterns, Vol. I-II (1953); values quoted from memory.
const HANDBOOK: Array<{ phase: string; structure: CubicStructure; aA: number; source: string }> = [
  { phase: 'Au', structure: 'fcc', aA: 4.0786, source: 'NBS Circular 539 Vol. I (Swanson & Tatge), from memory' },
  { phase: 'Al', structure: 'fcc', aA: 4.0494, source: 'NBS Circular 539 Vol. I (Swanson & Tatge), from memory' },
  { phase: 'Cu', structure: 'fcc', aA: 3.615, source: 'NBS Circular 539 Vol. I (Swanson & Tatge), from memory' },
  { phase: 'W', structure: 'bcc', aA: 3.1648, source: 'NBS Circular 539 Vol. I (Swanson & Tatge), from memory' },
  { phase: 'NaCl', structure: 'fcc', aA: 5.6402, source: 'NBS Circular 539 Vol. II (Swanson & Fuyat), from memory' },
  { phase: 'MgO', structure: 'fcc', aA: 4.213, source: 'NBS Circular 539 Vol. I (Swanson & Tatge), from memory' },
  { phase: 'Si (SRM 640c)', structure: 'diamond', aA: 5.4311946, source: 'NIST SRM 640c certificate, 22.5 °C, from memory' },
  { phase: 'Si (CODATA 2018)', structure: 'diamond', aA: 5.431020511, source: 'CODATA 2018, lattice parameter of ideal Si, 22.5 °C in vacuum' },
];

describe('indexCubic recovers handbook lattice constants', () => {
  HANDBOOK.forEach(({ phase, structure, aA, source }, k) => {
    it(`indexCubic(${phase} rings, a = ${aA} Å, ${source}) gives ${structure} and a within 3 sigma`, () => {
      const rand = mulberry32(20261210 + k);
      const rings = SEQUENCES[structure].slice(0, 8).map((n) => {
        const d = aA / Math.sqrt(n);
        return { dA: d * (1 + 1e-3 * gaussian(rand)), dSigmaA: 1e-3 * d };
      });
      const best = indexCubic(rings).candidates[0]!;
      expect(best.structure).toBe(structure);
      expect(Math.abs(best.aA - aA)).toBeLessThanOrEqual(3 * best.aSigmaA);
      expect(best.unexplained).toEqual([]);
      expect(best.aSigmaA / aA).toBeLessThan(1e-3);
    });
  });
});

interface GemmiAnswer {
  absent: Record<string, boolean[]>;
  siAbsent: boolean[];
  d: number[];
}

describe.runIf(referenceAvailable('gemmi'))('cubic reflections against python3-gemmi', () => {
  // Every h >= k >= l >= 0 with 0 < N <= 100.
  const hkls: Array<[number, number, number]> = [];
  for (let h = 1; h <= 10; h++) for (let k = 0; k <= h; k++) for (let l = 0; l <= k; l++) if (h * h + k * k + l * l <= 100) hkls.push([h, k, l]);
  const groups = { primitive: 'P m -3 m', bcc: 'I m -3 m', fcc: 'F m -3 m', diamond: 'F d -3 m' } as const;
  let cached: GemmiAnswer | undefined;
  // Called lazily from the tests, so that a skipped suite never starts python.
  const gemmi = (): GemmiAnswer => (cached ??= runPythonJson<GemmiAnswer>(
    `
import gemmi
hkls = INPUT["hkls"]
absent = {}
for key, name in INPUT["groups"].items():
    ops = gemmi.find_spacegroup_by_name(name).operations()
    absent[key] = [bool(ops.is_systematically_absent(h)) for h in hkls]
ss = gemmi.SmallStructure()
ss.cell = gemmi.UnitCell(5.4311946, 5.4311946, 5.4311946, 90, 90, 90)
ss.spacegroup_hm = "F d -3 m:1"
site = gemmi.SmallStructure.Site()
site.label = "Si1"; site.element = gemmi.Element("Si"); site.fract = gemmi.Fractional(0, 0, 0); site.occ = 1.0; site.u_iso = 0.0
ss.add_site(site)
ss.setup_cell_images()
calc = gemmi.StructureFactorCalculatorX(ss.cell)
f = [abs(calc.calculate_sf_from_small_structure(ss, h)) for h in hkls]
fmax = max(f)
print(json.dumps({"absent": absent, "siAbsent": [x < 1e-9 * fmax for x in f],
                  "d": [ss.cell.calculate_d(h) for h in hkls]}))
`,
    { hkls, groups },
  ));

  for (const structure of ['primitive', 'bcc', 'fcc'] as const) {
    it(`isReflectionAllowed('${structure}', hkl) agrees with gemmi's ${groups[structure]} absences for all hkl up to N = 100`, () => {
      hkls.forEach((hkl, i) => expect(isReflectionAllowed(structure, hkl), hkl.join(' ')).toBe(!gemmi().absent[structure]![i]));
    });
  }

  it("isReflectionAllowed('diamond', hkl) agrees with gemmi's structure factor of Si on site 8a of F d -3 m", () => {
    hkls.forEach((hkl, i) => expect(isReflectionAllowed('diamond', hkl), hkl.join(' ')).toBe(!gemmi().siAbsent[i]));
  });

  it('the 8a site removes reflections the space group allows (2 2 2, 4 4 2) and no others', () => {
    const extra = hkls.filter((hkl, i) => !gemmi().absent.diamond![i] && !isReflectionAllowed('diamond', hkl));
    expect(extra.some((h) => h.join('') === '222')).toBe(true);
    expect(extra.some((h) => h.join('') === '442')).toBe(true);
    // Every such reflection is all-even with h + k + l = 4n + 2 (the 8a condition).
    for (const [h, k, l] of extra) expect(h % 2 === 0 && k % 2 === 0 && l % 2 === 0 && (h + k + l) % 4 === 2).toBe(true);
    // And nothing gemmi's F d -3 m forbids is allowed here.
    hkls.forEach((hkl, i) => {
      if (gemmi().absent.diamond![i]) expect(isReflectionAllowed('diamond', hkl)).toBe(false);
    });
  });

  it("allowed N of each structure equal the N of gemmi's allowed hkl", () => {
    for (const structure of ['primitive', 'bcc', 'fcc', 'diamond'] as const) {
      const absent = structure === 'diamond' ? gemmi().siAbsent : gemmi().absent[structure]!;
      const gemmiN = [...new Set(hkls.filter((_, i) => !absent[i]).map(([h, k, l]) => h * h + k * k + l * l))].sort((x, y) => x - y);
      expect(allowedCubicN(structure, 100), structure).toEqual(gemmiN);
    }
  });

  it("d = a / sqrt(N) of the ladder agrees with gemmi's UnitCell.calculate_d to 1e-12 relative", () => {
    const a = 5.4311946;
    const byN = new Map(cubicRingLadder('primitive', 100).map((o) => [o.n, a / Math.sqrt(o.n)]));
    hkls.forEach(([h, k, l], i) => expect(Math.abs(byN.get(h * h + k * k + l * l)! / gemmi().d[i]! - 1)).toBeLessThan(1e-12));
  });
});
