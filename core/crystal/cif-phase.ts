/**
 * A Phase from a CIF file (IUCr core CIF dictionary names, CIF 1.1 syntax; the
 * syntax is read by cif-tokenizer.ts).
 *
 * What is read, in order of preference (International Tables for
 * Crystallography Vol. G (2006), ch. 4.1, the core CIF dictionary):
 *
 * - cell: _cell_length_a/b/c (required), _cell_angle_alpha/beta/gamma (90 when
 *   absent, with a note); standard uncertainties in parentheses are kept in
 *   `cellSu`. The cell must have the symmetry of the operations (R^T G R = G,
 *   see cell-constraints.ts).
 * - symmetry: the operations of a _space_group_symop_operation_xyz or
 *   _symmetry_equiv_pos_as_xyz loop; when there is none, the first of
 *   _space_group_name_Hall, _symmetry_space_group_name_Hall,
 *   _space_group_name_H-M_alt, _symmetry_space_group_name_H-M,
 *   _space_group_IT_number, _symmetry_Int_Tables_number that names a known
 *   setting (`symmetryFrom` says which). _space_group_IT_coordinate_system_code
 *   ('1', '2', 'h', 'r') picks the setting of a bare symbol or number; without it, a
 *   bare Hermann-Mauguin symbol of a group with two origin choices means origin
 *   choice 1, as in International Tables' first-listed setting, and a note warns of it.
 * - atom sites: the loop with _atom_site_fract_x (and _y, _z), labels from
 *   _atom_site_label, elements from _atom_site_type_symbol or else from the label
 *   (charges dropped), _atom_site_occupancy (default 1), displacement from
 *   _atom_site_B_iso_or_equiv, else _atom_site_U_iso_or_equiv (B = 8 pi^2 U), else
 *   the equivalent isotropic value of _atom_site_aniso_U_ij or _B_ij (Fischer &
 *   Tillmanns 1988, see displacement-parameters.ts), else DEFAULT_B_ISO_A2 (with a
 *   note naming the sites). Sites flagged _atom_site_calc_flag dum (dummy) are
 *   skipped.
 * - name and formula: _chemical_formula_sum (spaces dropped: "Ti O2" -> "TiO2"),
 *   _chemical_name_common, _chemical_name_systematic, _chemical_name_mineral,
 *   else the block name.
 * - source: authors, title and journal from _publ_author_name, _publ_section_title,
 *   _journal_* (or the _citation_* loop), any _database_code_* item, then the file
 *   and block read.
 * - temperature: _cell_measurement_temperature, else _diffrn_ambient_temperature (K).
 */

import { cellSymmetryMismatch } from './cell-constraints';
import { cifItem, cifLoopWith, parseCif, parseCifNumber, type CifBlock, type CifValue } from './cif-tokenizer';
import { bIsoFromUIsoA2, DEFAULT_B_ISO_A2, uEquivalentA2 } from './displacement-parameters';
import { atomicNumber, elementSymbol } from './elements';
import type { AtomSite, Phase } from './phase';
import { PhaseInputError } from './phase-input-error';
import { allSpaceGroupSettings, findSpaceGroup, type SpaceGroupSetting } from './space-group';
import { prepareStructure } from './structure-factor';
import { formatSymmetryOperation, operationKey, parseSymmetryOperation, type SymmetryOperation } from './symmetry-operation';
import type { UnitCell } from './unit-cell';

export interface CifPhaseOptions {
  /** Data block to read, with or without "data_", any case. Default: see phaseFromCif. */
  block?: string;
}

/** A Phase read from CIF, with what the reader chose on the way. */
export interface CifPhase extends Phase {
  origin: 'cif';
  /** Name of the data block read, as written in the file (without "data_"). */
  block: string;
  /** The data item the symmetry came from, with its value, e.g. `_space_group_name_Hall "-F 4 2 3"`. */
  symmetryFrom: string;
  /** Standard uncertainties of the cell parameters the file gave, in Å and degrees. */
  cellSu: Partial<UnitCell>;
  /** Choices a reader should know about (defaults applied, settings assumed, blocks skipped). */
  notes: string[];
}

