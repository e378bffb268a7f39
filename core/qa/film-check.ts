/**
 * Is the film the intended phase, with the intended lattice constant? A verdict
 * for QA, with the reasons a reviewer needs.
 *
 * Decision rule (guarded acceptance and rejection, JCGM 106:2012 "The role of
 * measurement uncertainty in conformity assessment", sections 8.3-8.4, with an
 * expanded uncertainty U = k u, k = 2, about 95 % coverage for a normal error):
 * with the relative deviation delta = a_measured / a_expected - 1 and the
 * relative tolerance T,
 *   pass          |delta| + U <= T     (the whole interval inside the tolerance)
 *   fail          |delta| - U >  T     (the whole interval outside)
 *   inconclusive  otherwise, and always when U > T (an uncertainty wider than the
 *                 tolerance can never pass).
 * The lattice constant is that of the expected phase matched alone to the
 * rings (isotropic scale refined within the strain window), its uncertainty
 * including the camera calibration's: the relative standard uncertainty of the
 * camera length (camera.cameraLengthSigmaPx / cameraLengthPx), which for a
 * calibrated camera is its whole budget (fit, the standard's reference lattice
 * constant, the transfer to this image; core/calibration camera-uncertainty-budget.ts),
 * enters once, in quadrature with the fit of a (phase matching's calibrationRelativeSigma).
 *
 * Further reasons, each of which overrides a pass:
 *  - the expected phase explains fewer than 3 rings: fail (the pattern is not
 *    that phase); fewer than two thirds of them: fail (not only that phase);
 *  - significant rings the expected phase cannot explain (SNR >= secondPhaseSnr):
 *    fail, a possible second phase, with the library phases that could explain them;
 *  - strong expected rings missing in the measured range: inconclusive (texture can
 *    extinguish rings; a reviewer must look);
 *  - no calibrated camera: inconclusive (a nominal camera length is not known to
 *    the tolerance).
 * The verdict supports the lab's review; it does not replace it.
 */
import type { CameraUncertaintyBudget } from '../calibration/camera-uncertainty-budget';
import type { Phase } from '../crystal/phase';
import { matchPhases, type MeasuredRing } from '../indexing';
import type { AnalysisResult } from '../pipeline/analysis-result';

export type Verdict = 'pass' | 'fail' | 'inconclusive';

export interface FilmCheckOptions {
  /** Relative tolerance on a, e.g. 0.005 for 0.5 %. */
  tolerance: number;
  /** Coverage factor of the expanded uncertainty; default 2. */
  coverageFactor?: number;
  /** Library phases to name for rings the expected phase leaves unexplained. */
  library?: readonly Phase[];
  /** Unexplained rings below this SNR are not taken as a second phase; default 10. */
  secondPhaseSnr?: number;
  /** Missing predicted rings at least this strong (relativeIntensity) count; default 20. */
  missingStrength?: number;
  /** The calibrated camera's budget, to name its largest term when U is wider than the tolerance (optional; U comes from the analysis's camera either way). */
  cameraUncertainty?: CameraUncertaintyBudget;
}

/** What to do when U is wider than the tolerance, by the largest term of the camera's budget. */
function wideUncertaintyAdvice(budget: CameraUncertaintyBudget | undefined, k: number, U: number): string {
  if (!budget) return 'calibrate more carefully or measure more rings';
  const terms: Array<[number, string]> = [
    [budget.reproducibilityRelative, `the camera's reproducibility between images (${pct(budget.reproducibilityRelative)}) dominates: control the specimen height and focus and give the lab's own figure with --camera-reproducibility, or use an internal standard on the same image`],
    [budget.referenceRelative, `the standard's reference lattice constant (${pct(budget.referenceRelative)}) dominates: use a certified standard with a stated uncertainty`],
    [budget.fitRelative, `the calibration fit (${pct(budget.fitRelative)}) dominates: calibrate on more or stronger rings`],
  ];
  const [largest, words] = terms.reduce((a, b) => (b[0] > a[0] ? b : a));
  // Only when the camera's part of U (k u_camera) is most of it; otherwise the rings of this film limit a.
  return k * budget.totalRelative >= 0.5 * U && largest > 0 ? words : 'measure more rings, or longer exposures';
}

export interface FilmCheck {
  verdict: Verdict;
  reasons: string[];
  expected: { phase: string; aA: number; tolerance: number };
  measured: { aA: number; aSigmaA: number; deviation: number; expandedUncertainty: number } | null;
  unexplainedRings: Array<{ dA: number; snr: number; candidates: string[] }>;
  missingRings: Array<{ hkl: readonly number[]; dA: number; relativeIntensity: number }>;
}

const pct = (x: number): string => `${(x * 100).toFixed(3)} %`;

