/**
 * Phases of Annula's built-in library, as phase descriptions (the JSON format of
 * ../phase-description.ts), one record per phase.
 *
 * HAND-CURATED, NOT GENERATED: unlike the other files of data/, no script makes this
 * one. Edit it by hand; test/unit/core/crystal/phase-library.test.ts checks each record
 * (cell, sites, composition against the formula, interatomic distances) and
 * test/reference/phase-library.reference.test.ts rebuilds each phase in gemmi.
 *
 * HONESTY ABOUT THE NUMBERS. Almost every lattice constant, atomic coordinate and
 * displacement parameter below was recalled from the source named beside it, not read
 * from that source while writing: each is marked "from memory". They are close to the
 * published values (to about 1e-3 Å for the lattice constants of the elements and
 * simple compounds), but before a phase serves as a camera-length calibration
 * standard, check its lattice constant against the cited source or, better, the
 * certificate of the reference material actually on the microscope. The ideal-silicon
 * lattice parameter (CODATA 2018) is the one value copied from its source.
 *
 * Conventions:
 * - Settings: the space-group symbol of each record names the setting its coordinates
 *   use. Groups with two origin choices carry ':1' or ':2' explicitly ("F d -3 m:2":
 *   origin at the centre of symmetry, Si at 8a = 1/8,1/8,1/8), because the default of
 *   findSpaceGroup is origin choice 1; rhombohedral groups use hexagonal axes (':H').
 * - B: room-temperature isotropic displacement parameters of the elements from the
 *   compilation of Peng et al. (PENG_B) where recalled; otherwise the site carries no
 *   B and the reader's default DEFAULT_B_ISO_A2 = 0.5 Å^2 applies (common practice).
 * - Temperatures: the NBS powder patterns were measured at 25-26 degrees C (298-299 K);
 *   records without temperatureK have a room-temperature value whose exact
 *   temperature is not recalled.
 */

import type { PhaseDescription } from '../phase-description';

const NBS =
  'H. E. Swanson et al., Standard X-ray Diffraction Powder Patterns, NBS Circular 539 (National Bureau of Standards, 1953-1960)';
const NBS_MONO =
  'Standard X-ray Diffraction Powder Patterns, NBS Monograph 25 (National Bureau of Standards, 1962 onwards)';
const WYCKOFF = 'R. W. G. Wyckoff, Crystal Structures, 2nd ed., vol. 1 (Interscience, New York, 1963)';
const WYCKOFF_3 = 'R. W. G. Wyckoff, Crystal Structures, 2nd ed., vol. 3 (Interscience, New York, 1965)';
const MADELUNG = 'O. Madelung (ed.), Semiconductors: Data Handbook, 3rd ed. (Springer, Berlin, 2004)';
const TOTH = 'L. E. Toth, Transition Metal Carbides and Nitrides (Academic Press, New York, 1971)';
const PENG_B =
  'B from L.-M. Peng, G. Ren, S. L. Dudarev and M. J. Whelan, "Debye-Waller factors and absorptive scattering factors of elemental crystals", Acta Cryst. A52 (1996) 456-470, room temperature, rounded (from memory)';
const DEFAULT_B = 'B = 0.5 Å^2 for every site, a default (common practice)';

const mem = (citation: string, what = 'a'): string => `${what}: ${citation} (from memory)`;
const join = (...parts: string[]): string => parts.join('; ');

type Xyz = [number, number, number];

/** One element on the sites of a structure prototype, with its optional B (Å^2). */
interface Atom {
  element: string;
  B?: number;
}

const site = (a: Atom, xyz: Xyz, occupancy?: number) => ({
  element: a.element,
  xyz,
  ...(a.B === undefined ? {} : { B: a.B }),
  ...(occupancy === undefined ? {} : { occupancy }),
});

interface Common {
  id: string;
  name: string;
  aA: number;
  source: string;
  temperatureK?: number;
}

const common = (c: Common) => ({
  id: c.id,
  name: c.name,
  source: c.source,
  ...(c.temperatureK === undefined ? {} : { temperatureK: c.temperatureK }),
});

/** fcc metal, Fm-3m, atom at 4a (0,0,0) (A1, Cu type). */
const fcc = (c: Common, B?: number): PhaseDescription => ({
  ...common(c),
  formula: c.id,
  structureType: 'fcc',
  spaceGroup: 'F m -3 m',
  cell: { a: c.aA },
  sites: [site({ element: c.id, B }, [0, 0, 0])],
});

