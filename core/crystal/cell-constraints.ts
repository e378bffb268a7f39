/**
 * How a space group constrains its conventional cell, and the check that a cell
 * has the symmetry of a set of operations.
 *
 * Conventional cells of the crystal systems (International Tables for
 * Crystallography Vol. A, ch. 2.1, Table 2.1.2.1, "crystal families, crystal
 * systems, conventional cell parameters"):
 *
 *   cubic          a = b = c,  alpha = beta = gamma = 90
 *   tetragonal     a = b,      alpha = beta = gamma = 90
 *   orthorhombic               alpha = beta = gamma = 90
 *   hexagonal and trigonal on hexagonal axes   a = b, alpha = beta = 90, gamma = 120
 *   trigonal on rhombohedral axes (":R")       a = b = c, alpha = beta = gamma
 *   monoclinic     the two angles other than the one about the unique axis are 90
 *   triclinic      none
 *
 * A cell has the symmetry of an operation {R | t} exactly when the operation
 * preserves lengths, i.e. when its rotation leaves the metric tensor unchanged:
 *
 *   R^T G R = G      (International Tables Vol. A, ch. 1.3, "General introduction
 *                     to space groups", the metric-invariance condition)
 *
 * `cellSymmetryMismatch` tests that for every operation, so a cell read from a CIF
 * can be checked against the file's own operations whatever their setting.
 */

import type { CrystalSystem, SpaceGroupSetting } from './space-group';
import { formatSymmetryOperation, type SymmetryOperation } from './symmetry-operation';
import { metricTensor, type UnitCell } from './unit-cell';

export type CellParameter = 'a' | 'b' | 'c' | 'alpha' | 'beta' | 'gamma';

/** Cell parameters as a user writes them: lengths in Å, angles in degrees; any may be left out. */
export type CellShorthand = Partial<Record<CellParameter, number>>;

export const CELL_PARAMETERS: readonly CellParameter[] = ['a', 'b', 'c', 'alpha', 'beta', 'gamma'];

type Dependent = { same: CellParameter } | { value: number };

/** The free parameters of a setting's conventional cell and how the others follow from them. */
export interface CellRule {
  /** Crystal system, with "rhombohedral axes" for the ':R' settings of trigonal groups. */
  system: CrystalSystem | 'trigonal (rhombohedral axes)';
  /** Parameters a user must give, in the order a, b, c, alpha, beta, gamma. */
  free: CellParameter[];
  /** How each other parameter follows: equal to a free one, or a fixed angle. */
  dependent: Partial<Record<CellParameter, Dependent>>;
  /** The rule in words, e.g. "a = b, alpha = beta = 90, gamma = 120". */
  description: string;
}

const right = { value: 90 } as const;

/**
 * Unique axis of a monoclinic group (0 = a, 1 = b, 2 = c) from its operations: the
 * 2-fold rotation or the mirror has a diagonal rotation part whose odd-signed entry
 * marks the axis (2 along b: diag(-1, 1, -1); m normal to b: diag(1, -1, 1)).
 */
export function monoclinicUniqueAxis(operations: readonly SymmetryOperation[]): 0 | 1 | 2 {
  for (const op of operations) {
    const r = op.rotation;
    const diagonal = r[1] === 0 && r[2] === 0 && r[3] === 0 && r[5] === 0 && r[6] === 0 && r[7] === 0;
    if (!diagonal) continue;
    const d = [r[0]!, r[4]!, r[8]!];
    const plus = d.filter((v) => v === 1).length;
    if (plus === 1) return d.indexOf(1) as 0 | 1 | 2;
    if (plus === 2) return d.indexOf(-1) as 0 | 1 | 2;
  }
  throw new RangeError('monoclinic operations have no 2-fold axis or mirror along a cell axis; cannot tell the unique axis');
}

/**
 * The cell rule of a space-group setting.
 *
 * @param setting from findSpaceGroup; its crystal system, its ':R' suffix (rhombohedral
 *   axes) and, for monoclinic groups, its operations (the unique axis) are used
 * @param operations the parsed operations of the setting (needed for monoclinic groups)
 */
export function cellRuleFor(setting: SpaceGroupSetting, operations: readonly SymmetryOperation[]): CellRule {
  switch (setting.crystalSystem) {
    case 'cubic':
      return {
        system: 'cubic',
        free: ['a'],
        dependent: { b: { same: 'a' }, c: { same: 'a' }, alpha: right, beta: right, gamma: right },
        description: 'a = b = c, alpha = beta = gamma = 90',
      };
    case 'tetragonal':
      return {
        system: 'tetragonal',
        free: ['a', 'c'],
        dependent: { b: { same: 'a' }, alpha: right, beta: right, gamma: right },
        description: 'a = b, alpha = beta = gamma = 90',
      };
    case 'orthorhombic':
      return {
        system: 'orthorhombic',
        free: ['a', 'b', 'c'],
        dependent: { alpha: right, beta: right, gamma: right },
        description: 'alpha = beta = gamma = 90',
      };
    case 'hexagonal':
    case 'trigonal':
      if (setting.hermannMauguin.toUpperCase().endsWith(':R')) {
        return {
          system: 'trigonal (rhombohedral axes)',
          free: ['a', 'alpha'],
          dependent: { b: { same: 'a' }, c: { same: 'a' }, beta: { same: 'alpha' }, gamma: { same: 'alpha' } },
          description: 'a = b = c, alpha = beta = gamma',
        };
      }
      return {
        system: setting.crystalSystem,
        free: ['a', 'c'],
        dependent: { b: { same: 'a' }, alpha: right, beta: right, gamma: { value: 120 } },
        description: 'a = b, alpha = beta = 90, gamma = 120',
      };
    case 'monoclinic': {
      const axis = monoclinicUniqueAxis(operations);
      const angles: CellParameter[] = ['alpha', 'beta', 'gamma'];
      const free = angles[axis]!;
      const fixed = angles.filter((x) => x !== free);
      return {
        system: 'monoclinic',
        free: ['a', 'b', 'c', free],
        dependent: { [fixed[0]!]: right, [fixed[1]!]: right },
        description: `unique axis ${'abc'[axis]}: ${fixed[0]} = ${fixed[1]} = 90`,
      };
    }
    case 'triclinic':
      return { system: 'triclinic', free: [...CELL_PARAMETERS], dependent: {}, description: 'no constraint' };
  }
}

