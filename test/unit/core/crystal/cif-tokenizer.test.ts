/**
 * CIF 1.1 syntax as the IUCr specification states it (International Tables
 * Vol. G (2006) ch. 2.2, "CIF 1.1 syntax specification"; rules quoted from memory).
 */
import { describe, expect, it } from 'vitest';
import { cifItem, cifLoopWith, parseCif, parseCifNumber, PhaseInputError } from '../../../../core/crystal';

const one = (text: string) => {
  const doc = parseCif(text, 'test.cif');
  expect(doc.blocks).toHaveLength(1);
  return doc.blocks[0]!;
};

describe('parseCif', () => {
  it('reads data blocks with their names lower-cased and as written', () => {
    const doc = parseCif('data_First\n_a 1\ndata_second\n_a 2\n', 'x.cif');
    expect(doc.blocks.map((b) => b.name)).toEqual(['first', 'second']);
    expect(doc.blocks.map((b) => b.displayName)).toEqual(['First', 'second']);
    expect(doc.blocks.map((b) => b.line)).toEqual([1, 3]);
  });

  it('returns no blocks for an empty file or one with only comments', () => {
    expect(parseCif('', 'x.cif').blocks).toEqual([]);
    expect(parseCif('# just a comment\n\n', 'x.cif').blocks).toEqual([]);
  });

  it('treats tags as case-insensitive and keeps values as written', () => {
    const b = one('data_x\n_Cell_Length_A 4.0782(3)\n');
    expect(cifItem(b, '_cell_length_a')?.text).toBe('4.0782(3)');
    expect(cifItem(b, '_CELL_LENGTH_A')?.kind).toBe('unquoted');
  });

  it("closes a quoted string only at a quote followed by whitespace: 'a dog's life' is one value (the spec's example)", () => {
    const b = one("data_x\n_title 'a dog's life'\n_other \"x\"y\" ");
    expect(cifItem(b, '_title')).toEqual({ text: "a dog's life", kind: 'quoted', line: 2 });
    expect(cifItem(b, '_other')?.text).toBe('x"y');
    expect(() => one("data_x\n_t 'a' b\n")).toThrow(/line 2: value "b" has no tag/);
  });

  it('reads a quoted string that ends the file without a newline', () => {
    expect(cifItem(one("data_x\n_t 'end'"), '_t')?.text).toBe('end');
  });

  it('reads a semicolon text field between lines starting with ";" and counts its lines', () => {
    const b = one('data_x\n_publ_section_title\n;\nFirst line; not the end\n  second # not a comment\n;\n_next 5\n');
    const title = cifItem(b, '_publ_section_title')!;
    expect(title.kind).toBe('text-field');
    expect(title.text).toBe('\nFirst line; not the end\n  second # not a comment');
    expect(title.line).toBe(3);
    expect(cifItem(b, '_next')).toEqual({ text: '5', kind: 'unquoted', line: 7 });
  });

  it('tells ? (unknown) and . (inapplicable) from quoted "?" and "."', () => {
    const b = one("data_x\n_a ?\n_b .\n_c '?'\n_d .5\n");
    expect(cifItem(b, '_a')?.kind).toBe('unknown');
    expect(cifItem(b, '_b')?.kind).toBe('inapplicable');
    expect(cifItem(b, '_c')?.kind).toBe('quoted');
    expect(cifItem(b, '_d')?.kind).toBe('unquoted');
  });

  it('skips comments after # at the start of a token but keeps # inside an unquoted value', () => {
    const b = one('data_x # block comment\n_a 1 # one\n_b x#y\n#_c 3\n');
    expect(cifItem(b, '_a')?.text).toBe('1');
    expect(cifItem(b, '_b')?.text).toBe('x#y');
    expect(cifItem(b, '_c')).toBeUndefined();
  });

  it('reads loops row by row, values spanning lines, and accepts \\r\\n line ends', () => {
    const b = one(
      "data_x\r\nloop_\r\n_atom_site_label\r\n_atom_site_fract_x\r\nNa1 0 Cl1\r\n0.5\r\n'O 2' 0.25\r\n",
    );
    const loop = cifLoopWith(b, '_ATOM_SITE_FRACT_X')!;
    expect(loop.tags).toEqual(['_atom_site_label', '_atom_site_fract_x']);
    expect(loop.rows.map((r) => r.map((v) => v.text))).toEqual([
      ['Na1', '0'],
      ['Cl1', '0.5'],
      ['O 2', '0.25'],
    ]);
    expect(loop.line).toBe(2);
    expect(loop.rows[2]![0]!.line).toBe(7);
  });

  it('gives the value of a one-row loop through cifItem but not of a longer loop', () => {
    const b = one('data_x\nloop_\n_a\n_b\n1 2\nloop_\n_c\n3\n4\n');
    expect(cifItem(b, '_b')?.text).toBe('2');
    expect(cifItem(b, '_c')).toBeUndefined();
  });

  it('accepts a text field as a loop value', () => {
    const b = one('data_x\nloop_\n_publ_author_name\n_publ_author_address\n"Doe, J."\n;\nLab A\nTown\n;\n');
    expect(cifLoopWith(b, '_publ_author_address')!.rows[0]![1]!.text).toBe('\nLab A\nTown');
  });
});