/** bcc metal, Im-3m, atom at 2a (0,0,0) (A2, W type). */
const bcc = (c: Common & { element?: string }, B?: number): PhaseDescription => ({
  ...common(c),
  formula: c.element ?? c.id,
  structureType: 'bcc',
  spaceGroup: 'I m -3 m',
  cell: { a: c.aA },
  sites: [site({ element: c.element ?? c.id, B }, [0, 0, 0])],
});

/** Diamond structure (A4), Fd-3m origin choice 2, atom at 8a (1/8,1/8,1/8). */
const diamond = (c: Common & { element: string }, B?: number): PhaseDescription => ({
  ...common(c),
  formula: c.element,
  structureType: 'diamond',
  spaceGroup: 'F d -3 m:2',
  cell: { a: c.aA },
  sites: [site({ element: c.element, B }, [1 / 8, 1 / 8, 1 / 8])],
});

/** Rock salt (B1, NaCl type), Fm-3m: cation at 4a (0,0,0), anion at 4b (1/2,1/2,1/2). */
const rockSalt = (c: Common & { formula?: string }, cation: Atom, anion: Atom, anionOccupancy?: number): PhaseDescription => ({
  ...common(c),
  formula: c.formula ?? c.id,
  structureType: 'rock salt',
  spaceGroup: 'F m -3 m',
  cell: { a: c.aA },
  sites: [site(cation, [0, 0, 0]), site(anion, [0.5, 0.5, 0.5], anionOccupancy)],
});

/** CsCl type (B2), Pm-3m: A at 1a (0,0,0), B at 1b (1/2,1/2,1/2). */
const cesiumChloride = (c: Common & { structureType?: string }, a: Atom, b: Atom): PhaseDescription => ({
  ...common(c),
  formula: c.id,
  structureType: c.structureType ?? 'CsCl',
  spaceGroup: 'P m -3 m',
  cell: { a: c.aA },
  sites: [site(a, [0, 0, 0]), site(b, [0.5, 0.5, 0.5])],
});

/** Zincblende (B3, sphalerite), F-43m: A at 4a (0,0,0), B at 4c (1/4,1/4,1/4). */
const zincblende = (c: Common & { formula?: string }, a: Atom, b: Atom): PhaseDescription => ({
  ...common(c),
  formula: c.formula ?? c.id,
  structureType: 'zincblende',
  spaceGroup: 'F -4 3 m',
  cell: { a: c.aA },
  sites: [site(a, [0, 0, 0]), site(b, [0.25, 0.25, 0.25])],
});

/** Fluorite (C1, CaF2 type), Fm-3m: cation at 4a (0,0,0), anion at 8c (1/4,1/4,1/4). */
const fluorite = (c: Common, cation: Atom, anion: Atom): PhaseDescription => ({
  ...common(c),
  formula: c.id,
  structureType: 'fluorite',
  spaceGroup: 'F m -3 m',
  cell: { a: c.aA },
  sites: [site(cation, [0, 0, 0]), site(anion, [0.25, 0.25, 0.25])],
});

/** Cubic perovskite ABO3, Pm-3m: B at 1a (0,0,0), A at 1b (1/2,1/2,1/2), O at 3d (1/2,0,0). */
const perovskite = (c: Common & { formula: string }, a: Atom, b: Atom): PhaseDescription => ({
  ...common(c),
  formula: c.formula,
  structureType: 'perovskite',
  spaceGroup: 'P m -3 m',
  cell: { a: c.aA },
  sites: [site(b, [0, 0, 0]), site(a, [0.5, 0.5, 0.5]), site({ element: 'O' }, [0.5, 0, 0])],
});

/**
 * Spinel AB2O4, Fd-3m origin choice 2: A (tetrahedral) at 8a (1/8,1/8,1/8), B
 * (octahedral) at 16d (1/2,1/2,1/2), O at 32e (u,u,u); u = 0.25 for ideal packing
 * in this origin (0.375 in origin choice 1).
 */
const spinel = (c: Common & { formula: string }, a: Atom[], b: Atom[], u: number, aOcc?: number[], bOcc?: number[]): PhaseDescription => ({
  ...common(c),
  formula: c.formula,
  structureType: 'spinel',
  spaceGroup: 'F d -3 m:2',
  cell: { a: c.aA },
  sites: [
    ...a.map((x, i) => site(x, [1 / 8, 1 / 8, 1 / 8], aOcc?.[i])),
    ...b.map((x, i) => site(x, [0.5, 0.5, 0.5], bOcc?.[i])),
    site({ element: 'O' }, [u, u, u]),
  ],
});

