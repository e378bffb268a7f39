/**
 * Phases read from CIF: the fixtures under test/fixtures/cif are invented files
 * written for these tests (structures physically sensible, values from memory).
 * Tag meanings follow the IUCr core CIF dictionary (International Tables Vol. G,
 * ch. 4.1); B = 8 pi^2 U (Trueblood et al., Acta Cryst. A52 (1996) 770).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { type CifPhase, DEFAULT_B_ISO_A2, phaseFromCif, PhaseInputError } from '../../../../core/crystal';

const text = (name: string): string => readFileSync(new URL(`../../../fixtures/cif/${name}`, import.meta.url), 'utf8');
const read = (name: string, block?: string): CifPhase => phaseFromCif(text(name), name, block === undefined ? {} : { block });
const B_PER_U = 8 * Math.PI ** 2;

/** The message phaseFromCif throws (fails the test when it does not throw). */
function message(cif: string, source = 'x.cif', block?: string): string {
  try {
    phaseFromCif(cif, source, block === undefined ? {} : { block });
  } catch (e) {
    expect(e).toBeInstanceOf(PhaseInputError);
    return (e as Error).message;
  }
  throw new Error('expected phaseFromCif to throw');
}

const CUBIC_CELL = '_cell_length_a 4.0786\n_cell_length_b 4.0786\n_cell_length_c 4.0786\n_cell_angle_alpha 90\n_cell_angle_beta 90\n_cell_angle_gamma 90\n';
const AU_SITES = 'loop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nAu1 0 0 0\n';

