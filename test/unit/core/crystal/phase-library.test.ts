/**
 * The built-in phase library: every record is a valid phase whose cell content
 * matches its formula and whose atoms sit at sensible distances; the first rings
 * follow the reflection conditions of International Tables Vol. A (ch. 2.2,
 * "conditions for possible reflections"), and spot d-values match handbook
 * powder patterns (NBS Circular 539, Swanson et al.; values from memory).
 */
import { describe, expect, it } from 'vitest';
import {
  findPhase,
  findSpaceGroup,
  metricTensor,
  type Phase,
  phaseLibrary,
  predictRings,
  prepareStructure,
  reflectionFamilies,
  validateUnitCell,
} from '../../../../core/crystal';

const phase = (id: string): Phase => {
  const p = findPhase(id);
  if (!p) throw new Error(`library has no ${id}`);
  return p;
};

/** Representative hkl of the first n rings, as "1 1 1" strings (first family of each ring). */
const firstRings = (id: string, n: number, dMinA = 0.5): string[] =>
  predictRings(phase(id), { dMinA }).slice(0, n).map((r) => r.families.map((f) => f.hkl.join(' ')).join('/'));

const familyOf = (id: string, hkl: string, dMinA = 0.5) =>
  reflectionFamilies(phase(id), { dMinA, includeAbsent: true }).find((f) => f.hkl.join(' ') === hkl);

/** Element counts of a formula: "MgAl2O4" -> {Mg: 1, Al: 2, O: 4}; "Zr0.852Y0.148O1.926" works too. */
function formulaCounts(formula: string): Map<string, number> {
  const out = new Map<string, number>();
  for (const m of formula.matchAll(/([A-Z][a-z]?)(\d*\.?\d*)/g)) {
    out.set(m[1]!, (out.get(m[1]!) ?? 0) + (m[2] === '' ? 1 : Number(m[2])));
  }
  return out;
}

/** Atoms of the cell as [element, x, y, z] fractional. */
function cellAtoms(p: Phase): Array<[string, number, number, number]> {
  const atoms: Array<[string, number, number, number]> = [];
  for (const s of prepareStructure(p).sites) {
    for (let j = 0; j < s.positions.length; j += 3) atoms.push([s.element, s.positions[j]!, s.positions[j + 1]!, s.positions[j + 2]!]);
  }
  return atoms;
}

/** Shortest distance (Å) between atoms of elements e1 and e2 at distinct positions, over neighbouring cells. */
function shortestDistanceA(p: Phase, e1?: string, e2?: string): number {
  const g = metricTensor(p.cell);
  const atoms = cellAtoms(p);
  let best = Number.POSITIVE_INFINITY;
  for (const a of atoms) {
    for (const b of atoms) {
      if (e1 !== undefined && !((a[0] === e1 && b[0] === e2) || (a[0] === e2 && b[0] === e1))) continue;
      for (let i = -1; i <= 1; i++) {
        for (let j = -1; j <= 1; j++) {
          for (let k = -1; k <= 1; k++) {
            const dx = b[1] - a[1] + i;
            const dy = b[2] - a[2] + j;
            const dz = b[3] - a[3] + k;
            const d2 = g[0] * dx * dx + g[4] * dy * dy + g[8] * dz * dz + 2 * (g[1] * dx * dy + g[2] * dx * dz + g[5] * dy * dz);
            if (d2 > 1e-8) best = Math.min(best, d2);
          }
        }
      }
    }
  }
  return Math.sqrt(best);
}