const OPERATION_TAGS = ['_space_group_symop_operation_xyz', '_symmetry_equiv_pos_as_xyz'];
/** Space-group names and numbers, in order of preference, spelt as the core dictionary does. */
const SYMBOL_TAGS = [
  '_space_group_name_Hall',
  '_symmetry_space_group_name_Hall',
  '_space_group_name_H-M_alt',
  '_symmetry_space_group_name_H-M',
  '_space_group_IT_number',
  '_symmetry_Int_Tables_number',
];

/** A value that is given: not absent, not ? (unknown), not . (inapplicable). */
type GivenValue = CifValue & { kind: 'unquoted' | 'quoted' | 'text-field' };
const present = (v: CifValue | undefined): v is GivenValue => v !== undefined && v.kind !== 'unknown' && v.kind !== 'inapplicable';
const clean = (text: string): string => text.replace(/\s+/g, ' ').trim();

/** True when the block has a cell and an atom-site loop. */
function hasStructure(block: CifBlock): boolean {
  return present(cifItem(block, '_cell_length_a')) && cifLoopWith(block, '_atom_site_fract_x') !== undefined;
}

function describeBlock(block: CifBlock): string {
  if (hasStructure(block)) return `data_${block.displayName}`;
  const lacks = present(cifItem(block, '_cell_length_a')) ? 'no atom sites' : 'no cell';
  return `data_${block.displayName} (${lacks})`;
}

/** Picks the block to read; see phaseFromCif for the rule. */
function chooseBlock(blocks: CifBlock[], sourceName: string, wanted: string | undefined, notes: string[]): CifBlock {
  const fail = (message: string): never => {
    throw new PhaseInputError(sourceName, `CIF "${sourceName}": ${message}`);
  };
  if (blocks.length === 0) fail('no data blocks (a CIF starts each block with data_<name>)');
  const list = blocks.map(describeBlock).join(', ');
  if (wanted !== undefined) {
    const name = wanted.trim().replace(/^data_/i, '').toLowerCase();
    const block = blocks.find((b) => b.name === name);
    if (!block) fail(`no block data_${wanted.trim().replace(/^data_/i, '')}; the file has ${list}`);
    return block!;
  }
  const structural = blocks.filter(hasStructure);
  const first = blocks[0]!;
  // A lone block is read whatever it holds, so its errors can name the missing item.
  if (blocks.length === 1 || hasStructure(first)) {
    if (structural.length > 1) {
      notes.push(`the file has ${structural.length} blocks with structures; read the first, data_${first.displayName} (choose another with the block option)`);
    }
    return first;
  }
  if (structural.length === 1) {
    notes.push(`read data_${structural[0]!.displayName}, the only block with a structure (the file has ${list})`);
    return structural[0]!;
  }
  return fail(
    structural.length === 0
      ? `no block holds a structure (a _cell_length_a and an _atom_site_fract_x loop); the file has ${list}`
      : `the first block holds no structure and ${structural.length} others do; choose one with the block option: ${list}`,
  );
}

/**
 * Reads a phase from CIF text.
 *
 * Block choice: `options.block` when given; otherwise the first block when it holds a
 * structure (a cell and an atom-site loop) or is the file's only block; otherwise the
 * only block that holds a structure. When
 * the first block has none and several others do, or none does, the error lists the
 * blocks so the caller can choose.
 *
 * @param text the CIF file's text
 * @param sourceName the file name, used in messages and in the phase's source
 * @returns a CifPhase (origin 'cif') whose id is the block name
 * @throws PhaseInputError `CIF "<file>", block data_<name>: <problem>` (with `line N`
 *   when one is known) for syntax errors, a missing or non-numeric cell length, no
 *   atom-site loop, a missing coordinate, an unknown element, an occupancy outside
 *   (0, 1], negative displacements, an operation that cannot be read, no symmetry or an
 *   unknown space-group symbol, a cell without the symmetry of the operations, and
 *   operations that do not form a group.
 */