/** L1_2 (Cu3Au type), Pm-3m: minority atom at 1a (0,0,0), majority at 3c (0,1/2,1/2). */
const l12 = (c: Common, minority: Atom, majority: Atom): PhaseDescription => ({
  ...common(c),
  formula: c.id,
  structureType: 'L1_2 (Cu3Au)',
  spaceGroup: 'P m -3 m',
  cell: { a: c.aA },
  sites: [site(minority, [0, 0, 0]), site(majority, [0, 0.5, 0.5])],
});

/** hcp metal (A3, Mg type), P6_3/mmc, atom at 2c (1/3,2/3,1/4). */
const hcp = (c: Common & { element?: string; cA: number }, B?: number): PhaseDescription => ({
  ...common(c),
  formula: c.element ?? c.id,
  structureType: 'hcp',
  spaceGroup: 'P 63/m m c',
  cell: { a: c.aA, c: c.cA },
  sites: [site({ element: c.element ?? c.id, B }, [1 / 3, 2 / 3, 0.25])],
});

/** Wurtzite (B4), P6_3mc: A at 2b (1/3,2/3,0), B at 2b (1/3,2/3,u). */
const wurtzite = (c: Common & { cA: number; formula?: string }, a: Atom, b: Atom, u: number): PhaseDescription => ({
  ...common(c),
  formula: c.formula ?? c.id,
  structureType: 'wurtzite',
  spaceGroup: 'P 63 m c',
  cell: { a: c.aA, c: c.cA },
  sites: [site(a, [1 / 3, 2 / 3, 0]), site(b, [1 / 3, 2 / 3, u])],
});

const O: Atom = { element: 'O' };
const N: Atom = { element: 'N' };
const C: Atom = { element: 'C' };

