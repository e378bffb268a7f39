/**
 * The JSON phase description: cells by crystal system (International Tables Vol. A,
 * Table 2.1.2.1), B = 8 pi^2 U (Trueblood et al., Acta Cryst. A52 (1996) 770), and
 * errors that name the field and what was expected.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_B_ISO_A2,
  findSpaceGroup,
  type Phase,
  type PhaseDescription,
  phaseFromDescription,
  PhaseInputError,
} from '../../../../core/crystal';

const fixture = (name: string): string => readFileSync(new URL(`../../../fixtures/phases/${name}`, import.meta.url), 'utf8');

const gold = (): PhaseDescription => ({
  id: 'Au',
  name: 'gold',
  formula: 'Au',
  structureType: 'fcc',
  spaceGroup: 'Fm-3m',
  cell: { a: 4.0786 },
  sites: [{ element: 'Au', xyz: [0, 0, 0], B: 0.6 }],
  source: 'test',
});

/** The message phaseFromDescription throws for `json` (fails the test when it does not throw). */
function message(json: unknown, source = 'bad.json'): string {
  try {
    phaseFromDescription(json, source);
  } catch (e) {
    expect(e).toBeInstanceOf(PhaseInputError);
    expect((e as PhaseInputError).sourceName).toBe(source);
    return (e as Error).message;
  }
  throw new Error('expected phaseFromDescription to throw');
}

const withSpaceGroup = (spaceGroup: string | number, cell: PhaseDescription['cell'], xyz: [number, number, number] = [0.1, 0.2, 0.3]): PhaseDescription => ({
  ...gold(),
  spaceGroup,
  cell,
  sites: [{ element: 'C', xyz }],
});

