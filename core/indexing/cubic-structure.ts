/**
 * The four cubic structures the lattice indexer tries, each described by what
 * decides its ring sequence: the centring translations of its Bravais lattice
 * and, for diamond, the two-atom basis on site 8a of F d -3 m (origin choice 1:
 * 0,0,0 and 1/4,1/4,1/4 plus the F centring). International Tables for
 * Crystallography Vol. A, Table 1.2.1.1 (centring vectors of P, I, F) and the
 * space-group table of F d -3 m (No. 227).
 *
 * Allowed reflections are derived from the kinematic structure factor of
 * identical point scatterers,
 *
 *   F(hkl) = sum_t sum_b exp(2 pi i (h, k, l) . (t + b)),
 *
 * never from a hand-written list of allowed h^2 + k^2 + l^2.
 */

import type { Hkl } from '../crystal/hkl';

/** Bravais symbol of a cubic lattice. */
export type CubicLattice = 'cP' | 'cI' | 'cF';

/** Structure the indexer can name from ring positions alone. */
export type CubicStructure = 'primitive' | 'bcc' | 'fcc' | 'diamond';

type Vector3 = readonly [number, number, number];

interface CubicStructureDefinition {
  lattice: CubicLattice;
  /** Centring translations of the conventional cell (fractions of a). */
  centring: readonly Vector3[];
  /** Atom positions of the basis attached to each lattice point. */
  basis: readonly Vector3[];
  /** Lattice points per conventional cell (for the primitive-cell volume). */
  pointsPerCell: number;
}

const ORIGIN: Vector3 = [0, 0, 0];
const F_CENTRING: readonly Vector3[] = [ORIGIN, [0, 0.5, 0.5], [0.5, 0, 0.5], [0.5, 0.5, 0]];

const DEFINITIONS: Readonly<Record<CubicStructure, CubicStructureDefinition>> = {
  primitive: { lattice: 'cP', centring: [ORIGIN], basis: [ORIGIN], pointsPerCell: 1 },
  bcc: { lattice: 'cI', centring: [ORIGIN, [0.5, 0.5, 0.5]], basis: [ORIGIN], pointsPerCell: 2 },
  fcc: { lattice: 'cF', centring: F_CENTRING, basis: [ORIGIN], pointsPerCell: 4 },
  diamond: { lattice: 'cF', centring: F_CENTRING, basis: [ORIGIN, [0.25, 0.25, 0.25]], pointsPerCell: 4 },
};

/** Every structure the indexer tries, in the order used for ties and listings. */
export const CUBIC_STRUCTURES: readonly CubicStructure[] = ['primitive', 'bcc', 'fcc', 'diamond'];

/** Bravais lattice of a cubic structure ('diamond' -> 'cF'). */
export function latticeOf(structure: CubicStructure): CubicLattice {
  return definition(structure).lattice;
}

/** Lattice points in the conventional cell (1 for cP, 2 for cI, 4 for cF). */
export function latticePointsPerCell(structure: CubicStructure): number {
  return definition(structure).pointsPerCell;
}

function definition(structure: CubicStructure): CubicStructureDefinition {
  const d = DEFINITIONS[structure];
  if (d === undefined) {
    throw new RangeError(`structure must be one of ${CUBIC_STRUCTURES.join(', ')}; got ${String(structure)}`);
  }
  return d;
}

/**
 * |F(hkl)|^2 of the structure with unit point scatterers, normalised so that
 * the largest possible value (all terms in phase) is 1.
 */
export function normalisedStructureFactorSquared(structure: CubicStructure, hkl: Hkl): number {
  const { centring, basis } = definition(structure);
  let re = 0;
  let im = 0;
  for (const t of centring) {
    for (const b of basis) {
      const phase = 2 * Math.PI * (hkl[0] * (t[0] + b[0]) + hkl[1] * (t[1] + b[1]) + hkl[2] * (t[2] + b[2]));
      re += Math.cos(phase);
      im += Math.sin(phase);
    }
  }
  const terms = centring.length * basis.length;
  return (re * re + im * im) / (terms * terms);
}

/**
 * Threshold below which a normalised |F|^2 counts as zero. The exact values
 * are 0 or at least 1/8 (diamond's odd reflections give |1 + i|^2 / 4 = 1/2;
 * nothing here comes near 1e-9), so the threshold only absorbs round-off
 * of the cosines, about 1e-15 for indices up to 100.
 */
const ABSENT_BELOW = 1e-9;

/** True when the structure factor of `hkl` does not vanish. */
export function isReflectionAllowed(structure: CubicStructure, hkl: Hkl): boolean {
  return normalisedStructureFactorSquared(structure, hkl) > ABSENT_BELOW;
}
