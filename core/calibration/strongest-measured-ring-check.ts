/**
 * A fit on a standard film is not trusted when an image's strongest measured ring is not
 * one of the standard's rings: cubic ring sequences alias one another at cameras a factor
 * sqrt 2 a1 / a2 apart (a bcc standard fits an fcc film's 200, 220, 222 and 400 rings; a
 * diamond one fits rock salt's 200, 220, 222, 400), so a fit can match a subset of another
 * phase's rings under a wrong camera, leaving that phase's strongest ring unexplained.
 */
import { dSpacingFromRadiusA } from '../physics';
import type { AnalysisResult } from '../pipeline/analysis-result';
import type { CameraCalibration } from './camera-calibration';

/** An image whose strongest measured ring the fit did not give to the standard. */
export interface StrongestRingNotOfStandard {
  /** Index of the image in the analyses the fit was made on (0-based). */
  imageIndex: number;
  /** Index of the ring in that analysis's rings (0-based). */
  ringIndex: number;
  radiusPx: number;
  snr: number;
  /** d of the ring under the fitted camera, Å: d = lambda / (2 sin(atan(R / (L/p)) / 2)). */
  dA: number;
}

/**
 * The images (in order) whose strongest measured ring (highest signal-to-noise ratio; the
 * first of equals) is not among the fit's standard rings. Images without rings are skipped.
 * @param fit the fit made on `analyses` (its standardRings index their rings)
 * @returns empty when every image's strongest ring is the standard's
 */
export function strongestRingsNotOfStandard(fit: CameraCalibration, analyses: readonly AnalysisResult[]): StrongestRingNotOfStandard[] {
  const camera = { wavelengthA: fit.wavelengthA, cameraLengthPx: fit.cameraLengthPx };
  const found: StrongestRingNotOfStandard[] = [];
  analyses.forEach((a, imageIndex) => {
    if (a.rings.length === 0) return;
    let strongest = 0;
    a.rings.forEach((r, i) => {
      if (r.snr > a.rings[strongest]!.snr) strongest = i;
    });
    if (fit.standardRings[imageIndex]?.includes(strongest)) return;
    const ring = a.rings[strongest]!;
    found.push({ imageIndex, ringIndex: strongest, radiusPx: ring.radiusPx, snr: ring.snr, dA: dSpacingFromRadiusA(ring.radiusPx, camera) });
  });
  return found;
}