describe('phaseFromCif on the good fixtures', () => {
  it('nacl-cubic.cif: H-M symbol in the old names, B with su, charges dropped, temperature', () => {
    const p = read('nacl-cubic.cif');
    expect(p.origin).toBe('cif');
    expect(p.id).toBe('NaCl_rocksalt');
    expect(p.block).toBe('NaCl_rocksalt');
    expect(p.name).toBe('sodium chloride');
    expect(p.formula).toBe('ClNa');
    expect(p.spaceGroup).toBe('F m -3 m');
    expect(p.symmetryOperations).toHaveLength(192);
    expect(p.symmetryFrom).toBe('_symmetry_space_group_name_H-M "F m -3 m"');
    expect(p.cell).toEqual({ aA: 5.6402, bA: 5.6402, cA: 5.6402, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });
    expect(p.cellSu).toEqual({ aA: 0.0002, bA: 0.0002, cA: 0.0002 });
    expect(p.sites).toEqual([
      { label: 'Na1', element: 'Na', x: 0, y: 0, z: 0, occupancy: 1, bIsoA2: 1.62 },
      { label: 'Cl1', element: 'Cl', x: 0.5, y: 0.5, z: 0.5, occupancy: 1, bIsoA2: 1.21 },
    ]);
    expect(p.temperatureK).toBe(298);
    expect(p.source).toBe('read from CIF "nacl-cubic.cif", block data_NaCl_rocksalt');
    expect(p.notes).toEqual([]);
  });

  it('tio2-rutile-tetragonal.cif: operations from the loop, named by the matching symbol', () => {
    const p = read('tio2-rutile-tetragonal.cif');
    expect(p.symmetryFrom).toBe('_space_group_symop_operation_xyz (16 operations)');
    expect(p.spaceGroup).toBe('P 42/m n m');
    expect(p.symmetryOperations).toHaveLength(16);
    expect(p.symmetryOperations).toContain('-y+1/2,x+1/2,z+1/2');
    expect(p.name).toBe('rutile');
    expect(p.cell.cA).toBe(2.9587);
    expect(p.cellSu).toEqual({ aA: 0.0003, bA: 0.0003, cA: 0.0002 });
    expect(p.sites.map((s) => [s.label, s.element, s.x, s.bIsoA2])).toEqual([
      ['Ti1', 'Ti', 0, 0.42],
      ['O1', 'O', 0.30478, 0.6],
    ]);
  });

  it('zno-wurtzite-hexagonal.cif: U_iso becomes B = 8 pi^2 U, elements come from the labels', () => {
    const p = read('zno-wurtzite-hexagonal.cif');
    expect(p.symmetryFrom).toBe('_symmetry_equiv_pos_as_xyz (12 operations)');
    expect(p.spaceGroup).toBe('P 63 m c');
    expect(p.cell.gammaDeg).toBe(120);
    expect(p.sites.map((s) => s.element)).toEqual(['Zn', 'O']);
    expect(p.sites[0]!.bIsoA2).toBeCloseTo(B_PER_U * 0.006, 12);
    expect(p.sites[1]!.bIsoA2).toBeCloseTo(B_PER_U * 0.0075, 12);
    expect(p.name).toBe('OZn'); // no chemical name: the formula stands in
  });

  it('zro2-monoclinic-aniso.cif: B of Zr from U_eq, which for a monoclinic cell is (1/3)[U22 + (U11 + U33 + 2 U13 cos beta) / sin^2 beta]', () => {
    // The closed form follows from U_eq = (1/3) sum U^ij a*_i a*_j a_i.a_j (Fischer & Tillmanns,
    // Acta Cryst. C44 (1988) 775) with a* = 1/(a sin beta), c* = 1/(c sin beta), b* = 1/b, a.c = ac cos beta.
    const p = read('zro2-monoclinic-aniso.cif');
    const beta = (99.23 * Math.PI) / 180;
    const [u11, u22, u33, u13] = [0.004, 0.0046, 0.0043, 0.0009];
    const ueq = (u22 + (u11 + u33 + 2 * u13 * Math.cos(beta)) / Math.sin(beta) ** 2) / 3;
    expect(p.sites[0]!.label).toBe('Zr1');
    expect(p.sites[0]!.bIsoA2).toBeCloseTo(B_PER_U * ueq, 12);
    expect(p.sites[1]!.bIsoA2).toBeCloseTo(B_PER_U * 0.0063, 12);
    expect(p.spaceGroup).toBe('P 1 21/c 1');
    expect(p.cell.betaDeg).toBe(99.23);
    expect(p.cellSu.betaDeg).toBeCloseTo(0.01, 15);
    expect(p.name).toBe('zirconium dioxide, monoclinic');
    expect(p.notes.join(' ')).toMatch(/equivalent isotropic U .* for: Zr1/);
  });

  it('si-hall-only.cif: the Hall symbol -F 4vw 2vw 3 gives F d -3 m origin choice 2, and the missing B is defaulted with a note', () => {
    const p = read('si-hall-only.cif');
    expect(p.symmetryFrom).toBe('_space_group_name_Hall "-F 4vw 2vw 3"');
    expect(p.spaceGroup).toBe('F d -3 m:2');
    expect(p.sites[0]!.bIsoA2).toBe(DEFAULT_B_ISO_A2);
    expect(p.notes).toEqual([`no displacement parameter for Si1: B = ${DEFAULT_B_ISO_A2} Å^2 assumed (common practice)`]);
  });

  it('mgal2o4-coordinate-code.cif: a bare "F d -3 m" with _space_group_IT_coordinate_system_code 2 is origin choice 2', () => {
    const p = read('mgal2o4-coordinate-code.cif');
    expect(p.spaceGroup).toBe('F d -3 m:2');
    expect(p.symmetryFrom).toBe('_space_group_name_H-M_alt "F d -3 m" with _space_group_IT_coordinate_system_code "2"');
    expect(p.notes).toEqual([]);
  });

  it('mg-text-fields.cif: skips the publication block, takes its citation, reads the number-only space group and skips dummy sites', () => {
    const p = read('mg-text-fields.cif');
    expect(p.block).toBe('Mg_film');
    expect(p.spaceGroup).toBe('P 63/m m c');
    expect(p.symmetryFrom).toBe('_space_group_IT_number "194"');
    expect(p.sites.map((s) => s.label)).toEqual(['Mg1']);
    expect(p.sites[0]!.bIsoA2).toBeCloseTo(B_PER_U * 0.011, 12);
    expect(p.temperatureK).toBe(295);
    expect(p.cellSu).toEqual({ aA: 0.0002, bA: 0.0002, cA: 0.0003 });
    expect(p.source).toBe(
      "O'Neill, Ann; Quartz, B., \"Lattice constants of an invented magnesium film; a study that never happened # this hash is text, not a comment\", " +
        'Journal of Invented Results 12 (2024) 345-350, _database_code_invented X-0001; read from CIF "mg-text-fields.cif", block data_Mg_film',
    );
    expect(p.notes).toEqual([
      'read data_Mg_film, the only block with a structure (the file has data_global (no cell), data_Mg_film)',
      'dummy sites skipped (_atom_site_calc_flag dum): Q1',
    ]);
  });

  it('two-structures.cif: reads the first block and says so; the block option picks the other, with or without data_ and in any case', () => {
    const first = read('two-structures.cif');
    expect(first.id).toBe('Au');
    expect(first.notes[0]).toBe('the file has 2 blocks with structures; read the first, data_Au (choose another with the block option)');
    for (const block of ['Cu', 'data_Cu', 'cu', ' DATA_CU ']) {
      const cu = read('two-structures.cif', block);
      expect(cu.id).toBe('Cu');
      expect(cu.cell.aA).toBe(3.615);
      expect(cu.notes).toEqual([]);
    }
  });

  it('corundum-rhombohedral.cif: "R -3 c :H" with a spaced suffix gives the 36 operations on hexagonal axes', () => {
    const p = read('corundum-rhombohedral.cif');
    expect(p.spaceGroup).toBe('R -3 c:H');
    expect(p.symmetryOperations).toHaveLength(36);
    expect(p.symmetryOperations).toContain('x+2/3,y+1/3,z+1/3');
  });
});

