/**
 * Chemical elements by symbol and atomic number (IUPAC periodic table, Z = 1..118).
 * Annula computes structure factors for Z = 1..98, the range of the tabulated
 * electron scattering factors (International Tables Vol. C, Table 4.3.2.2).
 */

const SYMBOLS = [
  'H', 'He', 'Li', 'Be', 'B', 'C', 'N', 'O', 'F', 'Ne', 'Na', 'Mg', 'Al', 'Si', 'P', 'S', 'Cl', 'Ar',
  'K', 'Ca', 'Sc', 'Ti', 'V', 'Cr', 'Mn', 'Fe', 'Co', 'Ni', 'Cu', 'Zn', 'Ga', 'Ge', 'As', 'Se', 'Br', 'Kr',
  'Rb', 'Sr', 'Y', 'Zr', 'Nb', 'Mo', 'Tc', 'Ru', 'Rh', 'Pd', 'Ag', 'Cd', 'In', 'Sn', 'Sb', 'Te', 'I', 'Xe',
  'Cs', 'Ba', 'La', 'Ce', 'Pr', 'Nd', 'Pm', 'Sm', 'Eu', 'Gd', 'Tb', 'Dy', 'Ho', 'Er', 'Tm', 'Yb', 'Lu',
  'Hf', 'Ta', 'W', 'Re', 'Os', 'Ir', 'Pt', 'Au', 'Hg', 'Tl', 'Pb', 'Bi', 'Po', 'At', 'Rn',
  'Fr', 'Ra', 'Ac', 'Th', 'Pa', 'U', 'Np', 'Pu', 'Am', 'Cm', 'Bk', 'Cf', 'Es', 'Fm', 'Md', 'No', 'Lr',
  'Rf', 'Db', 'Sg', 'Bh', 'Hs', 'Mt', 'Ds', 'Rg', 'Cn', 'Nh', 'Fl', 'Mc', 'Lv', 'Ts', 'Og',
] as const;

/** The largest atomic number Annula can compute with (Cf): the end of the scattering-factor table. */
export const MAX_SUPPORTED_Z = 98;

const BY_SYMBOL = new Map<string, number>(SYMBOLS.map((s, i) => [s, i + 1]));
// Deuterium and tritium scatter electrons as hydrogen does (CIF type symbols 'D', 'T').
BY_SYMBOL.set('D', 1);
BY_SYMBOL.set('T', 1);

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1).toLowerCase();
}

/**
 * Atomic number from an element symbol, a CIF type symbol or a site label:
 * "Au" -> 79, "AU" -> 79 (case-free), "O2-" -> 8, "Fe3+" -> 26, "Si1" -> 14, "O1a" -> 8.
 * Reading: the leading letters are taken (digits, charges and anything after the
 * first non-letter are dropped); a two-letter start that is not an element falls back
 * to its first letter when that is one (labels such as "Oa", "Ob"), as CIF readers
 * commonly do for labels (common practice). Case is ignored, so "CO" is cobalt.
 *
 * @throws RangeError naming the symbol when no element matches, or when the element
 *   is beyond Cf (Z > 98), for which no electron scattering factor is tabulated.
 */
export function atomicNumber(symbolOrLabel: string): number {
  if (typeof symbolOrLabel !== 'string') {
    throw new TypeError(`element symbol must be a string; got ${typeof symbolOrLabel}`);
  }
  const letters = /^[A-Za-z]+/.exec(symbolOrLabel.trim())?.[0] ?? '';
  let z: number | undefined;
  if (letters.length >= 2) z = BY_SYMBOL.get(capitalise(letters.slice(0, 2)));
  if (z === undefined && letters.length >= 1) {
    z = BY_SYMBOL.get(letters.charAt(0).toUpperCase());
  }
  if (z === undefined) {
    throw new RangeError(`unknown element "${symbolOrLabel}": give an element symbol such as "Au", "O" or "Fe3+"`);
  }
  if (z > MAX_SUPPORTED_Z) {
    throw new RangeError(
      `element "${symbolOrLabel}" (${SYMBOLS[z - 1]}, Z = ${z}) is beyond Cf (Z = 98): no electron scattering factor is tabulated for it`,
    );
  }
  return z;
}

/**
 * Element symbol for atomic number `z` (1..118), capitalised as in the periodic table.
 * @throws RangeError naming z when it is not an integer in 1..118.
 */
export function elementSymbol(z: number): string {
  if (!Number.isInteger(z) || z < 1 || z > SYMBOLS.length) {
    throw new RangeError(`atomic number z must be an integer from 1 to ${SYMBOLS.length}; got ${z}`);
  }
  return SYMBOLS[z - 1]!;
}