export function phaseFromCif(text: string, sourceName: string, options: CifPhaseOptions = {}): CifPhase {
  if (typeof text !== 'string') throw new TypeError(`CIF text must be a string; got ${typeof text}`);
  const document = parseCif(text, sourceName);
  const notes: string[] = [];
  const block = chooseBlock(document.blocks, sourceName, options.block, notes);
  const where = `CIF "${sourceName}", block data_${block.displayName}`;
  const fail = (message: string, line?: number): never => {
    throw new PhaseInputError(sourceName, line === undefined ? `${where}: ${message}` : `${where}, line ${line}: ${message}`, line);
  };

  const number = (v: CifValue, tag: string): { value: number; su?: number } => {
    const n = parseCifNumber(v.text);
    if (!n) fail(`${tag} = "${clean(v.text).slice(0, 30)}" is not a number`, v.line);
    return n!;
  };

  // Cell.
  const cell = {} as Record<keyof UnitCell, number>;
  const cellSu: Partial<UnitCell> = {};
  const cellTags: Array<[keyof UnitCell, string, boolean]> = [
    ['aA', '_cell_length_a', true],
    ['bA', '_cell_length_b', true],
    ['cA', '_cell_length_c', true],
    ['alphaDeg', '_cell_angle_alpha', false],
    ['betaDeg', '_cell_angle_beta', false],
    ['gammaDeg', '_cell_angle_gamma', false],
  ];
  const defaulted: string[] = [];
  for (const [key, tag, required] of cellTags) {
    const v = cifItem(block, tag);
    if (!present(v)) {
      if (required) fail(v ? `${tag} is given as "${v.text}"; the reader needs its value in Å` : `${tag} is missing`, v?.line);
      defaulted.push(tag);
      cell[key] = 90;
      continue;
    }
    const n = number(v, tag);
    const ok = key.endsWith('A') ? n.value > 0 : n.value > 0 && n.value < 180;
    if (!ok) fail(`${tag} = ${n.value} is not ${key.endsWith('A') ? 'a positive length in Å' : 'an angle between 0 and 180 degrees'}`, v.line);
    cell[key] = n.value;
    if (n.su !== undefined) cellSu[key] = n.su;
  }
  if (defaulted.length > 0) notes.push(`${defaulted.join(', ')} not given: taken as 90 degrees`);

  // Symmetry.
  const { operations, symmetryFrom, spaceGroup } = readSymmetry(block, fail, notes);
  const mismatch = cellSymmetryMismatch(cell, operations);
  if (mismatch) fail(`${mismatch}; check the _cell_ items against the symmetry (${symmetryFrom})`);

  // Atom sites.
  const sites = readSites(block, cell, fail, notes);

  const formula = readFormula(block);
  const name = firstText(block, ['_chemical_name_common', '_chemical_name_systematic', '_chemical_name_mineral']) ?? (formula || block.displayName);
  const phase: CifPhase = {
    id: block.displayName,
    name,
    formula: formula || block.displayName,
    structureType: firstText(block, ['_chemical_name_structure_type']) ?? '',
    spaceGroup,
    symmetryOperations: operations.map(formatSymmetryOperation),
    cell,
    sites,
    source: readSource(block, document.blocks, sourceName),
    origin: 'cif',
    block: block.displayName,
    symmetryFrom,
    cellSu,
    notes,
  };
  for (const tag of ['_cell_measurement_temperature', '_diffrn_ambient_temperature']) {
    const v = cifItem(block, tag);
    if (present(v)) {
      const t = number(v, tag).value;
      if (!(t > 0)) fail(`${tag} = ${t} is not a temperature in K`, v.line);
      phase.temperatureK = t;
      break;
    }
  }
  try {
    prepareStructure(phase);
  } catch (e) {
    fail((e as Error).message);
  }
  return phase;
}