describe('parseCif errors', () => {
  const message = (text: string): string => {
    try {
      parseCif(text, 'bad.cif');
    } catch (e) {
      expect(e).toBeInstanceOf(PhaseInputError);
      return (e as Error).message;
    }
    throw new Error('expected parseCif to throw');
  };

  it('names the file and line of an unterminated quoted string', () => {
    expect(message("data_x\n_a 1\n_title 'no end\n_b 2\n")).toMatch(/^CIF "bad\.cif", line 3: unterminated quoted string/);
  });

  it('names the opening line of an unterminated text field', () => {
    expect(message('data_x\n_a 1\n_t\n;\nnever closed\n')).toMatch(/^CIF "bad\.cif", line 4: unterminated text field/);
  });

  it('reports a tag that has no value', () => {
    expect(message('data_x\n_cell_length_a\n_cell_length_b 3\n')).toMatch(/line 2: _cell_length_a has no value/);
    expect(message('data_x\n_cell_length_a')).toMatch(/line 2: _cell_length_a has no value/);
  });

  it('reports a loop whose value count is not a multiple of its tags, naming the tags', () => {
    expect(message('data_x\nloop_\n_a\n_b\n_c\n1 2 3\n4 5\n')).toMatch(
      /line 2: loop_ of _a has 5 values, not a multiple of its 3 tags \(_a _b _c\)/,
    );
  });

  it('reports a loop without tags or without values', () => {
    expect(message('data_x\nloop_\n1 2\n')).toMatch(/line 2: loop_ is not followed by any _tag/);
    expect(message('data_x\nloop_\n_a\ndata_y\n')).toMatch(/line 2: loop_ of _a has no values/);
  });

  it('reports a tag given twice in one block, also across a loop', () => {
    expect(message('data_x\n_a 1\n_a 2\n')).toMatch(/line 3: _a appears twice in data_x \(first at line 2\)/);
    expect(message('data_x\n_a 1\nloop_\n_a\n3\n')).toMatch(/line 4: _a appears twice/);
  });

  it('allows the same tag in two different blocks', () => {
    expect(parseCif('data_x\n_a 1\ndata_y\n_a 2\n', 'ok.cif').blocks).toHaveLength(2);
  });

  it('reports data before the first data_ header and a stray value', () => {
    expect(message('_a 1\ndata_x\n')).toMatch(/line 1: "_a" appears before any data_ block header/);
    expect(message('data_x\n_a 1 2\n')).toMatch(/line 2: value "2" has no tag before it/);
  });

  it('reports an empty block name, a repeated block and the reserved words', () => {
    expect(message('data_\n_a 1\n')).toMatch(/line 1: data_ needs a block name/);
    expect(message('data_x\n_a 1\ndata_X\n_a 2\n')).toMatch(/line 3: block data_X appears twice/);
    expect(message('data_x\nsave_frame\n_a 1\nsave_\n')).toMatch(/line 2: save frames/);
    expect(message('global_\n_a 1\n')).toMatch(/line 1: "global_" is a reserved word/);
  });
});

describe('parseCifNumber', () => {
  it('reads plain numbers, signs, exponents and a leading dot', () => {
    expect(parseCifNumber('4.0782')).toEqual({ value: 4.0782 });
    expect(parseCifNumber('-0.25')).toEqual({ value: -0.25 });
    expect(parseCifNumber('+3')).toEqual({ value: 3 });
    expect(parseCifNumber('.5')).toEqual({ value: 0.5 });
    expect(parseCifNumber('2.')).toEqual({ value: 2 });
    expect(parseCifNumber('1.2E-3')!.value).toBeCloseTo(1.2e-3, 18);
  });

  it('reads 4.0782(3) as 4.0782 with su 0.0003 in units of the last digit', () => {
    const n = parseCifNumber('4.0782(3)')!;
    expect(n.value).toBe(4.0782);
    expect(n.su).toBeCloseTo(0.0003, 15);
    expect(parseCifNumber('90.12(15)')!.su).toBeCloseTo(0.15, 15);
    expect(parseCifNumber('1234(5)')).toEqual({ value: 1234, su: 5 });
  });

  it('scales the su with the exponent: 1.23e-4(4) is (1.23 +- 0.04) x 10^-4', () => {
    const n = parseCifNumber('1.23e-4(4)')!;
    expect(n.value).toBeCloseTo(1.23e-4, 18);
    expect(n.su).toBeCloseTo(4e-6, 18);
  });

  it('refuses what is not a CIF number', () => {
    for (const t of ['?', '.', '', 'Au', '1.2.3', '4.0782(', '1.23(4)e-4', '(3)', '1e', 'NaN', 'Infinity']) {
      expect(parseCifNumber(t), t).toBeUndefined();
    }
  });
});
