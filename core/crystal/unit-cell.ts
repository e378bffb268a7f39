/**
 * Unit cell geometry for any crystal system: direct and reciprocal metric
 * tensors and interplanar spacings.
 *
 *   G   = [[a.a, a.b, a.c], [b.a, b.b, b.c], [c.a, c.b, c.c]]   (Å^2)
 *   G*  = G^-1                                                  (Å^-2)
 *   1/d_hkl^2 = (h k l) G* (h k l)^T
 *   V   = sqrt(det G)
 * (International Tables for Crystallography Vol. B, ch. 1.1, "Reciprocal space
 * in crystallography"; the same relations in Giacovazzo et al., Fundamentals of
 * Crystallography, ch. 2.)
 */

import { det, inv } from 'mathjs';
import type { Hkl } from './hkl';

export interface UnitCell {
  aA: number;
  bA: number;
  cA: number;
  alphaDeg: number;
  betaDeg: number;
  gammaDeg: number;
}

/** Symmetric 3x3 matrix, row-major. */
export type Matrix3 = readonly [number, number, number, number, number, number, number, number, number];

const DEG = Math.PI / 180;

/** A cubic cell of edge `aA` Å. */
export function cubicCell(aA: number): UnitCell {
  return { aA, bA: aA, cA: aA, alphaDeg: 90, betaDeg: 90, gammaDeg: 90 };
}

/** Cos of an angle given in degrees, with exact zeros at 90 degrees (avoids 6e-17 terms). */
function cosDeg(angleDeg: number): number {
  return angleDeg === 90 ? 0 : Math.cos(angleDeg * DEG);
}

/** Checks that the six parameters describe a real cell; throws naming the bad parameter. */
export function validateUnitCell(cell: UnitCell): void {
  for (const key of ['aA', 'bA', 'cA'] as const) {
    if (!(cell[key] > 0) || !Number.isFinite(cell[key])) {
      throw new RangeError(`unit cell ${key} must be a positive length in Å; got ${cell[key]}`);
    }
  }
  for (const key of ['alphaDeg', 'betaDeg', 'gammaDeg'] as const) {
    if (!(cell[key] > 0 && cell[key] < 180)) {
      throw new RangeError(`unit cell ${key} must lie strictly between 0 and 180 degrees; got ${cell[key]}`);
    }
  }
  const g = metricTensor(cell);
  if (!(det(toRows(g)) > 0)) {
    throw new RangeError('unit cell angles do not describe a three-dimensional cell (the metric tensor is not positive definite)');
  }
}

function toRows(m: Matrix3): number[][] {
  return [
    [m[0], m[1], m[2]],
    [m[3], m[4], m[5]],
    [m[6], m[7], m[8]],
  ];
}

/** Direct metric tensor G, Å^2. */
export function metricTensor(cell: UnitCell): Matrix3 {
  const { aA: a, bA: b, cA: c } = cell;
  const ca = cosDeg(cell.alphaDeg);
  const cb = cosDeg(cell.betaDeg);
  const cg = cosDeg(cell.gammaDeg);
  return [a * a, a * b * cg, a * c * cb, a * b * cg, b * b, b * c * ca, a * c * cb, b * c * ca, c * c];
}

/** Reciprocal metric tensor G* = G^-1, Å^-2. Validates the cell first. */
export function reciprocalMetricTensor(cell: UnitCell): Matrix3 {
  validateUnitCell(cell);
  const r = inv(toRows(metricTensor(cell))) as number[][];
  return [r[0]![0]!, r[0]![1]!, r[0]![2]!, r[1]![0]!, r[1]![1]!, r[1]![2]!, r[2]![0]!, r[2]![1]!, r[2]![2]!];
}

/** Cell volume V = sqrt(det G), Å^3. */
export function cellVolumeA3(cell: UnitCell): number {
  validateUnitCell(cell);
  return Math.sqrt(det(toRows(metricTensor(cell))));
}

/** 1/d^2 for indices `hkl` with a precomputed reciprocal metric, Å^-2. */
export function inverseDSquaredPerA2(hkl: Hkl, gStar: Matrix3): number {
  const [h, k, l] = hkl;
  return (
    h * h * gStar[0] + k * k * gStar[4] + l * l * gStar[8] +
    2 * (h * k * gStar[1] + h * l * gStar[2] + k * l * gStar[5])
  );
}

/** Interplanar spacing d_hkl, Å. Throws for (0 0 0). */
export function dSpacingA(cell: UnitCell, hkl: Hkl): number {
  if (hkl[0] === 0 && hkl[1] === 0 && hkl[2] === 0) throw new RangeError('(0 0 0) has no interplanar spacing');
  return 1 / Math.sqrt(inverseDSquaredPerA2(hkl, reciprocalMetricTensor(cell)));
}
