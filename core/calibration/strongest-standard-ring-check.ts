/**
 * A fit on a standard is not trusted when the standard's strongest ring (highest
 * relativeIntensity) lies inside an image's measured range under the fitted camera but was
 * not matched: a film that lacks it is not the standard, or the fit matched another phase's
 * rings under a wrong camera (cubic ring sequences alias one another at cameras a factor
 * sqrt 2 a1 / a2 apart).
 */
import { predictRings } from '../crystal/predicted-rings';
import type { PredictedRing } from '../crystal/predicted-ring';
import type { Phase } from '../crystal/phase';
import { ringRadiusPx } from '../physics';
import type { AnalysisResult } from '../pipeline/analysis-result';
import type { CameraCalibration } from './camera-calibration';

/** The standard's rings are predicted down to this d at least (Å), however far out the outermost ring is. */
const D_FLOOR_A = 0.3;

/** Predicted rings reach 0.9 x the d of the outermost measured ring, as calibrateCamera predicts them. */
const D_MARGIN = 0.9;

/** The outermost ring's radius may be exceeded by this fraction (0.2 %) before a predicted ring counts as outside the range. */
const OUTER_EDGE_TOLERANCE = 1.002;

/** An image whose measured range holds the standard's strongest ring, with no matched ring there. */
export interface MissingStrongestStandardRing {
  /** Index of the image in the analyses the fit was made on (0-based). */
  imageIndex: number;
  /** The standard's strongest predicted ring (its families, dA, relativeIntensity). */
  ring: PredictedRing;
  /** Where it would lie under the fitted camera, px: R = (L/p) tan(2 asin(lambda / 2d)). */
  radiusPx: number;
}

/**
 * The images (in order) whose measured range, from the profile's inner edge to the
 * outermost ring (+0.2 %), holds the standard's strongest ring under the fitted camera while
 * no ring the fit kept (not rejected) has its d. Images without rings are skipped.
 * @param fit the fit made on `analyses` with `standard`
 * @returns empty when the strongest ring is matched wherever it could have been measured
 */
export function missingStrongestStandardRings(fit: CameraCalibration, analyses: readonly AnalysisResult[], standard: Phase): MissingStrongestStandardRing[] {
  const camera = { wavelengthA: fit.wavelengthA, cameraLengthPx: fit.cameraLengthPx };
  const found: MissingStrongestStandardRing[] = [];
  analyses.forEach((a, imageIndex) => {
    if (a.rings.length === 0) return;
    const outermost = Math.max(...a.rings.map((r) => r.radiusPx));
    // 0.9 x the d of the outermost ring, d = lambda / (2 sin(atan(R / (L/p)) / 2)) (physics/detector-geometry.ts).
    const dMinA = (D_MARGIN * fit.wavelengthA) / (2 * Math.sin(Math.atan2(outermost, fit.cameraLengthPx) / 2));
    const rings = predictRings(standard, { dMinA: Math.max(D_FLOOR_A, dMinA) });
    if (rings.length === 0) return;
    const strongest = rings.reduce((best, r) => (r.relativeIntensity > best.relativeIntensity ? r : best));
    const radiusPx = ringRadiusPx(strongest.dA, camera);
    if (radiusPx < a.profile.rMinPx || radiusPx > outermost * OUTER_EDGE_TOLERANCE) return;
    const matched = fit.residuals.some((r) => r.imageIndex === imageIndex && !r.rejected && Math.abs(r.dRefA / strongest.dA - 1) < 1e-9);
    if (!matched) found.push({ imageIndex, ring: strongest, radiusPx });
  });
  return found;
}
