/**
 * Reflection families of a phase: the hkl of a d range grouped into sets equivalent
 * under the Laue group, each with its multiplicity and kinematic |F|^2.
 *
 * Laue group: the distinct rotation parts R of the phase's operations together with
 * -R (Friedel's law, |F(-h)| = |F(h)| without anomalous scattering). hkl and h' = h R
 * have the same d and the same |F| (International Tables for Crystallography Vol. A,
 * ch. 10 "Point groups", whose tables of crystallographic forms give the
 * multiplicities as the numbers of faces of each form).
 *
 * Representative of a family (the rule, applied to all members of the orbit):
 *   1. the most indices >= 0;
 *   2. then the smallest |l|;
 *   3. then the lexicographically largest (h, k, l).
 * For the cubic Laue class m-3m this is the h >= k >= l >= 0 form ((2 2 0), (3 1 1));
 * for m-3 the two families of the same d stay apart as (2 1 0) and (1 2 0); for the
 * hexagonal and tetragonal classes it gives (1 0 0), (1 1 0), (1 0 1), (2 1 0), ...
 */

import type { Hkl } from './hkl';
import type { Phase } from './phase';
import type { ReflectionFamily } from './predicted-ring';
import { ELECTRON_SCATTERING_S_MAX_PER_A, evaluateElectronScatteringFactor } from './electron-scattering-factor';
import { preparedStructureOf, structureFactorA, type PreparedStructure } from './structure-factor';
import type { SymmetryOperation } from './symmetry-operation';
import { validateUnitCell } from './unit-cell';

/**
 * A family is absent (systematically or by accident of the structure) when
 * |F|^2 <= ABSENT_RELATIVE x |F_max(s)|^2, where F_max(s) = sum_j occ_j f_j(s) exp(-B_j s^2)
 * over every atom of the cell is the structure factor with all atoms scattering in
 * phase: the largest |F| any reflection at that s could have. The test depends
 * only on the reflection itself, not on which others are in range.
 */
export const ABSENT_RELATIVE = 1e-8;

export interface ReflectionFamilyOptions {
  /** Smallest d included, Å; >= 0.25 Å (the range of the electron scattering factors). */
  dMinA: number;
  /** Largest d included, Å; default: no limit. */
  dMaxA?: number;
  /** Keep families whose |F|^2 is absent (<= 1e-8 of the largest); default false. */
  includeAbsent?: boolean;
}

/**
 * The Laue group's matrices acting on hkl: distinct rotation parts of `operations` and
 * their negatives, each as 9 integers row-major (h' = h R).
 */
export function laueRotations(operations: readonly SymmetryOperation[]): Int32Array[] {
  const out = new Map<string, Int32Array>();
  for (const op of operations) {
    for (const sign of [1, -1]) {
      const r = Int32Array.from(op.rotation, (v) => sign * v);
      out.set(r.join(' '), r);
    }
  }
  return [...out.values()];
}

const rotationCache = new WeakMap<PreparedStructure, Int32Array[]>();

function laueRotationsOf(prepared: PreparedStructure): Int32Array[] {
  let r = rotationCache.get(prepared);
  if (!r) {
    r = laueRotations(prepared.operations);
    rotationCache.set(prepared, r);
  }
  return r;
}

/** True when a should be preferred to b as a family's representative (rule in the module comment). */
function nonNegativeCount(v: Hkl): number {
  return (v[0] >= 0 ? 1 : 0) + (v[1] >= 0 ? 1 : 0) + (v[2] >= 0 ? 1 : 0);
}

function betterRepresentative(a: Hkl, b: Hkl): boolean {
  const na = nonNegativeCount(a);
  const nb = nonNegativeCount(b);
  if (na !== nb) return na > nb;
  if (Math.abs(a[2]) !== Math.abs(b[2])) return Math.abs(a[2]) < Math.abs(b[2]);
  for (let i = 0; i < 3; i++) if (a[i] !== b[i]) return a[i]! > b[i]!;
  return false;
}

/**
 * The distinct images h R of `hkl` under `rotations` (the orbit; its length is the multiplicity).
 */
export function equivalentHkls(hkl: Hkl, rotations: readonly Int32Array[]): Hkl[] {
  const out: Hkl[] = [];
  const [h, k, l] = hkl;
  for (const r of rotations) {
    const img: Hkl = [h * r[0]! + k * r[3]! + l * r[6]!, h * r[1]! + k * r[4]! + l * r[7]!, h * r[2]! + k * r[5]! + l * r[8]!];
    if (!out.some((o) => o[0] === img[0] && o[1] === img[1] && o[2] === img[2])) out.push(img);
  }
  return out;
}

/** Representative of the family of `hkl` by the module's rule, and the family's multiplicity. */
export function familyRepresentative(hkl: Hkl, rotations: readonly Int32Array[]): { hkl: Hkl; multiplicity: number } {
  const orbit = equivalentHkls(hkl, rotations);
  let best = orbit[0]!;
  for (const v of orbit) if (betterRepresentative(v, best)) best = v;
  return { hkl: best, multiplicity: orbit.length };
}

function checkOptions(options: ReflectionFamilyOptions): { dMinA: number; dMaxA: number } {
  const { dMinA } = options;
  const dMaxA = options.dMaxA ?? Number.POSITIVE_INFINITY;
  const dFloorA = 1 / (2 * ELECTRON_SCATTERING_S_MAX_PER_A);
  if (!Number.isFinite(dMinA) || dMinA < dFloorA) {
    throw new RangeError(
      `dMinA must be a finite number of Å >= ${dFloorA} (the electron scattering factors are tabulated for sin(theta)/lambda <= 2 1/Å); got ${dMinA}`,
    );
  }
  if (!(dMaxA > dMinA)) throw new RangeError(`dMaxA must be larger than dMinA = ${dMinA} Å; got ${dMaxA}`);
  return { dMinA, dMaxA };
}