describe('phaseFromDescription', () => {
  it('reads the gold example into a Phase with origin "json", the full F m -3 m operations and a cubic cell', () => {
    const p: Phase = phaseFromDescription(gold(), 'gold.json');
    expect(p.origin).toBe('json');
    expect(p.spaceGroup).toBe('F m -3 m');
    expect(p.symmetryOperations).toHaveLength(192); // order of F m -3 m on its conventional cell (ITA)
    expect(p.cell).toEqual({ aA: 4.0786, bA: 4.0786, cA: 4.0786, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });
    expect(p.sites).toEqual([{ label: 'Au1', element: 'Au', x: 0, y: 0, z: 0, occupancy: 1, bIsoA2: 0.6 }]);
    expect(p.structureType).toBe('fcc');
    expect(p.temperatureK).toBeUndefined();
  });

  it('reads the JSON text of a file as well as its parsed value', () => {
    const p = phaseFromDescription(fixture('gold.json'), 'gold.json');
    expect(p.id).toBe('Au');
    expect(p.temperatureK).toBe(299);
    expect(p).toEqual(phaseFromDescription(JSON.parse(fixture('gold.json')), 'gold.json'));
  });

  it('accepts the space group as a number, a Hall symbol or a CIF-style symbol, all giving the same setting', () => {
    const byName = phaseFromDescription(gold(), 'x');
    for (const spaceGroup of [225, '225', '-F 4 2 3', 'F m -3 m', 'fm-3m']) {
      const p = phaseFromDescription({ ...gold(), spaceGroup }, 'x');
      expect(p.symmetryOperations).toEqual(byName.symmetryOperations);
    }
  });

  it('completes a hexagonal cell from a and c with gamma = 120 and reads fractions and charges (zinc-oxide fixture)', () => {
    const p = phaseFromDescription(fixture('zinc-oxide-hexagonal.json'), 'zinc-oxide-hexagonal.json');
    expect(p.spaceGroup).toBe(findSpaceGroup('P63mc')!.hermannMauguin);
    expect(p.cell).toEqual({ aA: 3.2498, bA: 3.2498, cA: 5.2066, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 });
    expect(p.sites.map((s) => [s.label, s.element])).toEqual([['Zn1', 'Zn'], ['O1', 'O']]);
    expect(p.sites[0]!.x).toBe(1 / 3);
    expect(p.sites[0]!.y).toBe(2 / 3);
    // B = 8 pi^2 U: U = 0.006 Å^2 gives 0.4737 Å^2.
    expect(p.sites[0]!.bIsoA2).toBeCloseTo(8 * Math.PI ** 2 * 0.006, 12);
    expect(p.sites[0]!.bIsoA2).toBeCloseTo(0.4737, 4);
    expect(p.sites[1]!.bIsoA2).toBe(DEFAULT_B_ISO_A2);
  });

  it('completes a tetragonal cell from a and c, with a number for the space group (rutile fixture)', () => {
    const p = phaseFromDescription(fixture('rutile-tetragonal.json'), 'rutile-tetragonal.json');
    expect(p.spaceGroup).toBe('P 42/m n m');
    expect(p.cell).toEqual({ aA: 4.5933, bA: 4.5933, cA: 2.9592, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });
    expect(p.sites.map((s) => s.label)).toEqual(['Ti', 'O']);
  });

  it('completes orthorhombic, monoclinic (unique axis b or c), rhombohedral and triclinic cells', () => {
    expect(phaseFromDescription(withSpaceGroup('Pnma', { a: 5, b: 6, c: 7 }), 'x').cell).toEqual({
      aA: 5, bA: 6, cA: 7, alphaDeg: 90, betaDeg: 90, gammaDeg: 90,
    });
    expect(phaseFromDescription(withSpaceGroup('P 1 21/c 1', { a: 5, b: 6, c: 7, beta: 100 }), 'x').cell).toEqual({
      aA: 5, bA: 6, cA: 7, alphaDeg: 90, betaDeg: 100, gammaDeg: 90,
    });
    expect(phaseFromDescription(withSpaceGroup('P 1 1 21/b', { a: 5, b: 6, c: 7, gamma: 110 }), 'x').cell).toEqual({
      aA: 5, bA: 6, cA: 7, alphaDeg: 90, betaDeg: 90, gammaDeg: 110,
    });
    expect(phaseFromDescription(withSpaceGroup('R-3m:R', { a: 5, alpha: 60 }), 'x').cell).toEqual({
      aA: 5, bA: 5, cA: 5, alphaDeg: 60, betaDeg: 60, gammaDeg: 60,
    });
    expect(phaseFromDescription(withSpaceGroup('R-3m', { a: 5, c: 12 }), 'x').cell.gammaDeg).toBe(120);
    const triclinic = { a: 5, b: 6, c: 7, alpha: 80, beta: 85, gamma: 95 };
    expect(phaseFromDescription(withSpaceGroup('P-1', triclinic), 'x').cell).toEqual({
      aA: 5, bA: 6, cA: 7, alphaDeg: 80, betaDeg: 85, gammaDeg: 95,
    });
  });

  it('accepts redundant cell parameters that agree with the crystal system', () => {
    const p = phaseFromDescription({ ...gold(), cell: { a: 4.0786, b: 4.0786, c: 4.0786, alpha: 90, beta: 90, gamma: 90 } }, 'x');
    expect(p.cell.cA).toBe(4.0786);
  });

  it('keeps occupancies and numbers unlabelled sites per element', () => {
    const p = phaseFromDescription(
      {
        ...gold(),
        id: 'ZrO2-test',
        sites: [
          { element: 'Zr', xyz: [0, 0, 0], occupancy: 0.85 },
          { element: 'Y', xyz: [0, 0, 0], occupancy: 0.15 },
          { element: 'O', xyz: [0.25, 0.25, 0.25], occupancy: 0.96 },
          { element: 'O', xyz: [0.3, 0.3, 0.3], occupancy: 0.02 },
        ],
      },
      'x',
    );
    expect(p.sites.map((s) => `${s.label}:${s.occupancy}`)).toEqual(['Zr1:0.85', 'Y1:0.15', 'O1:0.96', 'O2:0.02']);
  });

  it('passes origin "library" through when the library asks for it', () => {
    expect(phaseFromDescription(gold(), 'x', 'library').origin).toBe('library');
  });
});

