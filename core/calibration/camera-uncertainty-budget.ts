/**
 * The uncertainty budget of a calibrated camera length as it is applied to a pattern.
 * The relative standard uncertainties of uncorrelated inputs combine as a root sum of
 * squares (GUM: JCGM 100:2008, eq. 10, written for relative uncertainties of a product
 * or quotient, 5.1.6):
 *
 *   u_total^2 = u_fit^2 + u_ref^2 + u_repro^2
 *
 * - u_fit: the statistical fit of the camera length to the standard's rings
 *   (camera-length-fit.ts: propagated, widened by the Birge ratio);
 * - u_ref: the standard's reference lattice constant (standard-reference-uncertainty.ts:
 *   its value, its temperature under the beam, thin-film effects); every d of the
 *   calibrated camera moves with it;
 * - u_repro: transferring the calibration from the standard's image to a later image at
 *   the same nominal settings. The camera length changes with the specimen height
 *   (eucentric position), the objective focus and lens hysteresis between sessions.
 *   Microscopists quote a few tenths of a percent without strict height control and about
 *   0.1 % with it (from memory). The default, 0.1 %, assumes the lab's usual practice for
 *   camera-length work: the specimen brought to the eucentric height and the objective
 *   set to its standard focus, as for the standard; without that, give a few tenths of a
 *   percent (`--camera-reproducibility 0.3%`). An internal standard, on the same image,
 *   has no transfer: u_repro = 0, but it keeps u_ref.
 *
 * The total enters a calibrated camera once, as cameraLengthSigmaPx = u_total Lp: it is
 * common to every ring (fully correlated), so the indexer takes it as the calibration's
 * relative sigma rather than per ring (pipeline/index-ring-radii.ts).
 */
import type { AnalysisCamera } from '../pipeline/analysis-settings';
import type { StandardReferenceUncertainty } from './standard-reference-uncertainty';

/** Default relative standard uncertainty of the camera length between images at fixed nominal settings (0.1 %, with height control: from memory). */
export const DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE = 1e-3;

/** How the transfer term was set. */
export type ReproducibilitySource = 'default' | 'given' | 'same image';

export interface CameraUncertaintyBudget {
  /** Relative standard uncertainty of the fit on the standard's rings. */
  fitRelative: number;
  /** Of the standard's reference lattice constant (value, temperature, film). */
  referenceRelative: number;
  /** Of transferring the calibration to this image (0 for an internal standard). */
  reproducibilityRelative: number;
  /** Root sum of squares of the three: the camera's relative standard uncertainty used for every d and a. */
  totalRelative: number;
  reproducibilitySource: ReproducibilitySource;
  /** The reference term's parts. */
  reference: StandardReferenceUncertainty;
}

/**
 * @param fitRelative u(Lp)/Lp of the fit, >= 0
 * @param reference the standard's reference term
 * @param reproducibility the transfer term (>= 0) and how it was set ('same image' requires 0)
 * @throws RangeError for a negative or non-finite term, or a non-zero transfer term on the same image
 */
export function cameraUncertaintyBudget(
  fitRelative: number,
  reference: StandardReferenceUncertainty,
  reproducibility: { relative: number; source: ReproducibilitySource },
): CameraUncertaintyBudget {
  if (!(fitRelative >= 0 && Number.isFinite(fitRelative))) throw new RangeError(`fitRelative must be a relative uncertainty >= 0; got ${fitRelative}`);
  const r = reproducibility.relative;
  if (!(r >= 0 && Number.isFinite(r))) throw new RangeError(`reproducibility.relative must be a relative uncertainty >= 0; got ${r}`);
  if (reproducibility.source === 'same image' && r !== 0) throw new RangeError(`an internal standard (same image) has no transfer term; got reproducibility ${r}`);
  return {
    fitRelative,
    referenceRelative: reference.relative,
    reproducibilityRelative: r,
    totalRelative: Math.hypot(fitRelative, reference.relative, r),
    reproducibilitySource: reproducibility.source,
    reference,
  };
}

/** The camera with the budget's total as its standard uncertainty (cameraLengthSigmaPx = u_total Lp); `camera` is not mutated. */
export function cameraWithBudget(camera: AnalysisCamera, budget: CameraUncertaintyBudget): AnalysisCamera {
  return { ...camera, cameraLengthSigmaPx: budget.totalRelative * camera.cameraLengthPx };
}