/** Relative tolerance for a length given redundantly (b of a cubic cell), and degrees for an angle. */
const LENGTH_RELATIVE_TOLERANCE = 1e-6;
const ANGLE_TOLERANCE_DEG = 1e-4;

/**
 * Completes a cell from the parameters a user gave, following the rule of the
 * space group: `{ a: 4.0782 }` for a cubic group, `{ a, c }` for a tetragonal,
 * hexagonal or trigonal one, `{ a, alpha }` on rhombohedral axes, `{ a, b, c, beta }`
 * for a monoclinic group with unique axis b, all six for a triclinic group.
 * Redundant parameters may be given when they agree with the rule (to 1e-6
 * relative for lengths, 1e-4 degrees for angles).
 *
 * @throws RangeError whose message starts with the field (`cell.c ...`) when a free
 *   parameter is missing or a redundant one contradicts the rule; the message names
 *   the crystal system, the space group and the parameters to give.
 */
export function completeCell(given: CellShorthand, setting: SpaceGroupSetting, rule: CellRule): UnitCell {
  const group = `${rule.system} space group ${setting.hermannMauguin}`;
  const missing = rule.free.filter((p) => given[p] === undefined);
  if (missing.length > 0) {
    throw new RangeError(
      `cell.${missing[0]} is missing: a ${group} needs ${rule.free.join(', ')} (${rule.description}); ` +
        `give ${missing.join(', ')}`,
    );
  }
  const out = {} as Record<CellParameter, number>;
  for (const p of rule.free) out[p] = given[p]!;
  for (const p of CELL_PARAMETERS) {
    const dep = rule.dependent[p];
    if (!dep) continue;
    out[p] = 'same' in dep ? out[dep.same] : dep.value;
  }
  for (const p of CELL_PARAMETERS) {
    const dep = rule.dependent[p];
    const value = given[p];
    if (!dep || value === undefined) continue;
    const isAngle = p === 'alpha' || p === 'beta' || p === 'gamma';
    const agrees = isAngle
      ? Math.abs(value - out[p]) <= ANGLE_TOLERANCE_DEG
      : Math.abs(value - out[p]) <= LENGTH_RELATIVE_TOLERANCE * out[p];
    if (!agrees) {
      const why = 'same' in dep ? `${p} = ${dep.same} = ${out[p]}` : `${p} = ${dep.value}`;
      throw new RangeError(
        `cell.${p} = ${value} contradicts the ${group} (${rule.description}, so ${why}); ` +
          `give only ${rule.free.join(', ')}, or choose the space group that fits the cell`,
      );
    }
  }
  return { aA: out.a, bA: out.b, cA: out.c, alphaDeg: out.alpha, betaDeg: out.beta, gammaDeg: out.gamma };
}

/**
 * Checks that `cell` has the symmetry of every operation: R^T G R = G for each
 * rotation R, to `relativeTolerance` times the largest diagonal element of G.
 *
 * @param relativeTolerance default 1e-3: a CIF's a = b or gamma = 120 written to
 *   four or five figures passes, a cell that is off by 0.1 % or more does not
 * @returns undefined when the cell fits; otherwise a sentence naming the first
 *   operation that changes the metric and by how much (relative)
 */
export function cellSymmetryMismatch(
  cell: UnitCell,
  operations: readonly SymmetryOperation[],
  relativeTolerance = 1e-3,
): string | undefined {
  const g = metricTensor(cell);
  const scale = Math.max(g[0], g[4], g[8]);
  for (const op of operations) {
    const r = op.rotation;
    let worst = 0;
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        // (R^T G R)_ij = sum_kl R_ki G_kl R_lj
        let v = 0;
        for (let k = 0; k < 3; k++) {
          for (let l = 0; l < 3; l++) v += r[3 * k + i]! * g[3 * k + l]! * r[3 * l + j]!;
        }
        worst = Math.max(worst, Math.abs(v - g[3 * i + j]!) / scale);
      }
    }
    if (worst > relativeTolerance) {
      return (
        `the cell (a = ${cell.aA}, b = ${cell.bA}, c = ${cell.cA} Å, alpha = ${cell.alphaDeg}, beta = ${cell.betaDeg}, ` +
        `gamma = ${cell.gammaDeg} degrees) does not have the symmetry of operation ${formatSymmetryOperation(op)} ` +
        `(it changes the metric tensor by ${worst.toExponential(1)} relative)`
      );
    }
  }
  return undefined;
}