/** Orders by d descending; equal d (to 1e-12 relative) by representative hkl, largest first. */
export function compareByDDescending(a: { dA: number; hkl: Hkl }, b: { dA: number; hkl: Hkl }): number {
  if (Math.abs(a.dA - b.dA) > 1e-12 * Math.max(a.dA, b.dA)) return b.dA - a.dA;
  for (let i = 0; i < 3; i++) if (a.hkl[i] !== b.hkl[i]) return b.hkl[i]! - a.hkl[i]!;
  return 0;
}

/**
 * Every reflection family of `phase` with dMinA <= d <= dMaxA, sorted by d descending.
 *
 * Each family: the representative hkl (rule in the module comment), the Laue-group
 * multiplicity, d (Å) and |F|^2 (Å^2, kinematic, electron scattering factors, B
 * included). A family counts as absent when |F|^2 <= 1e-8 |F_max(s)|^2 (all atoms
 * in phase, see ABSENT_RELATIVE); absent families are dropped unless includeAbsent.
 * The phase is validated and expanded once and cached (see preparedStructureOf).
 *
 * @throws RangeError for dMinA < 0.25 Å or not finite, dMaxA <= dMinA, and for a phase
 *   that prepareStructure rejects.
 */
/** |F| with every atom of the cell scattering in phase at s (Å): the bound of any |F_hkl| there. */
function inPhaseLimitA(prepared: PreparedStructure, sPerA: number): number {
  const s2 = sPerA * sPerA;
  let sum = 0;
  for (const site of prepared.sites) {
    const f = evaluateElectronScatteringFactor(site.coefficients, s2);
    sum += site.occupancy * (site.positions.length / 3) * f * Math.exp(-site.bIsoA2 * s2);
  }
  return sum;
}

export function reflectionFamilies(phase: Phase, options: ReflectionFamilyOptions): ReflectionFamily[] {
  const { dMinA, dMaxA } = checkOptions(options);
  validateUnitCell(phase.cell);
  const prepared = preparedStructureOf(phase);
  const gs = prepared.reciprocalMetric;
  const rotations = laueRotationsOf(prepared);
  const qMax = 1 / (dMinA * dMinA);
  const qMin = Number.isFinite(dMaxA) ? 1 / (dMaxA * dMaxA) : 0;
  const qTol = 1e-12 * qMax;
  // |h| = |H . a| <= |H| |a| <= a / dMin, and likewise for k and l.
  const hMax = Math.floor(phase.cell.aA / dMinA + 1e-9);
  const kMax = Math.floor(phase.cell.bA / dMinA + 1e-9);
  const lMax = Math.floor(phase.cell.cA / dMinA + 1e-9);
  // The grid has a margin: prepareStructure accepts cells whose metric keeps the
  // symmetry to 1e-4, so an image of an hkl at the edge may reach one index further.
  const hG = hMax + 1 + Math.ceil(hMax * 1e-4);
  const kG = kMax + 1 + Math.ceil(kMax * 1e-4);
  const lG = lMax + 1 + Math.ceil(lMax * 1e-4);
  const nk = 2 * kG + 1;
  const nl = 2 * lG + 1;
  // stamp[i] = number of the family that claimed grid point i (0: none yet); it marks
  // the points already in a family and dedupes each orbit in one pass.
  const stamp = new Int32Array((2 * hG + 1) * nk * nl);
  const at = (h: number, k: number, l: number): number => ((h + hG) * nk + (k + kG)) * nl + (l + lG);

  const families: ReflectionFamily[] = [];
  for (let h = -hMax; h <= hMax; h++) {
    for (let k = -kMax; k <= kMax; k++) {
      for (let l = -lMax; l <= lMax; l++) {
        if (stamp[at(h, k, l)] !== 0) continue;
        if (h === 0 && k === 0 && l === 0) continue;
        const q = gs[0] * h * h + gs[4] * k * k + gs[8] * l * l + 2 * (gs[1] * h * k + gs[2] * h * l + gs[5] * k * l);
        if (q > qMax + qTol || q < qMin - qTol) continue;
        const id = families.length + 1;
        let best: Hkl = [h, k, l];
        let multiplicity = 0;
        for (const r of rotations) {
          const v: Hkl = [h * r[0]! + k * r[3]! + l * r[6]!, h * r[1]! + k * r[4]! + l * r[7]!, h * r[2]! + k * r[5]! + l * r[8]!];
          const i = at(v[0], v[1], v[2]);
          if (stamp[i] === id) continue;
          stamp[i] = id;
          multiplicity++;
          if (betterRepresentative(v, best)) best = v;
        }
        // s = 1/(2d); the clamp only trims the 1e-12 tolerance at dMinA = 0.25 Å.
        const sPerA = Math.min(Math.sqrt(q) / 2, ELECTRON_SCATTERING_S_MAX_PER_A);
        const f = structureFactorA(prepared, best, sPerA);
        const f2 = f.re * f.re + f.im * f.im;
        if (!options.includeAbsent && f2 <= ABSENT_RELATIVE * inPhaseLimitA(prepared, sPerA) ** 2) continue;
        // Adding 0 turns the -0 a rotation can produce into 0, so JSON and labels never show "-0".
        families.push({ hkl: [best[0] + 0, best[1] + 0, best[2] + 0], multiplicity, dA: 1 / Math.sqrt(q), fSquaredA2: f2 });
      }
    }
  }
  return families.sort(compareByDDescending);
}
