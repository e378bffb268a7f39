/**
 * Structure factors, d-spacings and systematic absences against gemmi (Debian's
 * python3-gemmi 0.5.7): gemmi.SmallStructure with the same cell, setting and sites
 * (u_iso = B / 8 pi^2), setup_cell_images(), change_occupancies_to_crystallographic()
 * (gemmi sums over every image of a site, so an atom on a special position has its
 * occupancy divided by the number of coinciding images), then
 * StructureFactorCalculatorE(cell).calculate_sf_from_small_structure, which uses the
 * c4322 coefficients (International Tables Vol. C Table 4.3.2.2) with zero addends
 * and the Debye-Waller factor exp(-8 pi^2 U s^2); d from UnitCell.calculate_d;
 * absences from GroupOps.is_systematically_absent.
 *
 * Tolerances: 1e-9 relative on |F| of present reflections, and 1e-12 of the largest |F|
 * on every reflection (absent ones included, where a relative error means nothing).
 * Both evaluate the same sum in double precision over at most 192 terms, so rounding
 * is ~1e-15 of the largest |F| (measured: <= 5e-15 of the largest, <= 1e-12 relative on
 * present reflections, d >= 0.6 Å); any difference of formula (a
 * missing image, a wrong B convention, a wrong occupancy) is many orders larger.
 */
import { describe, expect, it } from 'vitest';
import {
  equivalentHkls,
  laueRotations,
  preparedStructureOf,
  reflectionFamilies,
  structureFactorA,
  type Hkl,
  type Phase,
} from '../../core/crystal';
import { referenceAvailable, runPythonJson } from './python-reference';
import {
  AU, BI, CSCL, CU3AU_DISORDERED, GAAS, INVENTED_MONOCLINIC, MG, NACL, RUTILE, SI_ORIGIN_1, SI_ORIGIN_2, SPINEL, ZNO,
} from '../unit/core/crystal/phases.fixture';

const PHASES: Array<[Phase, number]> = [
  [AU, 0.6], [SI_ORIGIN_1, 0.6], [SI_ORIGIN_2, 0.6], [NACL, 0.6], [GAAS, 0.6], [CSCL, 0.6], [SPINEL, 0.7],
  [MG, 0.6], [ZNO, 0.6], [RUTILE, 0.6], [CU3AU_DISORDERED, 0.6], [BI, 0.7], [INVENTED_MONOCLINIC, 0.8],
];

interface GemmiResult {
  re: number[];
  im: number[];
  d: number[];
  sysAbsent: boolean[];
}

/** Every hkl of the phase with d >= dMin: each family's orbit, from the families including absent ones. */
function allHkl(phase: Phase, dMinA: number): Hkl[] {
  const rot = laueRotations(preparedStructureOf(phase).operations);
  return reflectionFamilies(phase, { dMinA, includeAbsent: true }).flatMap((f) => equivalentHkls(f.hkl, rot));
}

function gemmiStructureFactors(phase: Phase, hkl: Hkl[]): GemmiResult {
  return runPythonJson<GemmiResult>(
    `
import gemmi, math
p = INPUT["phase"]
st = gemmi.SmallStructure()
c = p["cell"]
st.cell = gemmi.UnitCell(c["aA"], c["bA"], c["cA"], c["alphaDeg"], c["betaDeg"], c["gammaDeg"])
st.spacegroup_hm = p["spaceGroup"]
for s in p["sites"]:
    site = gemmi.SmallStructure.Site()
    site.label = s["label"]
    site.element = gemmi.Element(s["element"])
    site.fract = gemmi.Fractional(s["x"], s["y"], s["z"])
    site.occ = s["occupancy"]
    site.u_iso = s["bIsoA2"] / (8 * math.pi ** 2)
    st.add_site(site)
st.setup_cell_images()
st.change_occupancies_to_crystallographic()
calc = gemmi.StructureFactorCalculatorE(st.cell)
assert calc.addends.get(gemmi.Element("O")) == 0
ops = gemmi.find_spacegroup_by_name(p["spaceGroup"]).operations()
out = {"re": [], "im": [], "d": [], "sysAbsent": []}
for h in INPUT["hkl"]:
    f = calc.calculate_sf_from_small_structure(st, h)
    out["re"].append(f.real); out["im"].append(f.imag)
    out["d"].append(st.cell.calculate_d(h))
    out["sysAbsent"].append(ops.is_systematically_absent(h))
print(json.dumps(out))
`,
    { phase, hkl },
  );
}

