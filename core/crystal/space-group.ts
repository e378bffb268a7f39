/**
 * Space-group settings of International Tables for Crystallography Vol. A (and the
 * Hall symbols of Vol. B), as carried by gemmi: 559 settings of the 230 groups,
 * generated into data/space-groups.ts. Each record keeps a few generators and the
 * centring translations; the full operation list is their closure, built on first
 * use and cached.
 *
 * Default settings, following gemmi's find_spacegroup_by_name and
 * find_spacegroup_by_number: when a symbol or number has several settings and none
 * is named, the first of gemmi's table is taken. That is ORIGIN CHOICE 1 for the
 * groups with two origins (e.g. "Fd-3m" is "F d -3 m:1", origin at -43m, Si at 8a =
 * 0,0,0; "F d -3 m:2" puts the origin at the centre -3m, Si at 1/8,1/8,1/8), and
 * HEXAGONAL AXES for the rhombohedral groups ("R-3m" is "R -3 m:H"; "R-3m:R" gives
 * rhombohedral axes). Many CIFs use origin choice 2: name it with ':2'.
 */

import { SPACE_GROUP_RECORDS, type SpaceGroupRecord } from './data/space-groups';
import { closeGroup, formatSymmetryOperation, parseSymmetryOperation, type SymmetryOperation } from './symmetry-operation';

export type CrystalSystem = 'triclinic' | 'monoclinic' | 'orthorhombic' | 'tetragonal' | 'trigonal' | 'hexagonal' | 'cubic';

export interface SpaceGroupSetting {
  /** International Tables number, 1..230. */
  number: number;
  /** Extended Hermann-Mauguin symbol as gemmi writes it (xHM), e.g. "F d -3 m:2", "R -3 m:H", "P 1 21/c 1". */
  hermannMauguin: string;
  /** Short symbol without spaces, e.g. "Fd-3m", "P21/c", "R-3m" (gemmi's short name, with R for rhombohedral groups). */
  shortSymbol: string;
  /** Hall symbol, e.g. "-F 4vw 2vw 3". */
  hall: string;
  crystalSystem: CrystalSystem;
  /** Laue class, e.g. "m-3m", "6/mmm", "2/m". */
  laueClass: string;
  /**
   * Lattice letter of the Hermann-Mauguin symbol: P, A, B, C, I, F or R. Settings
   * ":R" of rhombohedral groups keep the letter R although, on rhombohedral axes, they
   * have no centring translations.
   */
  centring: string;
  /** Every operation modulo lattice translations, centring included, in 'x,y,z' notation (canonical triplets). */
  operations: string[];
}

const settingCache = new Map<number, SpaceGroupSetting>();
let index: Map<string, number> | undefined;

/**
 * Name key: letters lower-cased except the lattice letter, spaces and underscores
 * dropped (so "P 63/m m c", "P63/mmc" and CIF's "P6_3/mmc" meet), "H" as a lattice
 * letter read as R (gemmi does the same), the setting suffix kept after ':'.
 */
function nameKey(symbol: string): string {
  let s = symbol.trim().replace(/[\s_]+/g, '');
  let ext = '';
  const colon = s.indexOf(':');
  if (colon >= 0) {
    ext = s.slice(colon + 1).toUpperCase();
    s = s.slice(0, colon);
  }
  if (s === '') return '';
  let lattice = s[0]!.toUpperCase();
  if (lattice === 'H') lattice = 'R';
  const rest = s.slice(1).toLowerCase();
  return ext === '' ? lattice + rest : `${lattice}${rest}:${ext}`;
}

function hallKey(hall: string): string {
  return 'hall:' + hall.trim().replace(/\s+/g, ' ').toLowerCase();
}