/** The library, in the order of the structure families above. */
export const PHASE_LIBRARY_RECORDS: readonly PhaseDescription[] = [
  // fcc metals. Lattice constants: NBS Circular 539 vols. I-IV (Swanson & Tatge 1953 and
  // later volumes), 25-26 degrees C.
  fcc({ id: 'Au', name: 'gold', aA: 4.0786, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.6),
  fcc({ id: 'Ag', name: 'silver', aA: 4.0862, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.65),
  fcc({ id: 'Al', name: 'aluminium', aA: 4.0494, temperatureK: 298, source: join(mem(NBS), PENG_B) }, 0.85),
  fcc({ id: 'Cu', name: 'copper', aA: 3.615, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.55),
  fcc({ id: 'Ni', name: 'nickel', aA: 3.5238, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.37),
  fcc({ id: 'Pt', name: 'platinum', aA: 3.9231, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.33),
  fcc({ id: 'Pd', name: 'palladium', aA: 3.8898, temperatureK: 298, source: join(mem(NBS), PENG_B) }, 0.44),
  fcc({ id: 'Pb', name: 'lead', aA: 4.9505, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 2.0),
  fcc({ id: 'Ir', name: 'iridium', aA: 3.8394, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.17),
  fcc({ id: 'Rh', name: 'rhodium', aA: 3.8031, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.22),

  // bcc metals.
  bcc({ id: 'W', name: 'tungsten', aA: 3.1648, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.16),
  bcc({ id: 'Mo', name: 'molybdenum', aA: 3.1472, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.19),
  bcc({ id: 'Cr', name: 'chromium', aA: 2.8839, temperatureK: 299, source: join(mem(NBS), PENG_B) }, 0.25),
  bcc({ id: 'Fe-alpha', element: 'Fe', name: 'alpha-iron (ferrite)', aA: 2.8664, temperatureK: 298, source: join(mem(NBS), PENG_B) }, 0.35),
  bcc({ id: 'Ta', name: 'tantalum', aA: 3.3058, temperatureK: 298, source: join(mem(NBS), PENG_B) }, 0.25),
  bcc({ id: 'Nb', name: 'niobium', aA: 3.3004, source: join(mem(WYCKOFF), PENG_B) }, 0.45),
  bcc({ id: 'V', name: 'vanadium', aA: 3.024, source: join(mem(WYCKOFF), PENG_B) }, 0.55),

  // Diamond structure.
  diamond(
    {
      id: 'Si',
      element: 'Si',
      name: 'silicon',
      aA: 5.431020511,
      temperatureK: 295.65,
      source: join(
        'a: CODATA 2018 lattice parameter of ideal silicon (a perfect crystal), a = 543.1020511(89) pm at 22.5 degrees C in vacuum ' +
          '(E. Tiesinga, P. J. Mohr, D. B. Newell and B. N. Taylor, Rev. Mod. Phys. 93 (2021) 025010). Silicon powders of the ' +
          'NIST SRM 640 series are certified separately, with values larger by about 1e-4 Å (from memory): use the certificate for a powder standard',
        PENG_B,
      ),
    },
    0.46,
  ),
  diamond({ id: 'Ge', element: 'Ge', name: 'germanium', aA: 5.6579, temperatureK: 300, source: join(mem(MADELUNG), PENG_B) }, 0.57),
  diamond({ id: 'C-diamond', element: 'C', name: 'diamond', aA: 3.5668, temperatureK: 298, source: join(mem(WYCKOFF), PENG_B) }, 0.15),

  // Rock salt: halides and oxides (NBS Circular 539), then the refractory nitrides and carbides (Toth 1971).
  rockSalt({ id: 'NaCl', name: 'sodium chloride (halite)', aA: 5.6402, temperatureK: 299, source: join(mem(NBS), 'B(Na) 1.6, B(Cl) 1.2 Å^2 from ' + WYCKOFF_3 + ' (from memory, approximate)') }, { element: 'Na', B: 1.6 }, { element: 'Cl', B: 1.2 }),
  rockSalt({ id: 'KCl', name: 'potassium chloride (sylvite)', aA: 6.2931, temperatureK: 298, source: join(mem(NBS), DEFAULT_B) }, { element: 'K' }, { element: 'Cl' }),
  rockSalt({ id: 'LiF', name: 'lithium fluoride', aA: 4.027, temperatureK: 299, source: join(mem(NBS), 'B(Li) 1.0, B(F) 0.75 Å^2 (from memory, approximate)') }, { element: 'Li', B: 1.0 }, { element: 'F', B: 0.75 }),
  rockSalt({ id: 'MgO', name: 'magnesium oxide (periclase)', aA: 4.2112, temperatureK: 298, source: join(mem(NBS), 'B(Mg) 0.31, B(O) 0.34 Å^2 (from memory, approximate)') }, { element: 'Mg', B: 0.31 }, { element: 'O', B: 0.34 }),
  rockSalt({ id: 'NiO', name: 'nickel oxide (bunsenite)', aA: 4.1769, temperatureK: 299, source: join(mem(NBS), 'cubic above its 523 K Neel point; at room temperature slightly rhombohedral (a strain of about 1e-3), not resolved by ring patterns', DEFAULT_B) }, { element: 'Ni' }, O),
  rockSalt({ id: 'CoO', name: 'cobalt(II) oxide', aA: 4.261, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'Co' }, O),
  rockSalt({ id: 'MnO', name: 'manganese(II) oxide (manganosite)', aA: 4.445, temperatureK: 299, source: join(mem(NBS), DEFAULT_B) }, { element: 'Mn' }, O),
  rockSalt({ id: 'CaO', name: 'calcium oxide (lime)', aA: 4.8105, temperatureK: 299, source: join(mem(NBS), DEFAULT_B) }, { element: 'Ca' }, O),
  rockSalt({ id: 'PbS', name: 'lead sulfide (galena)', aA: 5.936, temperatureK: 299, source: join(mem(NBS), DEFAULT_B) }, { element: 'Pb' }, { element: 'S' }),
  rockSalt({ id: 'TiN', name: 'titanium nitride', aA: 4.2417, source: join(mem(NBS_MONO), DEFAULT_B) }, { element: 'Ti' }, N),
  rockSalt({ id: 'ZrN', name: 'zirconium nitride', aA: 4.5776, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Zr' }, N),
  rockSalt({ id: 'HfN', name: 'hafnium nitride', aA: 4.525, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Hf' }, N),
  rockSalt({ id: 'CrN', name: 'chromium nitride', aA: 4.148, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Cr' }, N),
  rockSalt({ id: 'VN', name: 'vanadium nitride', aA: 4.139, source: join(mem(TOTH), DEFAULT_B) }, { element: 'V' }, N),
  rockSalt({ id: 'NbN', name: 'niobium nitride (delta)', aA: 4.394, source: join(mem(TOTH), 'a depends on the N content', DEFAULT_B) }, { element: 'Nb' }, N),
  rockSalt({ id: 'TiC', name: 'titanium carbide', aA: 4.3274, source: join(mem(TOTH), 'a depends on the C content', DEFAULT_B) }, { element: 'Ti' }, C),
  rockSalt({ id: 'ZrC', name: 'zirconium carbide', aA: 4.6983, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Zr' }, C),
  rockSalt({ id: 'HfC', name: 'hafnium carbide', aA: 4.638, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Hf' }, C),
  rockSalt({ id: 'NbC', name: 'niobium carbide', aA: 4.4702, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Nb' }, C),
  rockSalt({ id: 'TaC', name: 'tantalum carbide', aA: 4.4547, source: join(mem(TOTH), DEFAULT_B) }, { element: 'Ta' }, C),
  rockSalt(
    { id: 'VC', formula: 'VC0.88', name: 'vanadium carbide (VC0.88)', aA: 4.1655, source: join(mem(TOTH), 'carbon sites 88 % occupied, the usual carbon-rich limit (from memory)', DEFAULT_B) },
    { element: 'V' },
    C,
    0.88,
  ),

  // CsCl type and its ordered alloys (B2).
  cesiumChloride({ id: 'CsCl', name: 'caesium chloride', aA: 4.123, temperatureK: 298, source: join(mem(NBS), DEFAULT_B) }, { element: 'Cs' }, { element: 'Cl' }),
  cesiumChloride({ id: 'TlCl', name: 'thallium(I) chloride', aA: 3.8424, temperatureK: 298, source: join(mem(NBS), 'used as a camera-constant standard in older practice', DEFAULT_B) }, { element: 'Tl' }, { element: 'Cl' }),
  cesiumChloride({ id: 'NiAl', name: 'nickel aluminide (B2)', structureType: 'B2 (CsCl)', aA: 2.887, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'Ni' }, { element: 'Al' }),
  cesiumChloride({ id: 'CuZn', name: "beta'-brass (ordered CuZn)", structureType: 'B2 (CsCl)', aA: 2.952, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'Cu' }, { element: 'Zn' }),

  // Zincblende: III-V and II-VI semiconductors (Madelung's handbook, 300 K), SiC, BN.
  zincblende({ id: 'GaAs', name: 'gallium arsenide', aA: 5.65325, temperatureK: 300, source: join(mem(MADELUNG), 'B(Ga) = B(As) = 0.6 Å^2 (from memory, approximate)') }, { element: 'Ga', B: 0.6 }, { element: 'As', B: 0.6 }),
  zincblende({ id: 'GaP', name: 'gallium phosphide', aA: 5.4505, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Ga' }, { element: 'P' }),
  zincblende({ id: 'GaSb', name: 'gallium antimonide', aA: 6.0959, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Ga' }, { element: 'Sb' }),
  zincblende({ id: 'InP', name: 'indium phosphide', aA: 5.8687, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'In' }, { element: 'P' }),
  zincblende({ id: 'InAs', name: 'indium arsenide', aA: 6.0583, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'In' }, { element: 'As' }),
  zincblende({ id: 'InSb', name: 'indium antimonide', aA: 6.4794, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'In' }, { element: 'Sb' }),
  zincblende({ id: 'AlAs', name: 'aluminium arsenide', aA: 5.6611, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Al' }, { element: 'As' }),
  zincblende({ id: 'ZnS', name: 'zinc sulfide (sphalerite)', aA: 5.4093, source: join(mem(NBS), DEFAULT_B) }, { element: 'Zn' }, { element: 'S' }),
  zincblende({ id: 'ZnSe', name: 'zinc selenide', aA: 5.6676, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Zn' }, { element: 'Se' }),
  zincblende({ id: 'CdTe', name: 'cadmium telluride', aA: 6.481, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Cd' }, { element: 'Te' }),
  zincblende({ id: 'SiC-3C', formula: 'SiC', name: 'silicon carbide (3C, beta)', aA: 4.3596, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'Si' }, C),
  zincblende({ id: 'BN-cubic', formula: 'BN', name: 'cubic boron nitride', aA: 3.6157, temperatureK: 300, source: join(mem(MADELUNG), DEFAULT_B) }, { element: 'B' }, N),

  // Fluorite.
  fluorite({ id: 'CaF2', name: 'calcium fluoride (fluorite)', aA: 5.4626, temperatureK: 298, source: join(mem(NBS), 'B(Ca) 0.47, B(F) 0.69 Å^2 (from memory, approximate)') }, { element: 'Ca', B: 0.47 }, { element: 'F', B: 0.69 }),
  fluorite({ id: 'SrF2', name: 'strontium fluoride', aA: 5.7996, temperatureK: 298, source: join(mem(NBS), DEFAULT_B) }, { element: 'Sr' }, { element: 'F' }),
  fluorite({ id: 'BaF2', name: 'barium fluoride', aA: 6.2001, temperatureK: 298, source: join(mem(NBS), DEFAULT_B) }, { element: 'Ba' }, { element: 'F' }),
  fluorite(
    {
      id: 'CeO2',
      name: 'cerium dioxide (ceria)',
      aA: 5.4113,
      temperatureK: 299,
      source: join(
        mem(NBS),
        'ceria is also a NIST SRM 674-series intensity standard; its certificate gives a value close to this (from memory): use the certificate when calibrating with it',
        DEFAULT_B,
      ),
    },
    { element: 'Ce' },
    O,
  ),
  fluorite({ id: 'UO2', name: 'uranium dioxide', aA: 5.4704, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'U' }, O),
  fluorite({ id: 'ThO2', name: 'thorium dioxide (thorianite)', aA: 5.597, temperatureK: 299, source: join(mem(NBS), DEFAULT_B) }, { element: 'Th' }, O),
  {
    id: 'ZrO2-8YSZ',
    name: 'cubic zirconia, 8 mol% yttria-stabilised',
    formula: 'Zr0.852Y0.148O1.926',
    structureType: 'fluorite',
    spaceGroup: 'F m -3 m',
    cell: { a: 5.139 },
    sites: [
      { label: 'Zr1', element: 'Zr', xyz: [0, 0, 0], occupancy: 0.852 },
      { label: 'Y1', element: 'Y', xyz: [0, 0, 0], occupancy: 0.148 },
      { label: 'O1', element: 'O', xyz: [0.25, 0.25, 0.25], occupancy: 0.963 },
    ],
    source: join(
      'a: about 5.139 Å for (ZrO2)0.92(Y2O3)0.08, rising with the yttria content (from memory; no single source recalled)',
      'composition fixed by the formula: Y on Zr sites, one O vacancy per two Y; oxygen displacements off 8c ignored',
      DEFAULT_B,
    ),
  },

  // Perovskites.
  perovskite({ id: 'SrTiO3', formula: 'SrTiO3', name: 'strontium titanate', aA: 3.9051, temperatureK: 298, source: join(mem(NBS), DEFAULT_B) }, { element: 'Sr' }, { element: 'Ti' }),
  perovskite(
    {
      id: 'BaTiO3-cubic',
      formula: 'BaTiO3',
      name: 'barium titanate, cubic (above its Curie point of about 393 K)',
      aA: 4.009,
      temperatureK: 403,
      source: join(
        'a at about 130 degrees C (from memory; no single source recalled)',
        'CAUTION: at room temperature BaTiO3 is tetragonal (a = 3.99, c = 4.03 Å, from memory), so its rings split; this cubic entry applies above the Curie point',
        DEFAULT_B,
      ),
    },
    { element: 'Ba' },
    { element: 'Ti' },
  ),

  // Spinels (O parameter u in origin choice 2, from memory).
  spinel({ id: 'MgAl2O4', formula: 'MgAl2O4', name: 'magnesium aluminate spinel', aA: 8.0831, temperatureK: 299, source: join(mem(NBS), mem(WYCKOFF_3, 'O parameter u = 0.2624'), DEFAULT_B) }, [{ element: 'Mg' }], [{ element: 'Al' }], 0.2624),
  spinel({ id: 'Fe3O4', formula: 'Fe3O4', name: 'magnetite', aA: 8.3967, source: join(mem(NBS_MONO), mem(WYCKOFF_3, 'O parameter u = 0.2549'), DEFAULT_B) }, [{ element: 'Fe' }], [{ element: 'Fe' }], 0.2549),
  spinel({ id: 'Co3O4', formula: 'Co3O4', name: 'cobalt(II,III) oxide', aA: 8.0837, source: join(mem(NBS_MONO), mem(WYCKOFF_3, 'O parameter u = 0.2631'), DEFAULT_B) }, [{ element: 'Co' }], [{ element: 'Co' }], 0.2631),
  spinel(
    { id: 'NiFe2O4', formula: 'NiFe2O4', name: 'nickel ferrite (inverse spinel)', aA: 8.339, source: join(mem(NBS_MONO), 'inverse: Fe on 8a, Ni and Fe half each on 16d', mem(WYCKOFF_3, 'O parameter u = 0.2573'), DEFAULT_B) },
    [{ element: 'Fe' }],
    [{ element: 'Ni' }, { element: 'Fe' }],
    0.2573,
    undefined,
    [0.5, 0.5],
  ),

  // Other cubic structures.
  {
    id: 'Cu2O',
    name: 'copper(I) oxide (cuprite)',
    formula: 'Cu2O',
    structureType: 'cuprite',
    spaceGroup: 'P n -3 m:2',
    cell: { a: 4.2696 },
    sites: [
      { label: 'Cu1', element: 'Cu', xyz: [0, 0, 0] },
      { label: 'O1', element: 'O', xyz: [0.25, 0.25, 0.25] },
    ],
    source: join(mem(NBS), 'origin choice 2: Cu at 4b (0,0,0), O at 2a (1/4,1/4,1/4)', DEFAULT_B),
    temperatureK: 299,
  },
  {
    id: 'LaB6',
    name: 'lanthanum hexaboride',
    formula: 'LaB6',
    structureType: 'CaB6',
    spaceGroup: 'P m -3 m',
    cell: { a: 4.1569162 },
    sites: [
      { label: 'La1', element: 'La', xyz: [0, 0, 0] },
      { label: 'B1', element: 'B', xyz: [0.1995, 0.5, 0.5] },
    ],
    source: join(
      'a: NIST SRM 660a (lanthanum hexaboride powder, line position and line shape standard for powder diffraction), certificate value 0.41569162(97) nm at 22.5 degrees C (from memory). ' +
        'Later lots (SRM 660b, 660c) are certified with slightly different values: use the certificate of the lot in hand',
      mem(WYCKOFF_3, 'B at 6f (x,1/2,1/2), x = 0.1995'),
      DEFAULT_B,
    ),
    temperatureK: 295.65,
  },
  {
    id: 'W-beta',
    name: 'beta-tungsten (A15)',
    formula: 'W',
    structureType: 'A15 (Cr3Si)',
    spaceGroup: 'P m -3 n',
    cell: { a: 5.04 },
    sites: [
      { label: 'W1', element: 'W', xyz: [0, 0, 0] },
      { label: 'W2', element: 'W', xyz: [0.25, 0, 0.5] },
    ],
    source: join('a: about 5.04 Å, the metastable phase of sputtered tungsten films (from memory, approximate; the value varies with oxygen content)', DEFAULT_B),
  },
  l12({ id: 'Ni3Al', name: "nickel aluminide (gamma')", aA: 3.572, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'Al' }, { element: 'Ni' }),
  l12({ id: 'Cu3Au', name: 'ordered Cu3Au', aA: 3.7493, source: join(mem(WYCKOFF), DEFAULT_B) }, { element: 'Au' }, { element: 'Cu' }),
  {
    id: 'In2O3',
    name: 'indium oxide (bixbyite; the lattice of ITO)',
    formula: 'In2O3',
    structureType: 'bixbyite',
    spaceGroup: 'I a -3',
    cell: { a: 10.118 },
    sites: [
      { label: 'In1', element: 'In', xyz: [0.25, 0.25, 0.25] },
      { label: 'In2', element: 'In', xyz: [-0.0335, 0, 0.25] },
      { label: 'O1', element: 'O', xyz: [0.3905, 0.1529, 0.3832] },
    ],
    source: join(mem(NBS_MONO), mem(WYCKOFF_3, 'coordinates'), 'tin-doped films (ITO) have a slightly larger a', DEFAULT_B),
  },
  {
    id: 'Y2O3',
    name: 'yttrium oxide (bixbyite)',
    formula: 'Y2O3',
    structureType: 'bixbyite',
    spaceGroup: 'I a -3',
    cell: { a: 10.604 },
    sites: [
      { label: 'Y1', element: 'Y', xyz: [0.25, 0.25, 0.25] },
      { label: 'Y2', element: 'Y', xyz: [-0.0327, 0, 0.25] },
      { label: 'O1', element: 'O', xyz: [0.391, 0.152, 0.38] },
    ],
    source: join(mem(NBS_MONO), mem(WYCKOFF_3, 'coordinates'), DEFAULT_B),
  },

  // Non-cubic phases that films often contain (for matching; Annula's cubic indexing skips them).
  hcp({ id: 'Mg', name: 'magnesium', aA: 3.2094, cA: 5.2105, temperatureK: 298, source: join(mem(NBS, 'a, c'), DEFAULT_B) }),
  hcp({ id: 'Ti', name: 'alpha-titanium', aA: 2.9508, cA: 4.6855, source: join(mem(WYCKOFF, 'a, c'), DEFAULT_B) }),
  hcp({ id: 'Zn', name: 'zinc', aA: 2.6649, cA: 4.9468, temperatureK: 299, source: join(mem(NBS, 'a, c'), DEFAULT_B) }),
  hcp({ id: 'Co-hcp', element: 'Co', name: 'alpha-cobalt (hcp)', aA: 2.5071, cA: 4.0695, source: join(mem(WYCKOFF, 'a, c'), DEFAULT_B) }),
  wurtzite({ id: 'ZnO', name: 'zinc oxide (zincite)', aA: 3.2498, cA: 5.2066, temperatureK: 299, source: join(mem(NBS, 'a, c'), mem(WYCKOFF, 'u = 0.3819'), DEFAULT_B) }, { element: 'Zn' }, O, 0.3819),
  wurtzite({ id: 'GaN', name: 'gallium nitride (wurtzite)', aA: 3.189, cA: 5.185, temperatureK: 300, source: join(mem(MADELUNG, 'a, c, u = 0.377'), DEFAULT_B) }, { element: 'Ga' }, N, 0.377),
  wurtzite({ id: 'AlN', name: 'aluminium nitride (wurtzite)', aA: 3.112, cA: 4.982, temperatureK: 300, source: join(mem(MADELUNG, 'a, c, u = 0.382'), DEFAULT_B) }, { element: 'Al' }, N, 0.382),
  {
    id: 'TiO2-rutile',
    name: 'titanium dioxide (rutile)',
    formula: 'TiO2',
    structureType: 'rutile',
    spaceGroup: 'P 42/m n m',
    cell: { a: 4.5933, c: 2.9592 },
    sites: [
      { label: 'Ti1', element: 'Ti', xyz: [0, 0, 0] },
      { label: 'O1', element: 'O', xyz: [0.3048, 0.3048, 0] },
    ],
    source: join(mem(NBS_MONO, 'a, c'), mem(WYCKOFF, 'O at 4f (x,x,0), x = 0.3048'), DEFAULT_B),
    temperatureK: 298,
  },
  {
    id: 'TiO2-anatase',
    name: 'titanium dioxide (anatase)',
    formula: 'TiO2',
    structureType: 'anatase',
    spaceGroup: 'I 41/a m d:1',
    cell: { a: 3.7852, c: 9.5139 },
    sites: [
      { label: 'Ti1', element: 'Ti', xyz: [0, 0, 0] },
      { label: 'O1', element: 'O', xyz: [0, 0, 0.2081] },
    ],
    source: join(mem(NBS, 'a, c'), mem(WYCKOFF, 'origin choice 1, Ti at 4a (0,0,0), O at 8e (0,0,z), z = 0.2081'), DEFAULT_B),
    temperatureK: 298,
  },
  {
    id: 'Al2O3-corundum',
    name: 'aluminium oxide (corundum, alpha-alumina)',
    formula: 'Al2O3',
    structureType: 'corundum',
    spaceGroup: 'R -3 c:H',
    cell: { a: 4.7589, c: 12.991 },
    sites: [
      { label: 'Al1', element: 'Al', xyz: [0, 0, 0.35216] },
      { label: 'O1', element: 'O', xyz: [0.30624, 0, 0.25] },
    ],
    source: join(
      mem(NBS, 'a, c (hexagonal axes)'),
      'corundum is also certified as NIST SRM 676-series powders: use the certificate when calibrating with it',
      mem(WYCKOFF_3, 'Al at 12c (0,0,z), z = 0.35216; O at 18e (x,0,1/4), x = 0.30624'),
      DEFAULT_B,
    ),
    temperatureK: 299,
  },
  {
    id: 'C-graphite',
    name: 'graphite (hexagonal, 2H)',
    formula: 'C',
    structureType: 'graphite',
    spaceGroup: 'P 63/m m c',
    cell: { a: 2.464, c: 6.711 },
    sites: [
      { label: 'C1', element: 'C', xyz: [0, 0, 0.25] },
      { label: 'C2', element: 'C', xyz: [1 / 3, 2 / 3, 0.25] },
    ],
    source: join(mem(WYCKOFF, 'a, c'), DEFAULT_B),
  },
];