type Fail = (message: string, line?: number) => never;

/** Operations from the loop, or from the first symbol that names a known setting. */
function readSymmetry(
  block: CifBlock,
  fail: Fail,
  notes: string[],
): { operations: SymmetryOperation[]; symmetryFrom: string; spaceGroup: string } {
  // _space_group_IT_coordinate_system_code ('1', '2', 'h', 'r', ...) names the setting of a bare symbol.
  const codeValue = cifItem(block, '_space_group_it_coordinate_system_code');
  const code = present(codeValue) ? clean(codeValue.text) : undefined;
  const symbols: Array<{ tag: string; value: CifValue; setting: SpaceGroupSetting | undefined }> = [];
  for (const tag of SYMBOL_TAGS) {
    const value = cifItem(block, tag);
    if (!present(value)) continue;
    const text = clean(value.text);
    let setting: SpaceGroupSetting | undefined;
    if (/number$/i.test(tag)) {
      setting = /^\d+$/.test(text) ? findSpaceGroup(code === undefined ? Number(text) : `${text}:${code}`) : undefined;
      if (!setting && code !== undefined && /^\d+$/.test(text)) setting = findSpaceGroup(Number(text));
    } else {
      if (code !== undefined && tag.includes('H-M') && !text.includes(':')) setting = findSpaceGroup(`${text}:${code}`);
      setting ??= findSpaceGroup(text);
    }
    symbols.push({ tag, value, setting });
  }

  for (const tag of OPERATION_TAGS) {
    const loop = cifLoopWith(block, tag);
    const values = loop ? loop.rows.map((r) => r[loop.tags.indexOf(tag)]!) : block.items.has(tag) ? [block.items.get(tag)!] : [];
    if (values.length === 0) continue;
    const ops = new Map<string, SymmetryOperation>();
    for (const v of values) {
      let op: SymmetryOperation;
      try {
        op = parseSymmetryOperation(v.text);
      } catch (e) {
        return fail(`${tag}: ${(e as Error).message}`, v.line);
      }
      const key = operationKey(op);
      if (ops.has(key)) notes.push(`${tag}: operation "${clean(v.text)}" repeats an earlier one and was dropped`);
      else ops.set(key, op);
    }
    const operations = [...ops.values()];
    return { operations, symmetryFrom: `${tag} (${operations.length} operations)`, spaceGroup: nameOperations(operations, symbols, notes) };
  }

  const known = symbols.find((s) => s.setting !== undefined);
  if (!known) {
    if (symbols.length > 0) {
      const s = symbols[0]!;
      return fail(
        `${s.tag} "${clean(s.value.text)}" names no space-group setting Annula knows, and there is no ` +
          '_space_group_symop_operation_xyz loop; give the operations, or a Hall symbol, Hermann-Mauguin symbol or number 1-230',
        s.value.line,
      );
    }
    return fail(
      'no symmetry: give a _space_group_symop_operation_xyz (or _symmetry_equiv_pos_as_xyz) loop, or one of ' +
        '_space_group_name_Hall, _space_group_name_H-M_alt, _space_group_IT_number',
    );
  }
  const setting = known.setting!;
  for (const s of symbols) {
    if (s !== known && !s.setting) notes.push(`${s.tag} "${clean(s.value.text)}" names no known setting and was ignored`);
    if (s !== known && s.setting && s.setting.hermannMauguin !== setting.hermannMauguin && !/number$/i.test(s.tag)) {
      notes.push(`${s.tag} "${clean(s.value.text)}" names ${s.setting.hermannMauguin}, not ${setting.hermannMauguin}; used ${known.tag}`);
    }
  }
  const written = clean(known.value.text);
  const hasSuffix = /:\s*\S+$/.test(written) || (code !== undefined && setting.hermannMauguin.endsWith(`:${code.toUpperCase()}`));
  if (!known.tag.includes('Hall') && !hasSuffix && setting.hermannMauguin.includes(':')) {
    notes.push(
      `${known.tag} "${written}" does not say which setting; took ${setting.hermannMauguin}` +
        ' (origin choice 1, or hexagonal axes, as International Tables lists first); if the coordinates use another, give ":2" or the operations',
    );
  }
  return {
    operations: setting.operations.map(parseSymmetryOperation),
    symmetryFrom: `${known.tag} "${written}"${code === undefined ? '' : ` with _space_group_IT_coordinate_system_code "${code}"`}`,
    spaceGroup: setting.hermannMauguin,
  };
}

