/**
 * Reflection-family multiplicities against gemmi (python3-gemmi 0.5.7): for every hkl of
 * a small sphere, in one setting of each of the 11 Laue classes (and both axis choices
 * of a rhombohedral group), the number of distinct images h R from gemmi's
 * Op.apply_to_hkl over all operations, together with their Friedel mates -h R, equals
 * Annula's multiplicity of the family containing hkl.
 */
import { describe, expect, it } from 'vitest';
import { equivalentHkls, laueRotations, preparedStructureOf, reflectionFamilies, type Hkl } from '../../core/crystal';
import { referenceAvailable, runPythonJson } from './python-reference';
import { makePhase } from '../unit/core/crystal/phases.fixture';

const cell = (a: number, b: number, c: number, al = 90, be = 90, ga = 90) => ({ aA: a, bA: b, cA: c, alphaDeg: al, betaDeg: be, gammaDeg: ga });

// One atom in a general position (invented), so that no family is absent by accident.
const CASES: Array<[string, ReturnType<typeof cell>]> = [
  ['P -1', cell(4.1, 5.2, 6.3, 81, 97, 103)],
  ['P 1 21/c 1', cell(4.1, 5.2, 6.3, 90, 104, 90)],
  ['P n m a', cell(5.5, 4.1, 6.3)],
  ['I 41/a:1', cell(5.1, 5.1, 7.3)],
  ['P 4/m m m', cell(4.1, 4.1, 6.3)],
  ['R -3:H', cell(4.9, 4.9, 12.1, 90, 90, 120)],
  ['R -3 m:H', cell(4.9, 4.9, 12.1, 90, 90, 120)],
  ['R -3 m:R', cell(4.6, 4.6, 4.6, 57, 57, 57)],
  ['P -3 m 1', cell(4.2, 4.2, 6.1, 90, 90, 120)],
  ['P -3 1 m', cell(4.2, 4.2, 6.1, 90, 90, 120)],
  ['P 63/m', cell(4.2, 4.2, 6.1, 90, 90, 120)],
  ['P 63/m m c', cell(4.2, 4.2, 6.1, 90, 90, 120)],
  ['P a -3', cell(5.4, 5.4, 5.4)],
  ['F m -3 m', cell(5.4, 5.4, 5.4)],
];

describe.runIf(referenceAvailable('gemmi'))('multiplicities against gemmi Op.apply_to_hkl with Friedel mates', () => {
  for (const [sg, c] of CASES) {
    it(`equal for every hkl with d >= 1 Å in ${sg}`, () => {
      const phase = makePhase(`general-${sg}`, sg, c, [['X1', 'Fe', 0.1234, 0.2345, 0.3456]]);
      const rot = laueRotations(preparedStructureOf(phase).operations);
      const families = reflectionFamilies(phase, { dMinA: 1, includeAbsent: true });
      const hkl: Hkl[] = [];
      const ours: number[] = [];
      for (const f of families) {
        for (const h of equivalentHkls(f.hkl, rot)) {
          hkl.push(h);
          ours.push(f.multiplicity);
        }
      }
      const theirs = runPythonJson<number[]>(
        `
import gemmi
ops = gemmi.find_spacegroup_by_name(INPUT["sg"]).operations()
out = []
for h in INPUT["hkl"]:
    imgs = set()
    for op in ops:
        a = tuple(op.apply_to_hkl(h))
        imgs.add(a); imgs.add(tuple(-x for x in a))
    out.append(len(imgs))
print(json.dumps(out))
`,
        { sg, hkl },
      );
      expect(hkl.length).toBeGreaterThan(30);
      expect(ours).toEqual(theirs);
    });
  }
});