describe('phaseLibrary', () => {
  const library = phaseLibrary();

  it('holds at least 40 phases, at least 35 of them cubic', () => {
    expect(library.length).toBeGreaterThanOrEqual(40);
    const cubic = library.filter((p) => findSpaceGroup(p.spaceGroup)?.crystalSystem === 'cubic');
    expect(cubic.length).toBeGreaterThanOrEqual(35);
  });

  it('gives every phase origin "library", a unique id and a unique name (case-insensitive)', () => {
    expect(new Set(library.map((p) => p.origin))).toEqual(new Set(['library']));
    const ids = library.map((p) => p.id.toLowerCase());
    const names = library.map((p) => p.name.toLowerCase());
    expect(new Set(ids).size).toBe(library.length);
    expect(new Set(names).size).toBe(library.length);
    // No id of one phase is the name of another, so findPhase is never ambiguous.
    library.forEach((p, i) => expect(names.indexOf(p.id.toLowerCase()) === -1 || names.indexOf(p.id.toLowerCase()) === i).toBe(true));
  });

  it('returns the same frozen array on every call', () => {
    expect(phaseLibrary()).toBe(library);
    expect(Object.isFrozen(library)).toBe(true);
    expect(Object.isFrozen(library[0]!.sites[0])).toBe(true);
  });

  for (const p of phaseLibrary()) {
    describe(`${p.id} (${p.spaceGroup})`, () => {
      it('has a valid cell, resolvable operations equal to its setting, and sites that prepare', () => {
        validateUnitCell(p.cell);
        const setting = findSpaceGroup(p.spaceGroup);
        expect(setting).toBeDefined();
        expect(p.symmetryOperations).toEqual(setting!.operations);
        expect(() => prepareStructure(p)).not.toThrow();
        expect(p.sites.length).toBeGreaterThan(0);
      });

      it('has a cell content in the ratio of its formula, with an integer number of formula units', () => {
        const counts = formulaCounts(p.formula);
        const content = new Map<string, number>();
        for (const s of prepareStructure(p).sites) content.set(s.element, (content.get(s.element) ?? 0) + (s.occupancy * s.positions.length) / 3);
        expect([...content.keys()].sort()).toEqual([...counts.keys()].sort());
        const z = content.get([...counts.keys()][0]!)! / counts.values().next().value!;
        expect(Math.abs(z - Math.round(z))).toBeLessThan(1e-9);
        for (const [element, n] of counts) expect(content.get(element)! / n).toBeCloseTo(z, 9);
      });

      it('keeps distinct atoms at least 1.3 Å apart (shortest bond in the library: C-C of graphite, 1.42 Å)', () => {
        expect(shortestDistanceA(p)).toBeGreaterThan(1.3);
      });

      it('names the source of its lattice constant and of its B, marked "from memory" or "common practice" where recalled', () => {
        expect(p.source.length).toBeGreaterThan(20);
        expect(p.source).toMatch(/from memory|common practice/);
        expect(p.source).toMatch(/\bB\b/);
      });
    });
  }
});

describe('findPhase', () => {
  it('finds a phase by id or name, ignoring case and surrounding spaces', () => {
    expect(findPhase('Au')?.name).toBe('gold');
    expect(findPhase('au')?.id).toBe('Au');
    expect(findPhase('  GOLD ')?.id).toBe('Au');
    expect(findPhase('magnetite')?.id).toBe('Fe3O4');
    expect(findPhase('tio2-RUTILE')?.formula).toBe('TiO2');
  });

  it('returns undefined for an unknown id or name, an empty string and a non-string', () => {
    expect(findPhase('unobtainium')).toBeUndefined();
    expect(findPhase('')).toBeUndefined();
    expect(findPhase(42 as unknown as string)).toBeUndefined();
  });
});

describe('library phases: interatomic distances against handbook bond lengths (from memory)', () => {
  it('Au-Au = a / sqrt 2 = 2.884 Å (nearest neighbours of fcc gold)', () => {
    expect(shortestDistanceA(phase('Au'))).toBeCloseTo(4.0786 / Math.SQRT2, 9);
    expect(shortestDistanceA(phase('Au'))).toBeCloseTo(2.884, 3);
  });
  it('Si-Si = a sqrt 3 / 4 = 2.352 Å (silicon bond length)', () => {
    expect(shortestDistanceA(phase('Si'))).toBeCloseTo(2.352, 3);
  });
  it('W-W = a sqrt 3 / 2 = 2.741 Å in bcc tungsten', () => {
    expect(shortestDistanceA(phase('W'))).toBeCloseTo(2.741, 3);
  });
  it('Cu-O = 1.85 Å in cuprite (linear O-Cu-O)', () => {
    expect(shortestDistanceA(phase('Cu2O'), 'Cu', 'O')).toBeCloseTo(1.85, 2);
  });
  it('spinel: Mg-O 1.92 Å (tetrahedral) and Al-O 1.93 Å (octahedral)', () => {
    expect(shortestDistanceA(phase('MgAl2O4'), 'Mg', 'O')).toBeCloseTo(1.92, 2);
    expect(shortestDistanceA(phase('MgAl2O4'), 'Al', 'O')).toBeCloseTo(1.93, 1);
  });
  it('rutile: shortest Ti-O 1.95 Å; anatase: shortest Ti-O 1.93 Å', () => {
    expect(shortestDistanceA(phase('TiO2-rutile'), 'Ti', 'O')).toBeCloseTo(1.95, 2);
    expect(shortestDistanceA(phase('TiO2-anatase'), 'Ti', 'O')).toBeCloseTo(1.93, 2);
  });
  it('corundum: shortest Al-O 1.852 Å (of the 1.852 / 1.971 Å pairs)', () => {
    expect(shortestDistanceA(phase('Al2O3-corundum'), 'Al', 'O')).toBeCloseTo(1.852, 2);
  });
  it('bixbyite In2O3: shortest In-O between 2.1 and 2.2 Å', () => {
    const d = shortestDistanceA(phase('In2O3'), 'In', 'O');
    expect(d).toBeGreaterThan(2.1);
    expect(d).toBeLessThan(2.2);
  });
});

