/**
 * The rings a phase would show on this camera: predictRings (core/crystal, kinematic
 * intensities) placed with the exact flat-detector geometry R = (L/p) tan(2 asin(lambda / 2d))
 * (core/physics ringRadiusPx). The phase's reference cell, or the candidate's fitted
 * scale when one is given.
 */
import { formatHkl, predictRings, type Phase } from '../../../core/crystal';
import { ringRadiusPx } from '../../../core/physics';

export interface PredictedRadius {
  radiusPx: number;
  dA: number;
  label: string;
  relativeIntensity: number;
}

export function predictedRadii(phase: Phase, wavelengthA: number, cameraLengthPx: number, maxRadiusPx: number, scale = 1): PredictedRadius[] {
  // Smallest d that reaches maxRadiusPx: d = lambda / (2 sin(atan(R / L) / 2)).
  const dMinA = Math.max(0.3, wavelengthA / (2 * Math.sin(Math.atan(maxRadiusPx / cameraLengthPx) / 2)) / scale);
  const rings = predictRings(phase, { dMinA });
  return rings
    .map((r) => {
      const dA = r.dA * scale;
      return { dA, radiusPx: ringRadiusPx(dA, { wavelengthA, cameraLengthPx }), label: formatHkl(r.families[0]!.hkl), relativeIntensity: r.relativeIntensity };
    })
    .filter((r) => Number.isFinite(r.radiusPx) && r.radiusPx <= maxRadiusPx);
}
