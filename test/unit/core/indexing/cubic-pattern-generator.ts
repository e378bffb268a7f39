/**
 * Invented cubic ring patterns for tests, built from the reflection conditions
 * as International Tables for Crystallography Vol. A states them, written out
 * here independently of core/indexing's structure-factor derivation:
 *   cP  no condition
 *   cI  hkl: h + k + l = 2n
 *   cF  hkl: h + k, h + l, k + l = 2n (all even or all odd)
 *   diamond (F d -3 m, site 8a): cF and, in addition, hkl: h = 2n + 1 or h + k + l = 4n
 */
import type { CubicStructure } from '../../../../core/indexing';
import { gaussian } from '../../../support/seeded-random';

export function allowedByTables(structure: CubicStructure, h: number, k: number, l: number): boolean {
  const allEven = h % 2 === 0 && k % 2 === 0 && l % 2 === 0;
  const allOdd = h % 2 === 1 && k % 2 === 1 && l % 2 === 1;
  switch (structure) {
    case 'primitive':
      return true;
    case 'bcc':
      return (h + k + l) % 2 === 0;
    case 'fcc':
      return allEven || allOdd;
    case 'diamond':
      return allOdd || (allEven && (h + k + l) % 4 === 0);
  }
}

/** |F / f|^2 for point atoms: the number of lattice points (times the basis factor) squared. */
function latticeFactor(structure: CubicStructure, h: number, k: number, l: number): number {
  switch (structure) {
    case 'primitive':
      return 1;
    case 'bcc':
      return 4;
    case 'fcc':
      return 16;
    case 'diamond':
      // 16 |1 + i^(h+k+l)|^2: 32 for all-odd, 64 for all-even with h+k+l = 4n.
      return (h + k + l) % 2 === 1 ? 32 : 64;
  }
}

/** Multiplicity of {hkl} under m-3m, by counting distinct signed permutations. */
function multiplicity(h: number, k: number, l: number): number {
  const s = new Set<string>();
  for (const [x, y, z] of [[h, k, l], [h, l, k], [k, h, l], [k, l, h], [l, h, k], [l, k, h]] as const) {
    for (const a of [1, -1]) for (const b of [1, -1]) for (const c of [1, -1]) s.add(`${a * x} ${b * y} ${c * z}`);
  }
  return s.size;
}

export interface TrueRing {
  n: number;
  dA: number;
  /** Kinematic weight m |F|^2 d^2 with f(s) = exp(-B s^2), s = 1/(2d). */
  weight: number;
}

/** Allowed rings of a cubic structure of edge aA, in order of decreasing d, up to N = nMax. */
export function trueRings(structure: CubicStructure, aA: number, nMax: number, bA2 = 2): TrueRing[] {
  const byN = new Map<number, number>();
  for (let h = 1; h * h <= nMax; h++) {
    for (let k = 0; k <= h; k++) {
      for (let l = 0; l <= k; l++) {
        const n = h * h + k * k + l * l;
        if (n > nMax || !allowedByTables(structure, h, k, l)) continue;
        byN.set(n, (byN.get(n) ?? 0) + multiplicity(h, k, l) * latticeFactor(structure, h, k, l));
      }
    }
  }
  return [...byN.entries()]
    .sort((x, y) => x[0] - y[0])
    .map(([n, mF2]) => {
      const dA = aA / Math.sqrt(n);
      const s = 1 / (2 * dA);
      const f = Math.exp(-bA2 * s * s);
      return { n, dA, weight: mF2 * f * f * dA * dA };
    });
}

export interface NoisyCase {
  structure: CubicStructure;
  aA: number;
  rings: Array<{ dA: number; dSigmaA: number }>;
  /** N of each true ring kept (spurious ring excluded). */
  keptN: number[];
  spuriousDA: number;
}

/**
 * One random case of the property test: the first `count` allowed rings, the weak ones
 * (weight below `weakFraction` of the strongest among them) dropped, relative noise on d,
 * sigma = relNoise d, and one spurious ring uniform in d over the kept range.
 */
export function noisyCase(
  rand: () => number,
  structure: CubicStructure,
  aA: number,
  count: number,
  relNoise = 0.002,
  weakFraction = 0.02,
): NoisyCase {
  const all = trueRings(structure, aA, 400).slice(0, count);
  const strongest = Math.max(...all.map((r) => r.weight));
  const kept = all.filter((r) => r.weight >= weakFraction * strongest);
  const rings = kept.map((r) => {
    const dA = r.dA * (1 + relNoise * gaussian(rand));
    return { dA, dSigmaA: relNoise * dA };
  });
  const dMax = kept[0]!.dA;
  const dMin = kept[kept.length - 1]!.dA;
  const spuriousDA = dMin + (dMax - dMin) * rand();
  rings.push({ dA: spuriousDA, dSigmaA: relNoise * spuriousDA });
  // Shuffle so that ring order carries no hint.
  for (let i = rings.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [rings[i], rings[j]] = [rings[j]!, rings[i]!];
  }
  return { structure, aA, rings, keptN: kept.map((r) => r.n), spuriousDA };
}