/** The setting whose operations are exactly `operations`: first a symbol of the file, then the table. */
function nameOperations(
  operations: SymmetryOperation[],
  symbols: Array<{ tag: string; value: CifValue; setting: SpaceGroupSetting | undefined }>,
  notes: string[],
): string {
  const keys = new Set(operations.map(operationKey));
  const same = (s: SpaceGroupSetting): boolean =>
    s.operations.length === keys.size && s.operations.every((t) => keys.has(operationKey(parseSymmetryOperation(t))));
  for (const s of symbols) if (s.setting && same(s.setting)) return s.setting.hermannMauguin;
  const named = symbols.find((s) => !/number$/i.test(s.tag));
  const match = allSpaceGroupSettings().find(same);
  if (match) {
    if (named) notes.push(`${named.tag} "${clean(named.value.text)}" does not match the operations given; they are those of ${match.hermannMauguin}`);
    return match.hermannMauguin;
  }
  if (named) {
    notes.push(`the operations are not those of any tabulated setting; kept the file's symbol "${clean(named.value.text)}"`);
    return clean(named.value.text);
  }
  return `(${operations.length} operations from the file)`;
}

function readSites(block: CifBlock, cell: UnitCell, fail: Fail, notes: string[]): AtomSite[] {
  const loop = cifLoopWith(block, '_atom_site_fract_x');
  if (!loop) return fail('no atom sites (_atom_site_fract_x loop); give the asymmetric unit in an _atom_site_ loop');
  const col = (tag: string): number => loop.tags.indexOf(tag);
  for (const tag of ['_atom_site_fract_y', '_atom_site_fract_z']) {
    if (col(tag) < 0) fail(`the atom-site loop has _atom_site_fract_x but no ${tag}`, loop.line);
  }
  const iLabel = col('_atom_site_label');
  const iType = col('_atom_site_type_symbol');
  if (iLabel < 0 && iType < 0) fail('the atom-site loop has neither _atom_site_label nor _atom_site_type_symbol', loop.line);
  const aniso = readAniso(block, cell, fail);
  const defaulted: string[] = [];
  const fromAniso: string[] = [];
  const skipped: string[] = [];
  const labels = new Set<string>();
  const sites: AtomSite[] = [];
  loop.rows.forEach((row, r) => {
    const valueAt = (i: number): CifValue | undefined => (i < 0 ? undefined : row[i]);
    const labelValue = valueAt(iLabel);
    const typeValue = valueAt(iType);
    const label = present(labelValue) ? clean(labelValue.text) : present(typeValue) ? `${clean(typeValue.text)}${r + 1}` : `site${r + 1}`;
    const line = row[0]!.line;
    const flag = valueAt(col('_atom_site_calc_flag'));
    if (present(flag) && flag.text.toLowerCase() === 'dum') {
      skipped.push(label);
      return;
    }
    if (labels.has(label)) fail(`atom site "${label}" appears twice in the atom-site loop; give each site its own label`, line);
    labels.add(label);
    const elementText = present(typeValue) ? typeValue.text : label;
    let element: string;
    try {
      element = elementSymbol(atomicNumber(elementText));
    } catch (e) {
      const from = present(typeValue) ? '_atom_site_type_symbol' : 'its label (no _atom_site_type_symbol)';
      return fail(`atom site "${label}": element from ${from}: ${(e as Error).message}`, line);
    }
    const coordinate = (tag: string): number => {
      const v = valueAt(col(tag));
      if (!present(v)) return fail(`atom site "${label}": ${tag} is ${v ? `"${v.text}"` : 'missing'}; give a number`, line);
      const n = parseCifNumber(v.text);
      if (!n) return fail(`atom site "${label}": ${tag} = "${v.text}" is not a number`, v.line);
      return n.value;
    };
    const x = coordinate('_atom_site_fract_x');
    const y = coordinate('_atom_site_fract_y');
    const z = coordinate('_atom_site_fract_z');
    const occValue = valueAt(col('_atom_site_occupancy'));
    let occupancy = 1;
    if (present(occValue)) {
      const n = parseCifNumber(occValue.text);
      if (!n || !(n.value > 0 && n.value <= 1)) {
        fail(`atom site "${label}": _atom_site_occupancy = "${occValue.text}" is not in (0, 1]`, occValue.line);
      }
      occupancy = n!.value;
    }
    let bIsoA2: number | undefined;
    const bValue = valueAt(col('_atom_site_b_iso_or_equiv'));
    const uValue = valueAt(col('_atom_site_u_iso_or_equiv'));
    if (present(bValue) || present(uValue)) {
      const v = present(bValue) ? bValue : uValue!;
      const tag = present(bValue) ? '_atom_site_B_iso_or_equiv' : '_atom_site_U_iso_or_equiv';
      const n = parseCifNumber(v.text);
      if (!n || n.value < 0) fail(`atom site "${label}": ${tag} = "${v.text}" is not a displacement >= 0 Å^2`, v.line);
      bIsoA2 = present(bValue) ? n!.value : bIsoFromUIsoA2(n!.value);
    } else if (aniso.has(label.toLowerCase())) {
      bIsoA2 = aniso.get(label.toLowerCase())!;
      fromAniso.push(label);
    } else {
      bIsoA2 = DEFAULT_B_ISO_A2;
      defaulted.push(label);
    }
    sites.push({ label, element: element!, x, y, z, occupancy, bIsoA2: bIsoA2! });
  });
  if (sites.length === 0) fail('the atom-site loop holds only dummy sites (_atom_site_calc_flag dum)', loop.line);
  if (skipped.length > 0) notes.push(`dummy sites skipped (_atom_site_calc_flag dum): ${skipped.join(', ')}`);
  if (fromAniso.length > 0) {
    notes.push(`B from the equivalent isotropic U of the anisotropic U_ij (Fischer & Tillmanns 1988) for: ${fromAniso.join(', ')}`);
  }
  if (defaulted.length > 0) {
    notes.push(`no displacement parameter for ${defaulted.join(', ')}: B = ${DEFAULT_B_ISO_A2} Å^2 assumed (common practice)`);
  }
  return sites;
}

