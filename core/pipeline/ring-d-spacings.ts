/**
 * Measured ring radii to d-spacings: d = lambda / (2 sin(atan(R / (L/p)) / 2)),
 * the exact flat-detector geometry, with the radius and camera-length
 * uncertainties propagated (core/physics/d-spacing-uncertainty.ts).
 */
import { dSpacingWithUncertainty, electronWavelengthA } from '../physics';
import type { AnalysisCamera } from './analysis-settings';

export interface RingDSpacing {
  dA: number;
  dSigmaA: number;
}

/** d and its standard uncertainty for each ring, in the rings' order. */
export function ringDSpacings(rings: ReadonlyArray<{ radiusPx: number; radiusSigmaPx: number }>, camera: AnalysisCamera): RingDSpacing[] {
  const geometry = { wavelengthA: electronWavelengthA(camera.voltageV), cameraLengthPx: camera.cameraLengthPx };
  return rings.map((r) => {
    const e = dSpacingWithUncertainty(r.radiusPx, r.radiusSigmaPx, geometry, {
      cameraLengthSigmaPx: camera.cameraLengthSigmaPx,
      // A calibration made at this voltage absorbs the wavelength; a nominal camera's error dominates anyway.
      wavelengthSigmaA: 0,
    });
    return { dA: e.dA, dSigmaA: e.dSigmaA };
  });
}
