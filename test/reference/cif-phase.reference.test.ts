/**
 * Annula's CIF reader against gemmi's (Debian's python3-gemmi 0.5.7) on every good
 * fixture of test/fixtures/cif: gemmi.cif.read + make_small_structure_from_block for
 * the cell and the sites (label, element, fractional coordinates, occupancy, u_iso);
 * the symmetry from the block as the core CIF dictionary defines it, each route through
 * gemmi's own tables: the operations of a _space_group_symop_operation_xyz or
 * _symmetry_equiv_pos_as_xyz loop (gemmi.Op), else gemmi.symops_from_hall of the Hall
 * symbol, else find_spacegroup_by_name of the H-M symbol (with
 * _space_group_IT_coordinate_system_code appended as ':code' when given, which
 * SmallStructure itself ignores in 0.5.7), else find_spacegroup_by_number. Both
 * sides' operations are normalised by gemmi (Op(triplet).wrap().triplet()) and compared
 * as sets.
 *
 * Displacements: gemmi's u_iso times 8 pi^2 against Annula's B. For a site with only
 * anisotropic U, U_eq is computed here as one third of the trace of A N U N^T A^T
 * (A = gemmi's orthogonalization_matrix, N = diag of the reciprocal lengths of gemmi's
 * UnitCell.reciprocal(); Fischer & Tillmanns, Acta Cryst. C44 (1988) 775), by numpy.
 * Sites flagged _atom_site_calc_flag dum, which gemmi keeps, are left out on its side.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { phaseFromCif, type CifPhase } from '../../core/crystal';
import { referenceAvailable, runPythonJson } from './python-reference';

const FIXTURES: Array<[file: string, block?: string]> = [
  ['nacl-cubic.cif'],
  ['tio2-rutile-tetragonal.cif'],
  ['zno-wurtzite-hexagonal.cif'],
  ['zro2-monoclinic-aniso.cif'],
  ['si-hall-only.cif'],
  ['mgal2o4-coordinate-code.cif'],
  ['mg-text-fields.cif'],
  ['two-structures.cif'],
  ['two-structures.cif', 'Cu'],
  ['corundum-rhombohedral.cif'],
];

const path = (file: string): string => fileURLToPath(new URL(`../fixtures/cif/${file}`, import.meta.url));

interface GemmiSite {
  label: string;
  element: string;
  fract: [number, number, number];
  occ: number;
  /** B = 8 pi^2 U from u_iso, or from U_eq of the anisotropic U; null when the file gives neither. */
  bIsoA2: number | null;
}

interface GemmiRead {
  cell: [number, number, number, number, number, number];
  sites: GemmiSite[];
  /** The file's operations, normalised. */
  operations: string[];
  /** Annula's operations, normalised the same way. */
  oursNormalised: string[];
}

function gemmiRead(file: string, block: string, ours: string[]): GemmiRead {
  return runPythonJson<GemmiRead>(
    `
import gemmi, math
import numpy as np
doc = gemmi.cif.read(INPUT["path"])
b = doc.find_block(INPUT["block"])
st = gemmi.make_small_structure_from_block(b)
norm = lambda t: gemmi.Op(t).wrap().triplet()

def val(tag):
    v = b.find_value(tag)
    return None if v is None or v in ("?", ".") else gemmi.cif.as_string(v)

ops = None
for tag in ("_space_group_symop_operation_xyz", "_symmetry_equiv_pos_as_xyz"):
    vals = list(b.find_values(tag))
    if vals:
        ops = [gemmi.Op(gemmi.cif.as_string(v)) for v in vals]
        break
if ops is None:
    hall = val("_space_group_name_Hall") or val("_symmetry_space_group_name_Hall")
    hm = val("_space_group_name_H-M_alt") or val("_symmetry_space_group_name_H-M")
    num = val("_space_group_IT_number") or val("_symmetry_Int_Tables_number")
    code = val("_space_group_IT_coordinate_system_code")
    if hall:
        group = gemmi.symops_from_hall(hall)
    elif hm:
        group = gemmi.find_spacegroup_by_name(hm + (":" + code if code and ":" not in hm else "")).operations()
    else:
        group = gemmi.find_spacegroup_by_number(int(num)).operations()
    ops = list(group)

flags = {}
t = b.find("_atom_site_", ["label", "?calc_flag"])
for r in t:
    flags[r[0]] = r[1] if r.has(1) else ""

A = np.array(st.cell.orthogonalization_matrix.tolist())
rc = st.cell.reciprocal()
N = np.diag([rc.a, rc.b, rc.c])
sites = []
for s in st.sites:
    if flags.get(s.label) == "dum":
        continue
    a = s.aniso
    if s.u_iso > 0:
        B = 8 * math.pi ** 2 * s.u_iso
    elif a.nonzero():
        U = np.array([[a.u11, a.u12, a.u13], [a.u12, a.u22, a.u23], [a.u13, a.u23, a.u33]])
        B = 8 * math.pi ** 2 * np.trace(A @ N @ U @ N @ A.T) / 3
    else:
        B = None
    sites.append({"label": s.label, "element": s.element.name, "fract": list(s.fract.tolist()), "occ": s.occ, "bIsoA2": B})
print(json.dumps({
    "cell": list(st.cell.parameters),
    "sites": sites,
    "operations": sorted(set(norm(op.triplet()) for op in ops)),
    "oursNormalised": sorted(set(norm(t) for t in INPUT["ours"])),
}))
`,
    { path: path(file), block, ours },
  );
}

describe.runIf(referenceAvailable('gemmi'))('phaseFromCif against gemmi.read on the good CIF fixtures', () => {
  for (const [file, block] of FIXTURES) {
    const phase: CifPhase = phaseFromCif(readFileSync(path(file), 'utf8'), file, block === undefined ? {} : { block });
    describe(`${file}${block ? `, block ${block}` : ''} (data_${phase.block})`, () => {
      const ref = gemmiRead(file, phase.block, phase.symmetryOperations);

      it("reads gemmi's cell", () => {
        const c = phase.cell;
        expect([c.aA, c.bA, c.cA, c.alphaDeg, c.betaDeg, c.gammaDeg]).toEqual(ref.cell);
      });

      it("reads gemmi's sites: labels, elements, coordinates, occupancies", () => {
        expect(phase.sites.map((s) => s.label)).toEqual(ref.sites.map((s) => s.label));
        expect(phase.sites.map((s) => s.element)).toEqual(ref.sites.map((s) => s.element));
        phase.sites.forEach((s, i) => {
          expect([s.x, s.y, s.z]).toEqual(ref.sites[i]!.fract);
          expect(s.occupancy).toBe(ref.sites[i]!.occ);
        });
      });

      it('gives B = 8 pi^2 U of gemmi (U_eq by numpy for anisotropic sites) to 1e-12 relative, where the file gives one', () => {
        let compared = 0;
        phase.sites.forEach((s, i) => {
          const b = ref.sites[i]!.bIsoA2;
          if (b === null) return;
          compared++;
          expect(Math.abs(s.bIsoA2 / b - 1)).toBeLessThan(1e-12);
        });
        const given = phase.notes.some((n) => n.startsWith('no displacement parameter')) ? 0 : phase.sites.length;
        expect(compared).toBeGreaterThanOrEqual(given);
      });

      it("has the same set of symmetry operations as gemmi's reading of the block", () => {
        expect(ref.oursNormalised).toHaveLength(phase.symmetryOperations.length);
        expect(ref.oursNormalised).toEqual(ref.operations);
      });
    });
  }
});