describe.runIf(referenceAvailable('gemmi'))('structure factors against gemmi StructureFactorCalculatorE', () => {
  for (const [phase, dMinA] of PHASES) {
    describe(`${phase.id} (${phase.spaceGroup})`, () => {
      const hkl = allHkl(phase, dMinA);
      const ref = gemmiStructureFactors(phase, hkl);
      const prepared = preparedStructureOf(phase);
      const ours = hkl.map((h) => structureFactorA(prepared, h));
      const maxAbsF = Math.max(...ref.re.map((re, i) => Math.hypot(re, ref.im[i]!)));

      it(`structureFactorA gives gemmi's |F| to 1e-9 relative (present) and 1e-12 of the largest (all) for the ${hkl.length} hkl with d >= ${dMinA} Å`, () => {
        expect(hkl.length).toBeGreaterThan(20);
        let worstRelative = 0;
        let worstAbsolute = 0;
        hkl.forEach((_, i) => {
          const theirs = Math.hypot(ref.re[i]!, ref.im[i]!);
          const mine = Math.hypot(ours[i]!.re, ours[i]!.im);
          worstAbsolute = Math.max(worstAbsolute, Math.abs(mine - theirs) / maxAbsF);
          // present reflections: |F|^2 above the 1e-8 absence threshold
          if (theirs > 1e-4 * maxAbsF) worstRelative = Math.max(worstRelative, Math.abs(mine / theirs - 1));
        });
        expect(worstRelative).toBeLessThan(1e-9);
        expect(worstAbsolute).toBeLessThan(1e-12);
      });

      it('gives gemmi\'s d-spacings (UnitCell.calculate_d) to 1e-12 relative', () => {
        const dByKey = new Map(hkl.map((h, i) => [h.join(' '), ref.d[i]!]));
        for (const f of reflectionFamilies(phase, { dMinA, includeAbsent: true })) {
          expect(Math.abs(f.dA / dByKey.get(f.hkl.join(' '))! - 1)).toBeLessThan(1e-12);
        }
      });

      it('finds every hkl that gemmi calls systematically absent absent (|F|^2 <= 1e-8 max)', () => {
        const maxF2 = maxAbsF ** 2;
        hkl.forEach((h, i) => {
          const f2 = ours[i]!.re ** 2 + ours[i]!.im ** 2;
          if (ref.sysAbsent[i]) expect(f2, `${h.join(' ')}`).toBeLessThanOrEqual(1e-8 * maxF2);
        });
      });
    });
  }

  it('Si, a single 8a site: 200 is systematically absent and 222 absent by the site (not by the group), in both origin choices', () => {
    for (const phase of [SI_ORIGIN_1, SI_ORIGIN_2]) {
      const hkl: Hkl[] = [[2, 0, 0], [2, 2, 2], [1, 1, 1], [2, 2, 0], [4, 0, 0]];
      const ref = gemmiStructureFactors(phase, hkl);
      expect(ref.sysAbsent).toEqual([true, false, false, false, false]);
      const prepared = preparedStructureOf(phase);
      const f2 = hkl.map((h) => {
        const f = structureFactorA(prepared, h);
        return f.re ** 2 + f.im ** 2;
      });
      const max = Math.max(...f2);
      expect(f2.map((v) => v <= 1e-8 * max)).toEqual([true, true, false, false, false]);
      // and gemmi agrees that 222 vanishes for this structure
      expect(Math.hypot(ref.re[1]!, ref.im[1]!)).toBeLessThan(1e-6);
      const families = reflectionFamilies(phase, { dMinA: 0.9 }).map((f) => f.hkl.join(''));
      expect(families.slice(0, 6)).toEqual(['111', '220', '311', '400', '331', '422']);
    }
  });
});