describe('phaseFromDescription errors', () => {
  it('names every field the schema refuses, with what was expected and what it got (bad-fields fixture)', () => {
    const m = message(fixture('bad-fields.json'), 'bad-fields.json');
    expect(m).toMatch(/^phase description "bad-fields\.json": /);
    expect(m).toContain('spaceGroup: is missing');
    expect(m).toContain('unknown field "spacegroup"; allowed: id, name, formula, structureType, spaceGroup, cell, sites, source, temperatureK');
    expect(m).toContain('cell.a: expected a length in Å (a number); got "4.0786"');
    expect(m).toContain('sites[0].xyz: expected three fractional coordinates [x, y, z]; got [0,0]');
    expect(m).toContain('sites[0].occupancy: expected an occupancy in (0, 1]; got 1.2');
  });

  it('reports text that is not JSON', () => {
    expect(message(fixture('bad-not-json.json'))).toMatch(/^phase description "bad\.json": not valid JSON \(.+\); check brackets, commas and quotes$/);
  });

  it('reports a description that is not an object', () => {
    expect(message(null)).toMatch(/\(the whole description\): expected an object/);
    expect(message([gold()])).toMatch(/\(the whole description\): expected an object/);
    expect(message(42)).toMatch(/\(the whole description\): expected an object/);
  });

  it('reports a cubic cell given a different c (bad-cubic-cell-with-c fixture)', () => {
    expect(message(fixture('bad-cubic-cell-with-c.json'))).toBe(
      'phase description "bad.json": cell.c = 4.2 contradicts the cubic space group F m -3 m ' +
        '(a = b = c, alpha = beta = gamma = 90, so c = a = 4.0786); give only a, or choose the space group that fits the cell',
    );
  });

  it('reports a hexagonal cell with gamma = 90 and a tetragonal cell without c', () => {
    expect(message(withSpaceGroup('P 63/m m c', { a: 3, c: 5, gamma: 90 }))).toMatch(
      /cell\.gamma = 90 contradicts the hexagonal space group P 63\/m m c \(a = b, alpha = beta = 90, gamma = 120, so gamma = 120\)/,
    );
    expect(message(withSpaceGroup('P4/mmm', { a: 3 }))).toMatch(
      /cell\.c is missing: a tetragonal space group P 4\/m m m needs a, c \(a = b, alpha = beta = gamma = 90\); give c/,
    );
  });

  it('reports the missing unique-axis angle of a monoclinic group and a cell field the system does not allow to differ', () => {
    expect(message(withSpaceGroup('P21/c', { a: 5, b: 6, c: 7 }))).toMatch(/cell\.beta is missing: a monoclinic space group P 1 21\/c 1 needs a, b, c, beta \(unique axis b: alpha = gamma = 90\)/);
    expect(message(withSpaceGroup('P21/c', { a: 5, b: 6, c: 7, beta: 100, gamma: 95 }))).toMatch(/cell\.gamma = 95 contradicts the monoclinic/);
  });

  it('reports an unknown space group and suggests the accepted forms', () => {
    expect(message({ ...gold(), spaceGroup: 'Fm3m' })).toBe(
      'phase description "bad.json": spaceGroup: unknown space group "Fm3m"; give a Hermann-Mauguin symbol such as ' +
        '"Fm-3m" or "Fd-3m:2", an International Tables number 1-230, or a Hall symbol such as "-F 4 2 3"',
    );
    expect(message({ ...gold(), spaceGroup: 231 })).toMatch(/spaceGroup: unknown space group 231/);
  });

  it('reports an unknown element at its site path', () => {
    const m = message({ ...gold(), sites: [{ element: 'Au', xyz: [0, 0, 0] }, { element: 'Qq', xyz: [0.5, 0.5, 0.5] }] });
    expect(m).toMatch(/^phase description "bad\.json": sites\[1\]\.element: unknown element "Qq"/);
  });

  it('reports B and Uiso given together, a negative B and a repeated label', () => {
    expect(message({ ...gold(), sites: [{ element: 'Au', xyz: [0, 0, 0], B: 0.6, Uiso: 0.0076 }] })).toMatch(/sites\[0\]\.Uiso: give B or Uiso, not both/);
    expect(message({ ...gold(), sites: [{ element: 'Au', xyz: [0, 0, 0], B: -0.1 }] })).toMatch(/sites\[0\]\.B: expected B >= 0 Å\^2; got -0\.1/);
    expect(
      message({ ...gold(), sites: [{ label: 'A', element: 'Au', xyz: [0, 0, 0] }, { label: 'A', element: 'Au', xyz: [0.5, 0.5, 0.5] }] }),
    ).toMatch(/sites\[1\]\.label: label "A" is used by an earlier site/);
  });

  it('reports a bad id, an empty site list, a coordinate that is not a number and an unknown site field', () => {
    expect(message({ ...gold(), id: 'gold film' })).toMatch(/id: expected an id of at most 40 letters, digits and _ - \. \+ \( \), starting with a letter or digit; got "gold film"/);
    expect(message({ ...gold(), sites: [] })).toMatch(/sites: expected at least one atom site/);
    expect(message({ ...gold(), sites: [{ element: 'Au', xyz: [0, 'half', 0] }] })).toMatch(/sites\[0\]\.xyz\[1\]: expected a fractional coordinate/);
    expect(message({ ...gold(), sites: [{ element: 'Au', xyz: [0, 0, 0], biso: 1 }] })).toMatch(/sites\[0\]: unknown field "biso"; allowed: label, element, xyz, occupancy, B, Uiso/);
  });

  it('reports an angle out of range and a non-positive length', () => {
    expect(message(withSpaceGroup('P-1', { a: 5, b: 6, c: 7, alpha: 180, beta: 90, gamma: 90 }))).toMatch(/cell\.alpha: expected an angle strictly between 0 and 180 degrees; got 180/);
    expect(message({ ...gold(), cell: { a: 0 } })).toMatch(/cell\.a: expected a positive length in Å; got 0/);
  });
});
