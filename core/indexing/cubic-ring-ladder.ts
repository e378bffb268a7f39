/**
 * The ring sequence of a cubic structure: every N = h^2 + k^2 + l^2 whose
 * reflections survive the structure factor (see cubic-structure.ts), with the
 * reflection families that share it. A cubic ring of edge a sits at
 *
 *   d = a / sqrt(N),   Q = 1 / d^2 = N / a^2
 *
 * (International Tables for Crystallography Vol. A, the cubic metric; any
 * text on powder diffraction, e.g. B. D. Cullity, Elements of X-Ray
 * Diffraction, ch. 10).
 *
 * Some N hold two families, which a powder ring cannot tell apart: N = 9
 * (3 0 0 and 2 2 1), N = 27 (5 1 1 and 3 3 3). All are kept. Some N hold
 * none at all: N = 4^p (8q + 7) is no sum of three squares (Legendre's
 * three-square theorem), so even cP has no ring at N = 7, 15, 23, 28, ...
 */

import type { Hkl } from '../crystal/hkl';
import { isReflectionAllowed, normalisedStructureFactorSquared, type CubicStructure } from './cubic-structure';

/** One family of equivalent reflections, written h >= k >= l >= 0. */
export interface CubicFamily {
  hkl: Hkl;
  /** Number of equivalent hkl under the Laue group m-3m (sign changes and permutations). */
  multiplicity: number;
  /** |F|^2 of the structure with unit point scatterers, divided by its largest possible value. */
  fSquaredNormalised: number;
}

/** One allowed N and its families, families ordered by decreasing h, then k. */
export interface CubicRingOrder {
  n: number;
  families: readonly CubicFamily[];
}

/** Largest N the ladder is built to (indices up to 100): beyond it a trial cell is too large to mean anything. */
export const MAX_CUBIC_N = 10_000;

/** Number of distinct hkl generated from (h, k, l) by the 48 operations of m-3m. */
export function cubicMultiplicity(hkl: Hkl): number {
  const [h, k, l] = hkl;
  const seen = new Set<string>();
  const perms: Array<[number, number, number]> = [
    [h, k, l], [h, l, k], [k, h, l], [k, l, h], [l, h, k], [l, k, h],
  ];
  for (const [x, y, z] of perms) {
    for (const sx of [1, -1]) for (const sy of [1, -1]) for (const sz of [1, -1]) seen.add(`${sx * x},${sy * y},${sz * z}`);
  }
  return seen.size;
}

const cache = new Map<CubicStructure, { nMax: number; orders: CubicRingOrder[] }>();

function build(structure: CubicStructure, nMax: number): CubicRingOrder[] {
  const byN = new Map<number, CubicFamily[]>();
  const hMax = Math.floor(Math.sqrt(nMax));
  for (let h = 1; h <= hMax; h++) {
    for (let k = 0; k <= h; k++) {
      for (let l = 0; l <= k; l++) {
        const n = h * h + k * k + l * l;
        if (n > nMax) break;
        const hkl: Hkl = [h, k, l];
        if (!isReflectionAllowed(structure, hkl)) continue;
        const family: CubicFamily = {
          hkl,
          multiplicity: cubicMultiplicity(hkl),
          fSquaredNormalised: normalisedStructureFactorSquared(structure, hkl),
        };
        const list = byN.get(n);
        if (list) list.push(family);
        else byN.set(n, [family]);
      }
    }
  }
  return [...byN.entries()]
    .sort((x, y) => x[0] - y[0])
    .map(([n, families]) => ({
      n,
      families: families.sort((x, y) => y.hkl[0] - x.hkl[0] || y.hkl[1] - x.hkl[1]),
    }));
}

/**
 * The allowed N of `structure` up to `nMax`, ascending, each with its families.
 * Results are cached per structure and shared: do not mutate them.
 * @param nMax largest N wanted, 1 <= nMax <= MAX_CUBIC_N
 * @throws RangeError when nMax is outside that range
 */
export function cubicRingLadder(structure: CubicStructure, nMax: number): readonly CubicRingOrder[] {
  if (!(nMax >= 1 && nMax <= MAX_CUBIC_N)) {
    throw new RangeError(`nMax must lie in [1, ${MAX_CUBIC_N}]; got ${nMax}`);
  }
  let entry = cache.get(structure);
  if (!entry || entry.nMax < nMax) {
    const grown = Math.min(MAX_CUBIC_N, Math.max(Math.ceil(nMax), 2 * (entry?.nMax ?? 0), 200));
    entry = { nMax: grown, orders: build(structure, grown) };
    cache.set(structure, entry);
  }
  const orders = entry.orders;
  // Binary search for the first order beyond nMax.
  let lo = 0;
  let hi = orders.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (orders[mid]!.n <= nMax) lo = mid + 1;
    else hi = mid;
  }
  return orders.slice(0, lo);
}

/** Just the allowed N of `structure` up to `nMax`, ascending. */
export function allowedCubicN(structure: CubicStructure, nMax: number): number[] {
  return cubicRingLadder(structure, nMax).map((o) => o.n);
}
