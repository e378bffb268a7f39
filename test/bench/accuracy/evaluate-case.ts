/**
 * One accuracy case end to end: simulate the pattern (core/simulate), analyse it with
 * the whole pipeline (core/pipeline analyze, the phase library, the camera known
 * exactly), and compare every figure with the simulator's truth.
 *
 * Definitions (printed with the results, see format-report.ts):
 *  - centre error: distance between the analysed and the true centre, px;
 *  - axis-ratio error: |q_analysed - q_true|; angle error (only when q_true >= 1.005):
 *    the analysed minus the true major-axis angle, wrapped into [-90, 90) degrees;
 *  - matching: each analysed ring goes to the nearest true ring (by corrected radius)
 *    when it lies within one true FWHM of it; of two analysed rings on one true ring the
 *    nearer keeps it;
 *  - photon-counting bound of a true ring: radiusPrecisionBoundPx
 *    (core/rings/radius-precision-bound.ts) from the TRUTH: the ring's expected counts
 *    over its visible part (totalCounts x visibleFraction), its FWHM and eta, the
 *    background under it (backgroundCounts + otherRingsCounts, electrons per pixel),
 *    the visible fraction and the read noise ((readNoiseAdu / gain)^2 electrons^2),
 *    with the fits' nuisance parameters (area, FWHM, eta, a straight background) and
 *    window (3 FWHM). It is the limit of the continuous profile, given the frame; the
 *    pixels, and an imperfect frame, can only add to it. The analysis's own estimate of
 *    the same bound (AnalyzedRing.radiusBoundPx, from its noise model) is compared
 *    with it as a ratio;
 *  - strong ring: a true ring whose truth bound is at most STRONG_BOUND_PX (a quarter
 *    of the 0.02 px target, so the counts allow the target with margin) and which is
 *    isolated: no other true ring with at least 5 % of its height within 1.5 FWHM
 *    (closer pairs are blends whose single fitted radius is no single true ring's);
 *  - d error: (d_analysed - d_true) / d_true for matched rings;
 *  - phase: the top-1 candidate's phase id against the true phase's id.
 */
import { findPhase, phaseLibrary } from '../../../core/crystal';
import type { OpenCv } from '../../../core/image/opencv-handle';
import { analyze, type AnalysisResult } from '../../../core/pipeline';
import { radiusPrecisionBoundPx } from '../../../core/rings/radius-precision-bound';
import { simulatePattern, type SimulatedRingTruth, type SimulationTruth } from '../../../core/simulate';
import { caseSimulationSpec, type AccuracyCase } from './accuracy-cases';

/** A true ring counts as strong when its photon-counting bound is at most this, px (target 0.02 px / 4). */
export const STRONG_BOUND_PX = 0.005;
/** Neighbours this close (in FWHM) with at least NEIGHBOUR_HEIGHT_FRACTION of the ring's height make it a blend. */
export const ISOLATION_FWHM = 1.5;
export const NEIGHBOUR_HEIGHT_FRACTION = 0.05;
/** Angles are compared only from this axis ratio up (below it the angle is barely defined). */
export const ANGLE_MIN_AXIS_RATIO = 1.005;

export interface RingComparison {
  /** Index in truth.rings, hkl of its first family. */
  trueIndex: number;
  hkl: string;
  trueRadiusPx: number;
  trueDA: number;
  truePeakCounts: number;
  visibleFraction: number;
  /** Photon-counting bound from the truth, px. */
  boundPx: number;
  strong: boolean;
  /** The matched analysed ring, or null when none was matched. */
  measured: null | {
    ringIndex: number;
    radiusPx: number;
    errorPx: number;
    sigmaPx: number;
    /** The analysis's own photon-counting bound, px, when it gave one. */
    analysisBoundPx: number | null;
    snr: number;
    dRelativeError: number;
  };
}