describe('predicted rings of library phases follow the reflection conditions of International Tables Vol. A', () => {
  it('fcc (Au): 111, 200, 220, 311, 222, 400 -- h, k, l all odd or all even', () => {
    expect(firstRings('Au', 6)).toEqual(['1 1 1', '2 0 0', '2 2 0', '3 1 1', '2 2 2', '4 0 0']);
  });

  it('bcc (W): 110, 200, 211, 220, 310, 222 -- h + k + l even', () => {
    expect(firstRings('W', 6)).toEqual(['1 1 0', '2 0 0', '2 1 1', '2 2 0', '3 1 0', '2 2 2']);
  });

  it('diamond (Si): 111, 220, 311, 400, 331, 422, with 200 and 222 absent (d-glide: hhl with h + l = 4n)', () => {
    expect(firstRings('Si', 6)).toEqual(['1 1 1', '2 2 0', '3 1 1', '4 0 0', '3 3 1', '4 2 2']);
    const f111 = familyOf('Si', '1 1 1')!.fSquaredA2;
    expect(familyOf('Si', '2 0 0')!.fSquaredA2).toBeLessThan(1e-20 * f111);
    expect(familyOf('Si', '2 2 2')!.fSquaredA2).toBeLessThan(1e-20 * f111);
  });

  it('rock salt (NaCl): 111, 200, 220, 311, 222, 400, with 111 weaker than 200 (F111 = 4(fCl - fNa), F200 = 4(fCl + fNa))', () => {
    expect(firstRings('NaCl', 6)).toEqual(['1 1 1', '2 0 0', '2 2 0', '3 1 1', '2 2 2', '4 0 0']);
    expect(familyOf('NaCl', '1 1 1')!.fSquaredA2).toBeLessThan(0.1 * familyOf('NaCl', '2 0 0')!.fSquaredA2);
  });

  it('zincblende (GaAs): 200 present but under 1 % of 111 (F200 = 4(fGa - fAs)), unlike diamond Si', () => {
    const rings = predictRings(phase('GaAs'), { dMinA: 0.8 });
    expect(rings.slice(0, 5).map((r) => r.families[0]!.hkl.join(' '))).toEqual(['1 1 1', '2 0 0', '2 2 0', '3 1 1', '2 2 2']);
    const r111 = rings[0]!;
    const r200 = rings[1]!;
    expect(r200.relativeIntensity).toBeGreaterThan(0);
    expect(r200.profileIntensity).toBeLessThan(0.01 * r111.profileIntensity);
  });

  it('CsCl type (CsCl) and perovskite (SrTiO3): primitive cubic, so 100, 110, 111, 200 all appear', () => {
    expect(firstRings('CsCl', 4)).toEqual(['1 0 0', '1 1 0', '1 1 1', '2 0 0']);
    expect(firstRings('SrTiO3', 4)).toEqual(['1 0 0', '1 1 0', '1 1 1', '2 0 0']);
  });

  it('spinel (MgAl2O4): 111, 220, 311, 222, 400, 331, 422, 511/333, 440 (Fd-3m)', () => {
    expect(firstRings('MgAl2O4', 9)).toEqual(['1 1 1', '2 2 0', '3 1 1', '2 2 2', '4 0 0', '3 3 1', '4 2 2', '5 1 1/3 3 3', '4 4 0']);
  });

  it('cuprite (Cu2O, Pn-3m): 110, 111, 200, 211, 220 with 100 absent (0kl: k + l = 2n)', () => {
    expect(firstRings('Cu2O', 5)).toEqual(['1 1 0', '1 1 1', '2 0 0', '2 1 1', '2 2 0']);
  });

  it('bixbyite (In2O3, Ia-3): 110 absent (0kl: k, l = 2n); 200 allowed but under 2 %; 222 the strongest ring, as in ITO film patterns (from memory)', () => {
    const rings = predictRings(phase('In2O3'), { dMinA: 1.2 });
    const ring = (hkl: string) => rings.find((r) => r.families.some((f) => f.hkl.join(' ') === hkl));
    expect(ring('1 1 0')).toBeUndefined();
    expect(familyOf('In2O3', '1 1 0', 1)!.fSquaredA2).toBeLessThan(1e-20 * familyOf('In2O3', '2 1 1', 1)!.fSquaredA2);
    expect(rings.slice(0, 2).map((r) => r.families[0]!.hkl.join(' '))).toEqual(['2 0 0', '2 1 1']);
    expect(ring('2 0 0')!.relativeIntensity).toBeLessThan(2);
    expect(ring('2 2 2')!.relativeIntensity).toBeCloseTo(100, 10);
  });

  it('hcp (Mg): 100, 002, 101, 102, 110, 103, with 001 absent (00l: l = 2n)', () => {
    expect(firstRings('Mg', 6)).toEqual(['1 0 0', '0 0 2', '1 0 1', '1 0 2', '1 1 0', '1 0 3']);
    expect(familyOf('Mg', '0 0 1')!.fSquaredA2).toBeLessThan(1e-20 * familyOf('Mg', '1 0 0')!.fSquaredA2);
  });
});