export function checkFilm(analysis: AnalysisResult, expected: Phase, options: FilmCheckOptions): FilmCheck {
  const T = options.tolerance;
  if (!(T > 0 && T < 0.5)) throw new RangeError(`tolerance must be a relative value between 0 and 0.5 (e.g. 0.005 for 0.5 %); got ${T}`);
  const k = options.coverageFactor ?? 2;
  if (!(k > 0)) throw new RangeError(`coverageFactor must be positive; got ${k}`);
  const secondPhaseSnr = options.secondPhaseSnr ?? 10;
  const missingStrength = options.missingStrength ?? 20;
  const reasons: string[] = [];
  const base = { expected: { phase: expected.id, aA: expected.cell.aA, tolerance: T } };

  if (analysis.rings.length < 3) {
    return {
      ...base,
      verdict: 'inconclusive',
      reasons: [`only ${analysis.rings.length} ring${analysis.rings.length === 1 ? '' : 's'} measured: too few to check the phase (${analysis.status})`],
      measured: null,
      unexplainedRings: [],
      missingRings: [],
    };
  }
  // d with the radius uncertainty alone; the camera's error is added once, as calibrationRelativeSigma.
  const camRel = analysis.camera.cameraLengthSigmaPx / analysis.camera.cameraLengthPx;
  const rings: MeasuredRing[] = analysis.rings.map((r) => {
    const radiusPart = Math.sqrt(Math.max(r.dSigmaA * r.dSigmaA - (camRel * r.dA) ** 2, 0));
    return { dA: r.dA, dSigmaA: Math.max(radiusPart, 1e-6 * r.dA), intensity: Math.max(0, r.intensity) };
  });
  const match = matchPhases(rings, [expected], camRel > 0 ? { calibrationRelativeSigma: camRel } : {}).matches.find((m) => m.phaseId === expected.id);
  if (!match || match.explainedCount < 3) {
    return {
      ...base,
      verdict: 'fail',
      reasons: [`the rings are not those of ${expected.id}: it explains ${match?.explainedCount ?? 0} of ${rings.length} rings${analysis.candidates[0]?.phase ? `; the best candidate is ${analysis.candidates[0].label}` : ''}`],
      measured: match ? { aA: match.aA, aSigmaA: match.aSigmaA, deviation: match.aA / expected.cell.aA - 1, expandedUncertainty: (k * match.aSigmaA) / match.aA } : null,
      unexplainedRings: [],
      missingRings: [],
    };
  }

  const delta = match.aA / expected.cell.aA - 1;
  const U = (k * match.aSigmaA) / match.aA;
  let verdict: Verdict;
  if (U > T) {
    verdict = 'inconclusive';
    reasons.push(`the expanded uncertainty of a (${pct(U)}, k = ${k}) is wider than the tolerance (${pct(T)}): the measurement cannot decide; ${wideUncertaintyAdvice(options.cameraUncertainty, k, U)}`);
  } else if (Math.abs(delta) + U <= T) {
    verdict = 'pass';
    reasons.push(`a = ${match.aA.toFixed(5)} Å deviates ${pct(delta)} from ${expected.cell.aA} Å; with its expanded uncertainty (${pct(U)}) it lies inside the tolerance of ${pct(T)}`);
  } else if (Math.abs(delta) - U > T) {
    verdict = 'fail';
    reasons.push(`a = ${match.aA.toFixed(5)} Å deviates ${pct(delta)} from ${expected.cell.aA} Å, outside the tolerance of ${pct(T)} even allowing the expanded uncertainty (${pct(U)})`);
  } else {
    verdict = 'inconclusive';
    reasons.push(`a = ${match.aA.toFixed(5)} Å deviates ${pct(delta)} from ${expected.cell.aA} Å; the tolerance limit ${pct(T)} lies within its expanded uncertainty (${pct(U)})`);
  }

  if (match.explainedCount < (2 / 3) * rings.length) {
    verdict = 'fail';
    reasons.unshift(`${expected.id} explains only ${match.explainedCount} of ${rings.length} rings: the film is not (only) ${expected.id}${analysis.candidates[0]?.phase && analysis.candidates[0].phase !== expected.id ? `; the best candidate is ${analysis.candidates[0].label}` : ''}`);
  }
  const significant = match.unexplained.filter((u) => (analysis.rings[u.ringIndex]?.snr ?? 0) >= secondPhaseSnr);
  let unexplainedRings: FilmCheck['unexplainedRings'] = [];
  if (significant.length > 0) {
    const others = (options.library ?? []).filter((p) => p.id !== expected.id);
    const candidatesFor = (dA: number, sigma: number): string[] => {
      if (others.length === 0) return [];
      const one: MeasuredRing[] = [{ dA, dSigmaA: sigma }];
      return matchPhases(one, others).matches.slice(0, 5).map((m) => m.phaseId);
    };
    unexplainedRings = significant.map((u) => ({
      dA: u.dA,
      snr: analysis.rings[u.ringIndex]!.snr,
      candidates: candidatesFor(u.dA, rings[u.ringIndex]!.dSigmaA),
    }));
    verdict = 'fail';
    reasons.push(
      `${significant.length} significant ring${significant.length === 1 ? '' : 's'} ${expected.id} cannot explain (d = ${significant.map((u) => u.dA.toFixed(4)).join(', ')} Å): a possible second phase${unexplainedRings.some((u) => u.candidates.length) ? ` (could be ${[...new Set(unexplainedRings.flatMap((u) => u.candidates))].slice(0, 6).join(', ')})` : ''}`,
    );
  }
  const missingRings = match.missing.filter((m) => m.relativeIntensity >= missingStrength).map((m) => ({ hkl: m.hkl, dA: m.dA, relativeIntensity: m.relativeIntensity }));
  if (missingRings.length > 0) {
    if (verdict === 'pass') verdict = 'inconclusive';
    reasons.push(`strong ${expected.id} rings missing: ${missingRings.map((m) => `${m.hkl.join(' ')} (${m.dA.toFixed(4)} Å, intensity ${m.relativeIntensity.toFixed(0)})`).join(', ')}; texture can hide rings: review the image`);
  }
  if (!analysis.camera.calibrated) {
    if (verdict === 'pass') verdict = 'inconclusive';
    reasons.push('the camera length is nominal, not calibrated: the lattice constant is not known to the tolerance; check with a calibration on a standard');
  }
  return { ...base, verdict, reasons, measured: { aA: match.aA, aSigmaA: match.aSigmaA, deviation: delta, expandedUncertainty: U }, unexplainedRings, missingRings };
}