export interface CaseEvaluation {
  id: string;
  description: string;
  widthPx: number;
  heightPx: number;
  voltageKv: number;
  trueAxisRatio: number;
  trueAngleDeg: number;
  peakCounts: number;
  phaseId: string;
  features: string[];
  status: AnalysisResult['status'];
  centreErrorPx: number;
  centreSigmaPx: number;
  axisRatioError: number;
  axisRatioSigma: number;
  /** null when q_true < ANGLE_MIN_AXIS_RATIO. */
  angleErrorDeg: number | null;
  rings: RingComparison[];
  /** Analysed rings matched to no true ring. */
  unmatchedRings: number;
  analysedRingCount: number;
  top1Phase: string | null;
  phaseCorrect: boolean;
  conclusive: boolean;
  simulateMs: number;
  analyzeMs: number;
  warnings: string[];
}

const now = () => performance.now();

/** What makes a case special, as short labels for the table. */
export function caseFeatures(truth: SimulationTruth): string[] {
  const f: string[] = [];
  const { widthPx, heightPx } = truth.image;
  const { centerXPx: cx, centerYPx: cy } = truth.frame;
  const outside = cx < 0 || cy < 0 || cx > widthPx - 1 || cy > heightPx - 1;
  if (outside) f.push('outside');
  else if (Math.hypot(cx - (widthPx - 1) / 2, cy - (heightPx - 1) / 2) > 0.15 * Math.min(widthPx, heightPx)) f.push('off-centre');
  if (truth.beamStop) f.push('stop');
  if (truth.saturated.pixelCount > 0) f.push('saturated');
  if (truth.hotPixels.length > 0) f.push('hot');
  if (truth.halos.some((h) => h.peakCounts > 0)) f.push('halo');
  const p = truth.phases[0]!;
  if (p.texture) f.push(p.texture.shape === 'arcs' ? 'arcs' : 'texture');
  if (p.grainsPerRing !== null) f.push(`spots ${p.grainsPerRing}`);
  if (p.latticeScale !== 1) f.push('strained');
  return f;
}

/** The photon-counting bound of a true ring from the truth (see the header). Infinity for a ring not seen. */
export function truthRadiusBoundPx(ring: SimulatedRingTruth, truth: SimulationTruth): number {
  if (!(ring.visibleFraction > 0) || !(ring.totalCounts > 0)) return Infinity;
  const readNoiseElectrons = truth.detector.readNoiseAdu / truth.detector.gainAduPerElectron;
  return radiusPrecisionBoundPx({
    radiusPx: ring.radiusPx,
    fwhmPx: ring.fwhmPx,
    eta: ring.eta,
    ringCounts: ring.totalCounts * ring.visibleFraction,
    backgroundCountsPerPx: ring.backgroundCounts + ring.otherRingsCounts,
    visibleFraction: ring.visibleFraction,
    readNoiseVarianceCounts2: readNoiseElectrons ** 2,
  });
}

/** Whether no other true ring with NEIGHBOUR_HEIGHT_FRACTION of this one's height lies within ISOLATION_FWHM. */
export function isIsolated(k: number, rings: readonly SimulatedRingTruth[]): boolean {
  const r = rings[k]!;
  return rings.every((o, m) => m === k || Math.abs(o.radiusPx - r.radiusPx) > ISOLATION_FWHM * r.fwhmPx || o.peakCounts < NEIGHBOUR_HEIGHT_FRACTION * r.peakCounts);
}

/** Angle difference of two axis directions, degrees, in [-90, 90). */
export function axisAngleDifferenceDeg(a: number, b: number): number {
  return ((((a - b + 90) % 180) + 180) % 180) - 90;
}