describe('library d-spacings against handbook powder patterns (from memory)', () => {
  const d = (id: string, hkl: string) => familyOf(id, hkl)!.dA;

  it('Au: 111 = 2.355, 200 = 2.039, 220 = 1.442, 311 = 1.230, 222 = 1.1774 Å (NBS Circular 539 vol. I, gold)', () => {
    expect(d('Au', '1 1 1')).toBeCloseTo(2.355, 3);
    expect(d('Au', '2 0 0')).toBeCloseTo(2.039, 3);
    expect(d('Au', '2 2 0')).toBeCloseTo(1.442, 3);
    expect(d('Au', '3 1 1')).toBeCloseTo(1.23, 3);
    expect(d('Au', '2 2 2')).toBeCloseTo(1.1774, 4);
  });

  it('Si: 111 = 3.1356, 220 = 1.9202, 311 = 1.6375 Å (a / sqrt(h^2 + k^2 + l^2) with a = 5.431020511 Å, CODATA 2018)', () => {
    expect(d('Si', '1 1 1')).toBeCloseTo(3.1356, 4);
    expect(d('Si', '2 2 0')).toBeCloseTo(1.9202, 4);
    expect(d('Si', '3 1 1')).toBeCloseTo(1.6375, 4);
  });

  it('Al: 111 = 2.338, 200 = 2.024 Å (NBS Circular 539 vol. I, aluminium)', () => {
    expect(d('Al', '1 1 1')).toBeCloseTo(2.338, 3);
    expect(d('Al', '2 0 0')).toBeCloseTo(2.025, 3);
  });

  it('W: 110 = 2.238, 200 = 1.582, 211 = 1.292 Å (NBS Circular 539 vol. I, tungsten)', () => {
    expect(d('W', '1 1 0')).toBeCloseTo(2.238, 3);
    expect(d('W', '2 0 0')).toBeCloseTo(1.582, 3);
    expect(d('W', '2 1 1')).toBeCloseTo(1.292, 3);
  });

  it('Mg: 100 = 2.779, 002 = 2.605, 101 = 2.452 Å (NBS Circular 539 vol. I, magnesium)', () => {
    expect(d('Mg', '1 0 0')).toBeCloseTo(2.779, 3);
    expect(d('Mg', '0 0 2')).toBeCloseTo(2.605, 3);
    expect(d('Mg', '1 0 1')).toBeCloseTo(2.452, 3);
  });

  it('LaB6: 100 = 4.157, 110 = 2.939, 111 = 2.400 Å (NIST SRM 660a line positions, from memory)', () => {
    expect(d('LaB6', '1 0 0')).toBeCloseTo(4.157, 3);
    expect(d('LaB6', '1 1 0')).toBeCloseTo(2.939, 3);
    expect(d('LaB6', '1 1 1')).toBeCloseTo(2.4, 3);
  });

  it('Au: 111 is the strongest ring, as in the handbook pattern (kinematic electron intensities)', () => {
    const rings = predictRings(phase('Au'), { dMinA: 0.8 });
    expect(rings[0]!.families[0]!.hkl).toEqual([1, 1, 1]);
    expect(rings[0]!.relativeIntensity).toBeCloseTo(100, 10);
    for (const r of rings.slice(1)) expect(r.relativeIntensity).toBeLessThan(rings[0]!.relativeIntensity);
  });
});