describe('phaseFromCif choices made on inline CIF', () => {
  it('takes missing cell angles as 90 degrees and notes it', () => {
    const p = phaseFromCif(`data_a\n_space_group_name_H-M_alt 'F m -3 m'\n_cell_length_a 4\n_cell_length_b 4\n_cell_length_c 4\n${AU_SITES}`, 'a.cif');
    expect(p.cell).toEqual({ aA: 4, bA: 4, cA: 4, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });
    expect(p.notes).toContain('_cell_angle_alpha, _cell_angle_beta, _cell_angle_gamma not given: taken as 90 degrees');
  });

  it('refuses a hexagonal group whose missing gamma defaulted to 90, naming the operation that does not fit', () => {
    expect(message(`data_a\n_space_group_IT_number 194\n_cell_length_a 3\n_cell_length_b 3\n_cell_length_c 5\n${AU_SITES}`)).toMatch(
      /block data_a: the cell \(a = 3, b = 3, c = 5 Å, alpha = 90, beta = 90, gamma = 90 degrees\) does not have the symmetry of operation .+; check the _cell_ items against the symmetry \(_space_group_IT_number "194"\)/,
    );
  });

  it('names the space group of operations given without a symbol from the table (P -1), or describes them when none matches', () => {
    const p = phaseFromCif(
      `data_t\n_cell_length_a 5\n_cell_length_b 6\n_cell_length_c 7\n_cell_angle_alpha 80\n_cell_angle_beta 85\n_cell_angle_gamma 95\n` +
        `loop_\n_space_group_symop_operation_xyz\nx,y,z\n-x,-y,-z\n` +
        `loop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nC1 0.1 0.2 0.3\n`,
      't.cif',
    );
    expect(p.spaceGroup).toBe('P -1');
    expect(p.symmetryOperations).toEqual(['x,y,z', '-x,-y,-z']);
  });

  it('keeps the operations when the symbol disagrees with them, and notes it', () => {
    const p = phaseFromCif(
      `data_t\n_space_group_name_H-M_alt 'P 1'\n${CUBIC_CELL}loop_\n_space_group_symop_operation_xyz\nx,y,z\n-x,-y,-z\n${AU_SITES}`,
      't.cif',
    );
    expect(p.spaceGroup).toBe('P -1');
    expect(p.notes).toContain('_space_group_name_H-M_alt "P 1" does not match the operations given; they are those of P -1');
  });

  it('drops a repeated operation with a note', () => {
    const p = phaseFromCif(`data_t\n${CUBIC_CELL}loop_\n_space_group_symop_operation_xyz\nx,y,z\n'-x, -y, -z'\n-x,-y,-z\n${AU_SITES}`, 't.cif');
    expect(p.symmetryOperations).toHaveLength(2);
    expect(p.notes).toContain('_space_group_symop_operation_xyz: operation "-x,-y,-z" repeats an earlier one and was dropped');
  });

  it('warns that a bare "F d -3 m" means origin choice 1', () => {
    const p = phaseFromCif(`data_t\n_space_group_name_H-M_alt 'F d -3 m'\n${CUBIC_CELL}${AU_SITES}`, 't.cif');
    expect(p.spaceGroup).toBe('F d -3 m:1');
    expect(p.notes[0]).toMatch(/^_space_group_name_H-M_alt "F d -3 m" does not say which setting; took F d -3 m:1 \(origin choice 1/);
  });

  it('prefers the Hall symbol to the H-M symbol and notes a symbol it could not read', () => {
    const p = phaseFromCif(`data_t\n_space_group_name_Hall '-F 4 2 3'\n_space_group_name_H-M_alt 'F m 3 x'\n${CUBIC_CELL}${AU_SITES}`, 't.cif');
    expect(p.symmetryFrom).toBe('_space_group_name_Hall "-F 4 2 3"');
    expect(p.notes).toContain('_space_group_name_H-M_alt "F m 3 x" names no known setting and was ignored');
  });

  it('converts anisotropic B_ij like U_ij (U = B / 8 pi^2) and, for a cubic cell, gives U_eq = (U11 + U22 + U33) / 3', () => {
    const p = phaseFromCif(
      `data_t\n_space_group_name_H-M_alt 'P 1'\n${CUBIC_CELL}${AU_SITES}` +
        'loop_\n_atom_site_aniso_label\n_atom_site_aniso_B_11\n_atom_site_aniso_B_22\n_atom_site_aniso_B_33\n' +
        '_atom_site_aniso_B_12\n_atom_site_aniso_B_13\n_atom_site_aniso_B_23\nAu1 0.5 0.6 0.7 0.1 0.05 -0.02\n',
      't.cif',
    );
    expect(p.sites[0]!.bIsoA2).toBeCloseTo((0.5 + 0.6 + 0.7) / 3, 12);
  });

  it('takes the element from the label when there is no type symbol ("Fe2a" is iron, "O1" oxygen)', () => {
    const p = phaseFromCif(
      `data_t\n_space_group_name_H-M_alt 'P 1'\n${CUBIC_CELL}loop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nFe2a 0 0 0\nO1 0.5 0.5 0.5\n`,
      't.cif',
    );
    expect(p.sites.map((s) => s.element)).toEqual(['Fe', 'O']);
  });

  it('lists the blocks when the first has no structure and two others do', () => {
    const structure = (name: string) => `data_${name}\n_space_group_name_H-M_alt 'F m -3 m'\n${CUBIC_CELL}${AU_SITES}`;
    expect(message(`data_global\n_publ_section_title 'x'\n${structure('one')}${structure('two')}`)).toBe(
      'CIF "x.cif": the first block holds no structure and 2 others do; choose one with the block option: data_global (no cell), data_one, data_two',
    );
  });

  it('lists the blocks when the chosen block does not exist', () => {
    expect(message(text('two-structures.cif'), 'two.cif', 'Ag')).toBe('CIF "two.cif": no block data_Ag; the file has data_Au, data_Cu');
  });

  it('reports a file with no data blocks', () => {
    expect(message('# nothing here\n')).toBe('CIF "x.cif": no data blocks (a CIF starts each block with data_<name>)');
  });

  it('refuses text that is not a string', () => {
    expect(() => phaseFromCif(undefined as unknown as string, 'x.cif')).toThrow(TypeError);
  });
});

describe('phaseFromCif on the broken fixtures', () => {
  const cases: Array<[file: string, expected: string | RegExp]> = [
    ['broken-missing-cell-length.cif', 'CIF "broken-missing-cell-length.cif", block data_no_a: _cell_length_a is missing'],
    [
      'broken-no-atom-sites.cif',
      'CIF "broken-no-atom-sites.cif", block data_empty_cell: no atom sites (_atom_site_fract_x loop); give the asymmetric unit in an _atom_site_ loop',
    ],
    ['broken-unterminated-quote.cif', /^CIF "broken-unterminated-quote\.cif", line 12: unterminated quoted string \('gold\.\.\.\): close it with ' on the same line$/],
    ['broken-unterminated-text-field.cif', /^CIF "broken-unterminated-text-field\.cif", line 4: unterminated text field/],
    ['broken-loop-count.cif', /^CIF "broken-loop-count\.cif", line 7: loop_ of _atom_site_label has 7 values, not a multiple of its 4 tags/],
    [
      'broken-unknown-space-group.cif',
      /^CIF "broken-unknown-space-group\.cif", block data_bad_group, line 3: _space_group_name_H-M_alt "F m 3 x" names no space-group setting Annula knows/,
    ],
    ['broken-no-symmetry.cif', /^CIF "broken-no-symmetry\.cif", block data_no_symmetry: no symmetry: give a _space_group_symop_operation_xyz/],
    [
      'broken-cell-symmetry.cif',
      /^CIF "broken-cell-symmetry\.cif", block data_not_cubic: the cell \(a = 4\.0786, b = 4\.0786, c = 4\.2 Å, .*\) does not have the symmetry of operation/,
    ],
    [
      'broken-bad-operation.cif',
      'CIF "broken-bad-operation.cif", block data_bad_op, line 12: _space_group_symop_operation_xyz: cannot read symmetry operation "-x, -y": expected three comma-separated components, found 2',
    ],
    ['broken-incomplete-operations.cif', /block data_not_a_group: phase "not_a_group": its 2 distinct symmetry operations do not form a group/],
    ['broken-unknown-element.cif', /block data_bad_element, line 14: atom site "X1": element from _atom_site_type_symbol: unknown element "Qq"/],
    ['broken-occupancy.cif', 'CIF "broken-occupancy.cif", block data_too_full, line 13: atom site "Au1": _atom_site_occupancy = "1.5" is not in (0, 1]'],
    [
      'broken-no-structure-blocks.cif',
      'CIF "broken-no-structure-blocks.cif": no block holds a structure (a _cell_length_a and an _atom_site_fract_x loop); the file has data_publication (no cell), data_cell_only (no atom sites)',
    ],
    ['broken-non-numeric-cell.cif', 'CIF "broken-non-numeric-cell.cif", block data_words, line 4: _cell_length_a = "four" is not a number'],
  ];
  for (const [file, expected] of cases) {
    it(`${file} gives: ${String(expected).slice(0, 90)}`, () => {
      const m = message(text(file), file);
      if (typeof expected === 'string') expect(m).toBe(expected);
      else expect(m).toMatch(expected);
    });
  }

  it('reports the line of an unknown value "?" for a cell length', () => {
    expect(message(`data_q\n_cell_length_a ?\n`)).toBe('CIF "x.cif", block data_q, line 2: _cell_length_a is given as "?"; the reader needs its value in Å');
  });

  it('reports a coordinate given as "?" and a negative B at the site', () => {
    const base = `data_s\n_space_group_name_H-M_alt 'F m -3 m'\n${CUBIC_CELL}loop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\n_atom_site_B_iso_or_equiv\n`;
    expect(message(`${base}Au1 0 ? 0 0.5\n`)).toMatch(/line 15: atom site "Au1": _atom_site_fract_y is "\?"; give a number/);
    expect(message(`${base}Au1 0 0 0 -0.5\n`)).toMatch(/line 15: atom site "Au1": _atom_site_B_iso_or_equiv = "-0.5" is not a displacement >= 0 Å\^2/);
  });
});
