/**
 * Phases for the crystal tests. Lattice constants and coordinates are handbook values
 * quoted from memory (they are inputs: the tests compare Annula with gemmi, or with
 * symmetry rules, for these same inputs), or invented where the name says so.
 */
import { findSpaceGroup, type AtomSite, type Phase, type UnitCell } from '../../../../core/crystal';

type SiteSpec = [label: string, element: string, x: number, y: number, z: number, occupancy?: number, bIsoA2?: number];

export function makePhase(id: string, spaceGroup: string, cell: UnitCell, sites: SiteSpec[]): Phase {
  const sg = findSpaceGroup(spaceGroup);
  if (!sg) throw new Error(`test fixture: unknown space group ${spaceGroup}`);
  return {
    id,
    name: id,
    formula: id,
    structureType: '',
    spaceGroup: sg.hermannMauguin,
    symmetryOperations: sg.operations,
    cell,
    sites: sites.map(([label, element, x, y, z, occupancy = 1, bIsoA2 = 0]): AtomSite => ({
      label, element, x, y, z, occupancy, bIsoA2,
    })),
    source: 'test fixture',
    origin: 'json',
  };
}

const cubic = (a: number): UnitCell => ({ aA: a, bA: a, cA: a, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });
const hexagonal = (a: number, c: number): UnitCell => ({ aA: a, bA: a, cA: c, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 });
const tetragonal = (a: number, c: number): UnitCell => ({ aA: a, bA: a, cA: c, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 });

// Lattice constants and coordinates from memory (common handbook values).
export const AU = makePhase('Au', 'Fm-3m', cubic(4.0782), [['Au1', 'Au', 0, 0, 0, 1, 0.62]]);
/** Si in origin choice 1 (Si at 8a = 0,0,0), gemmi's default for "Fd-3m". */
export const SI_ORIGIN_1 = makePhase('Si', 'Fd-3m', cubic(5.431), [['Si1', 'Si', 0, 0, 0, 1, 0.46]]);
/** Si in origin choice 2 (Si at 8a = 1/8,1/8,1/8). */
export const SI_ORIGIN_2 = makePhase('Si-o2', 'Fd-3m:2', cubic(5.431), [['Si1', 'Si', 0.125, 0.125, 0.125, 1, 0.46]]);
export const NACL = makePhase('NaCl', 'Fm-3m', cubic(5.6402), [
  ['Na1', 'Na', 0, 0, 0, 1, 1.6],
  ['Cl1', 'Cl', 0.5, 0.5, 0.5, 1, 1.2],
]);
export const GAAS = makePhase('GaAs', 'F-43m', cubic(5.6533), [
  ['Ga1', 'Ga', 0, 0, 0, 1, 0.6],
  ['As1', 'As', 0.25, 0.25, 0.25, 1, 0.5],
]);
export const CSCL = makePhase('CsCl', 'Pm-3m', cubic(4.123), [
  ['Cs1', 'Cs', 0, 0, 0, 1, 1.9],
  ['Cl1', 'Cl', 0.5, 0.5, 0.5, 1, 1.7],
]);
/** Spinel in origin choice 2: Mg 8a, Al 16d, O 32e with x = 0.2624. */
export const SPINEL = makePhase('MgAl2O4', 'Fd-3m:2', cubic(8.0831), [
  ['Mg1', 'Mg', 0.125, 0.125, 0.125, 1, 0.41],
  ['Al1', 'Al', 0.5, 0.5, 0.5, 1, 0.35],
  ['O1', 'O', 0.2624, 0.2624, 0.2624, 1, 0.52],
]);
export const MG = makePhase('Mg', 'P63/mmc', hexagonal(3.2094, 5.2107), [['Mg1', 'Mg', 1 / 3, 2 / 3, 0.25, 1, 1.5]]);
export const ZNO = makePhase('ZnO', 'P63mc', hexagonal(3.2498, 5.2066), [
  ['Zn1', 'Zn', 1 / 3, 2 / 3, 0, 1, 0.6],
  ['O1', 'O', 1 / 3, 2 / 3, 0.3819, 1, 0.7],
]);
export const RUTILE = makePhase('TiO2', 'P42/mnm', tetragonal(4.5937, 2.9587), [
  ['Ti1', 'Ti', 0, 0, 0, 1, 0.4],
  ['O1', 'O', 0.3048, 0.3048, 0, 1, 0.6],
]);
/** Disordered Cu3Au: Cu and Au share 4a with occupancies 0.75 and 0.25. */
export const CU3AU_DISORDERED = makePhase('Cu3Au-dis', 'Fm-3m', cubic(3.749), [
  ['Cu1', 'Cu', 0, 0, 0, 0.75, 0.8],
  ['Au1', 'Au', 0, 0, 0, 0.25, 0.8],
]);
/** Bi on hexagonal axes of R-3m: 6c at 0,0,z. */
export const BI = makePhase('Bi', 'R-3m', hexagonal(4.546, 11.862), [['Bi1', 'Bi', 0, 0, 0.2339, 1, 1.1]]);
/** Invented: a monoclinic P 1 21/c 1 phase with two atoms in general positions, beta = 104.3 deg. */
export const INVENTED_MONOCLINIC = makePhase(
  'invented-P21c',
  'P21/c',
  { aA: 5.12, bA: 6.07, cA: 7.33, alphaDeg: 90, betaDeg: 104.3, gammaDeg: 90 },
  [
    ['Zr1', 'Zr', 0.2754, 0.0395, 0.2083, 1, 0.3],
    ['O1', 'O', 0.07, 0.332, 0.345, 0.9, 0.6],
  ],
);