/** Matches analysed rings to true rings and fills in the comparisons. */
export function compareRings(result: AnalysisResult, truth: SimulationTruth): { rings: RingComparison[]; unmatched: number } {
  const trueRings = truth.rings;
  const bounds = trueRings.map((r) => truthRadiusBoundPx(r, truth));
  // Nearest true ring for each analysed ring, kept when within one FWHM.
  const claims = new Map<number, { ringIndex: number; distance: number }>();
  let unmatched = 0;
  result.rings.forEach((m, i) => {
    let best = -1;
    let bestDistance = Infinity;
    trueRings.forEach((t, k) => {
      const d = Math.abs(m.radiusPx - t.radiusPx);
      if (d < bestDistance) { bestDistance = d; best = k; }
    });
    if (best < 0 || bestDistance > trueRings[best]!.fwhmPx) { unmatched++; return; }
    const prior = claims.get(best);
    if (!prior || bestDistance < prior.distance) {
      if (prior) unmatched++;
      claims.set(best, { ringIndex: i, distance: bestDistance });
    } else unmatched++;
  });
  const rings: RingComparison[] = [];
  trueRings.forEach((t, k) => {
    const claim = claims.get(k);
    const bound = bounds[k]!;
    // Only rings the image shows at all, or that were matched, are listed.
    if (!claim && !(t.visibleFraction > 0 && Number.isFinite(bound))) return;
    const m = claim ? result.rings[claim.ringIndex]! : null;
    rings.push({
      trueIndex: k,
      hkl: t.hkl.join(' '),
      trueRadiusPx: t.radiusPx,
      trueDA: t.dA,
      truePeakCounts: t.peakCounts,
      visibleFraction: t.visibleFraction,
      boundPx: bound,
      strong: bound <= STRONG_BOUND_PX && isIsolated(k, trueRings),
      measured: m && claim
        ? {
            ringIndex: claim.ringIndex,
            radiusPx: m.radiusPx,
            errorPx: m.radiusPx - t.radiusPx,
            sigmaPx: m.radiusSigmaPx,
            analysisBoundPx: m.radiusBoundPx,
            snr: m.snr,
            dRelativeError: (m.dA - t.dA) / t.dA,
          }
        : null,
    });
  });
  return { rings, unmatched };
}

/**
 * Simulates and analyses case `c`.
 * @param cv the OpenCV handle (app/node/load-opencv.ts in Node)
 */
export function evaluateCase(c: AccuracyCase, cv: OpenCv): CaseEvaluation {
  const phase = findPhase(c.phase.id);
  if (!phase) throw new RangeError(`case ${c.id}: no library phase '${c.phase.id}'`);
  let t = now();
  const { raster, truth } = simulatePattern(caseSimulationSpec(c, phase));
  const simulateMs = now() - t;
  t = now();
  const result = analyze(
    raster,
    {
      camera: { voltageV: truth.voltageV, cameraLengthPx: truth.cameraLengthPx, cameraLengthSigmaPx: 0, source: 'simulator truth (exact)', calibrated: true },
      image: { bitsPerSample: 16, sampleFormat: 'uint' },
      phases: phaseLibrary(),
    },
    undefined,
    cv,
  );
  const analyzeMs = now() - t;
  const { rings, unmatched } = compareRings(result, truth);
  const top1 = result.candidates[0] ?? null;
  const q = truth.frame.axisRatio;
  return {
    id: c.id,
    description: c.description,
    widthPx: truth.image.widthPx,
    heightPx: truth.image.heightPx,
    voltageKv: truth.voltageV / 1000,
    trueAxisRatio: q,
    trueAngleDeg: truth.frame.angleDeg,
    peakCounts: truth.peakCounts,
    phaseId: truth.phases[0]!.id,
    features: caseFeatures(truth),
    status: result.status,
    centreErrorPx: Math.hypot(result.center.xPx - truth.frame.centerXPx, result.center.yPx - truth.frame.centerYPx),
    centreSigmaPx: result.center.sigmaPx,
    axisRatioError: Math.abs(result.distortion.axisRatio - q),
    axisRatioSigma: result.distortion.axisRatioSigma,
    angleErrorDeg: q >= ANGLE_MIN_AXIS_RATIO ? axisAngleDifferenceDeg(result.distortion.angleDeg, truth.frame.angleDeg) : null,
    rings,
    unmatchedRings: unmatched,
    analysedRingCount: result.rings.length,
    top1Phase: top1 ? top1.phase : null,
    phaseCorrect: top1 !== null && top1.phase === truth.phases[0]!.id,
    conclusive: result.conclusion.conclusive,
    simulateMs,
    analyzeMs,
    warnings: result.warnings,
  };
}