/** Equivalent isotropic B (Å^2) by lower-cased label from the _atom_site_aniso_ loop, if any. */
function readAniso(block: CifBlock, cell: UnitCell, fail: Fail): Map<string, number> {
  const out = new Map<string, number>();
  for (const kind of ['u', 'b'] as const) {
    const loop = cifLoopWith(block, `_atom_site_aniso_${kind}_11`);
    if (!loop) continue;
    const iLabel = loop.tags.indexOf('_atom_site_aniso_label');
    if (iLabel < 0) fail(`the _atom_site_aniso_${kind.toUpperCase()}_ij loop has no _atom_site_aniso_label`, loop.line);
    const idx = ['11', '22', '33', '12', '13', '23'].map((ij) => loop.tags.indexOf(`_atom_site_aniso_${kind}_${ij}`));
    for (const row of loop.rows) {
      const label = clean(row[iLabel]!.text);
      const values = idx.map((i, k) => {
        if (i < 0) return fail(`the anisotropic loop lacks _atom_site_aniso_${kind.toUpperCase()}_${['11', '22', '33', '12', '13', '23'][k]}`, loop.line);
        const n = parseCifNumber(row[i]!.text);
        if (!n) return fail(`atom site "${label}": anisotropic ${kind.toUpperCase()} = "${row[i]!.text}" is not a number`, row[i]!.line);
        return kind === 'u' ? n.value : n.value / (8 * Math.PI * Math.PI);
      });
      const [u11, u22, u33, u12, u13, u23] = values as [number, number, number, number, number, number];
      const ueq = uEquivalentA2({ u11, u22, u33, u12, u13, u23 }, cell);
      if (!(ueq >= 0)) fail(`atom site "${label}": the anisotropic displacements give U_eq = ${ueq} < 0`, row[iLabel]!.line);
      out.set(label.toLowerCase(), bIsoFromUIsoA2(ueq));
    }
  }
  return out;
}

