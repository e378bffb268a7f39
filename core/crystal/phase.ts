/**
 * A crystalline phase as the rest of Annula sees it: a cell, a space group
 * (by its operations) and the atoms of the asymmetric unit. Library phases,
 * phases described in JSON and phases read from CIF all become this shape.
 */

import type { UnitCell } from './unit-cell';

/** One atom site of the asymmetric unit. */
export interface AtomSite {
  /** Site label as given by the source (e.g. "Au1"). */
  label: string;
  /** Element symbol, capitalised as in the periodic table ("Au", "O"). Ionic charges are dropped. */
  element: string;
  /** Fractional coordinates. */
  x: number;
  y: number;
  z: number;
  /** Site occupancy, 0 < occupancy <= 1. */
  occupancy: number;
  /** Isotropic displacement parameter B = 8 pi^2 <u^2>, Å^2 (convert U with B = 8 pi^2 U). */
  bIsoA2: number;
}

/** Where a phase description came from. */
export type PhaseOrigin = 'library' | 'json' | 'cif';

export interface Phase {
  /** Short identifier used on the command line ("Au", "TiN", "MgAl2O4"); unique in a library. */
  id: string;
  /** Human name ("gold", "titanium nitride"). */
  name: string;
  /** Chemical formula of the formula unit, e.g. "MgAl2O4". */
  formula: string;
  /** Structure-type label ("fcc", "bcc", "diamond", "rock salt", ...), or "" when none applies. */
  structureType: string;
  /** Hermann-Mauguin symbol of the space group in the setting the sites use, e.g. "F m -3 m". */
  spaceGroup: string;
  /** Symmetry operations in 'x,y,z' notation, the full list including centring translations. */
  symmetryOperations: string[];
  cell: UnitCell;
  sites: AtomSite[];
  /** Citation for the lattice constant(s) (and the structure where it matters). */
  source: string;
  /** Temperature the lattice constant refers to, K, when the source states one. */
  temperatureK?: number;
  origin: PhaseOrigin;
}
