/**
 * The rings of a simulated film: for each phase, the predicted rings of its strained
 * cell (kinematic: predictRings), placed at the exact flat-detector radius and given a
 * height in the azimuthal-mean profile,
 *
 *   d        = d_0 * latticeScale      (the cell lengths are scaled, so d is, exactly)
 *   R        = ringRadiusPx(d, { wavelengthA, cameraLengthPx }) = (L/p) tan(2 asin(lambda / 2d))
 *   height   = peakCounts * weight_p * I_pk / max over all phases and rings of (weight * I),
 *   I_pk     = profileIntensity / (the phase's largest profileIntensity)  (sum of m |F|^2 d^2),
 *
 * so the strongest ring of the film peaks at exactly `peakCounts` and each phase's
 * strongest ring at weight_p / max(weight) of it.

 */

import { predictRings, type Phase, type PredictedRing } from '../crystal';
import { ringRadiusPx, type CameraGeometry } from '../physics';
import type { ResolvedPhase } from './resolve-simulation-spec';

export interface SimulatedRing {
  phaseIndex: number;
  ringIndex: number;
  /** The predicted ring, its relativeIntensity taken over the phase's simulated rings. */
  ring: PredictedRing;
  radiusPx: number;
  heightCounts: number;
}

/** The phase with every cell length multiplied by `scale`. */
export function strainedPhase(phase: Phase, scale: number): Phase {
  return scale === 1 ? phase : { ...phase, cell: { ...phase.cell, aA: phase.cell.aA * scale, bA: phase.cell.bA * scale, cA: phase.cell.cA * scale } };
}

/**
 * Rings with d >= dMinA of every phase, sorted by radius ascending, and notes on rings
 * left out (beyond 2 theta = 90 degrees) and phases without rings.
 */
export function simulatedRings(
  phases: readonly ResolvedPhase[],
  dMinA: number,
  camera: CameraGeometry,
  peakCounts: number,
): { rings: SimulatedRing[]; notes: string[] } {
  const notes: string[] = [];
  const perPhase = phases.map((p, phaseIndex) => {
    const predicted = predictRings(strainedPhase(p.phase, p.latticeScale), { dMinA }).filter((r) => r.profileIntensity > 0);
    if (predicted.length === 0) notes.push(`phase ${p.phase.id} has no ring with d >= ${dMinA.toFixed(4)} Å in this camera's range`);
    const largest = predicted.reduce((m, r) => Math.max(m, r.profileIntensity), 0);
    return predicted.map((r, ringIndex) => ({
      phaseIndex,
      ringIndex,
      ring: { ...r, relativeIntensity: (100 * r.profileIntensity) / largest },
      strength: (p.weight * r.profileIntensity) / largest,
    }));
  });
  const all = perPhase.flat();
  const strongest = all.reduce((m, r) => Math.max(m, r.strength), 0);
  const rings: SimulatedRing[] = [];
  let beyond = 0;
  for (const r of all) {
    let radiusPx: number;
    try {
      radiusPx = ringRadiusPx(r.ring.dA, camera);
    } catch {
      beyond++;
      continue;
    }
    rings.push({ phaseIndex: r.phaseIndex, ringIndex: r.ringIndex, ring: r.ring, radiusPx, heightCounts: (peakCounts * r.strength) / strongest });
  }
  if (beyond > 0) notes.push(`${beyond} ring(s) scatter to 2 theta >= 90 degrees and cannot meet a flat detector; left out`);
  rings.sort((a, b) => a.radiusPx - b.radiusPx || a.phaseIndex - b.phaseIndex);
  return { rings, notes };
}