function firstText(block: CifBlock, tags: string[]): string | undefined {
  for (const tag of tags) {
    const v = cifItem(block, tag);
    if (present(v) && clean(v.text) !== '') return clean(v.text);
  }
  return undefined;
}

/** "Ti O2" -> "TiO2"; the structural formula when no sum formula is given; "" when neither. */
function readFormula(block: CifBlock): string {
  const text = firstText(block, ['_chemical_formula_sum', '_chemical_formula_structural']);
  return text === undefined ? '' : text.replace(/\s+/g, '');
}

/** Authors, title and journal of one block, as citation parts (empty when none). */
function citationParts(block: CifBlock): string[] {
  const parts: string[] = [];
  const authorLoop = cifLoopWith(block, '_publ_author_name');
  const authors = authorLoop
    ? authorLoop.rows.map((r) => r[authorLoop.tags.indexOf('_publ_author_name')]!).filter(present).map((v) => clean(v.text))
    : [];
  if (authors.length > 0) parts.push(authors.join('; '));
  const title = firstText(block, ['_publ_section_title', '_citation_title']);
  if (title) parts.push(`"${title}"`);
  const journal = firstText(block, ['_journal_name_full', '_journal_name_abbrev', '_citation_journal_full', '_citation_journal_abbrev']);
  const volume = firstText(block, ['_journal_volume', '_citation_journal_volume']);
  const year = firstText(block, ['_journal_year', '_citation_year']);
  const first = firstText(block, ['_journal_page_first', '_citation_page_first']);
  const last = firstText(block, ['_journal_page_last', '_citation_page_last']);
  const ref = [journal, volume, year ? `(${year})` : undefined, first ? (last ? `${first}-${last}` : first) : undefined].filter(Boolean);
  if (ref.length > 0) parts.push(ref.join(' '));
  return parts;
}

/**
 * Citation of the block read; when it carries none, that of the file's blocks
 * without a structure (journals put the publication in a separate "global" block).
 */
function readSource(block: CifBlock, blocks: readonly CifBlock[], sourceName: string): string {
  let parts = citationParts(block);
  if (parts.length === 0) {
    parts = blocks.filter((b) => b !== block && !hasStructure(b)).flatMap(citationParts);
  }
  const codes = [...block.items.entries()]
    .filter(([tag, v]) => tag.startsWith('_database_code_') && present(v))
    .map(([tag, v]) => `${tag} ${clean(v.text)}`);
  if (codes.length > 0) parts.push(codes.join(', '));
  const read = `read from CIF "${sourceName}", block data_${block.displayName}`;
  return parts.length > 0 ? `${parts.join(', ')}; ${read}` : read;
}