/** Symbols that name a setting: full xHM, xHM without the ':' suffix, short symbol (+ suffix), Hall. */
function buildIndex(): Map<string, number> {
  const map = new Map<string, number>();
  const add = (key: string, i: number): void => {
    if (key !== '' && !map.has(key)) map.set(key, i); // first setting in the table wins, as in gemmi
  };
  SPACE_GROUP_RECORDS.forEach((r, i) => {
    const [, xhm, short, hall] = r;
    const [hm, ext] = xhm.split(':') as [string, string | undefined];
    add(nameKey(xhm), i);
    add(nameKey(hm), i);
    add(nameKey(short), i);
    if (ext !== undefined) add(nameKey(`${short}:${ext}`), i);
    add(hallKey(hall), i);
  });
  // Symbols with the glide 'e' (International Tables 5th ed. onwards) for the groups
  // gemmi lists under the older letters: Aem2 = Abm2, Aea2 = Aba2, Cmce = Cmca,
  // Cmme = Cmma, Ccce = Ccca (ITA 2005, sec. 1.3, from memory).
  const eSymbols: Array<[string, string]> = [
    ['Aem2', 'Abm2'], ['Aea2', 'Aba2'], ['Cmce', 'Cmca'], ['Cmme', 'Cmma'], ['Ccce', 'Ccca'],
    ['Ccce:1', 'Ccca:1'], ['Ccce:2', 'Ccca:2'],
  ];
  for (const [alias, name] of eSymbols) {
    const i = map.get(nameKey(name));
    if (i !== undefined) add(nameKey(alias), i);
  }
  return map;
}

/** A copy of the cached setting, so that callers may change what they get (e.g. sort the operations). */
function settingFromRecord(i: number): SpaceGroupSetting {
  const s = cachedSetting(i);
  return { ...s, operations: [...s.operations] };
}

function cachedSetting(i: number): SpaceGroupSetting {
  const cached = settingCache.get(i);
  if (cached) return cached;
  const r: SpaceGroupRecord = SPACE_GROUP_RECORDS[i]!;
  const [number, xhm, short, hall, system, laue, lattice, generators, centring] = r;
  const ops: SymmetryOperation[] = generators === '' ? [] : generators.split(';').map(parseSymmetryOperation);
  if (centring !== '') {
    for (const v of centring.split(';')) {
      const [u, w, t] = v.split(',');
      ops.push(parseSymmetryOperation(`x+${u},y+${w},z+${t}`));
    }
  }
  const setting: SpaceGroupSetting = {
    number,
    hermannMauguin: xhm,
    shortSymbol: short,
    hall,
    crystalSystem: system as CrystalSystem,
    laueClass: laue,
    centring: lattice,
    operations: closeGroup(ops).map(formatSymmetryOperation),
  };
  settingCache.set(i, setting);
  return setting;
}

/**
 * Looks up a space-group setting.
 *
 * - By number (1..230, or a string "227"): the default setting, the first in the
 *   table, as gemmi's find_spacegroup_by_number. "227:2" names a setting by number
 *   and suffix.
 * - By Hermann-Mauguin symbol, full or short, tolerant of spaces, case and CIF's
 *   underscore for screw axes: "Fm-3m", "F m -3 m", "P 63/m m c", "P6_3/mmc",
 *   "P21/c", "P 1 21/c 1". A suffix ":1", ":2", ":H" or ":R" picks the setting;
 *   without one the default is gemmi's (origin choice 1; hexagonal axes for R groups).
 *   The e-glide symbols Aem2, Aea2, Cmce, Cmme, Ccce are accepted.
 * - By Hall symbol as the table writes it (case and spacing free), e.g. "-F 4vw 2vw 3".
 *
 * @returns a fresh copy of the setting (the caller may change it), or undefined when
 *   nothing matches (the caller words the error).
 */
export function findSpaceGroup(symbolOrNumber: string | number): SpaceGroupSetting | undefined {
  if (typeof symbolOrNumber === 'number') {
    if (!Number.isInteger(symbolOrNumber) || symbolOrNumber < 1 || symbolOrNumber > 230) return undefined;
    const i = SPACE_GROUP_RECORDS.findIndex((r) => r[0] === symbolOrNumber);
    return i < 0 ? undefined : settingFromRecord(i);
  }
  if (typeof symbolOrNumber !== 'string') return undefined;
  const text = symbolOrNumber.trim();
  const numbered = /^(\d+)\s*(?::\s*(\S+))?$/.exec(text);
  if (numbered) {
    const n = Number(numbered[1]);
    if (numbered[2] === undefined) return findSpaceGroup(n);
    const ext = numbered[2].toUpperCase();
    const i = SPACE_GROUP_RECORDS.findIndex((r) => r[0] === n && r[1].split(':')[1] === ext);
    return i < 0 ? undefined : settingFromRecord(i);
  }
  index ??= buildIndex();
  const i = index.get(nameKey(text)) ?? index.get(hallKey(text));
  return i === undefined ? undefined : settingFromRecord(i);
}

/** Every setting of the table, in gemmi's order (builds all 559 operation lists). */
export function allSpaceGroupSettings(): SpaceGroupSetting[] {
  return SPACE_GROUP_RECORDS.map((_, i) => settingFromRecord(i));
}
