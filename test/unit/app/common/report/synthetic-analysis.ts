/**
 * A hand-made analysis result and raster for report tests that need exact
 * geometry rather than a measured one: rings of given corrected radii in a
 * given frame, drawn into a raster by the same frame formula as
 * core/rings/pattern-frame.ts states (R^2 = u^2/q + q v^2).
 */
import type { Hkl } from '../../../../../core/crystal/hkl';
import type { Raster } from '../../../../../core/image/raster';
import type { AnalysisResult, AnalyzedRing } from '../../../../../core/pipeline/analysis-result';
import { electronWavelengthA } from '../../../../../core/physics';

export interface SyntheticFrame {
  cx: number;
  cy: number;
  q: number;
  angleDeg: number;
}

export function syntheticResult(width: number, height: number, frame: SyntheticFrame, rings: Array<{ radiusPx: number; hkl: Hkl | null }>): AnalysisResult {
  const cameraLengthPx = 27000;
  const wavelengthA = electronWavelengthA(200e3);
  const analyzed: AnalyzedRing[] = rings.map((r) => ({
    radiusPx: r.radiusPx,
    radiusSigmaPx: 0.01,
    radiusBoundPx: null,
    dA: wavelengthA / (2 * Math.sin(Math.atan(r.radiusPx / cameraLengthPx) / 2)),
    dSigmaA: 1e-4,
    fwhmPx: 3,
    intensity: 1000,
    snr: 50,
    continuity: 1,
    spottiness: 0,
    textureAmplitude: 0,
    hkl: r.hkl,
    phase: r.hkl ? 'Au' : null,
  }));
  return {
    image: { width, height, bitsPerSample: 16 },
    voltageV: 200e3,
    wavelengthA,
    camera: { cameraLengthPx, cameraLengthSigmaPx: 0, source: 'test camera', calibrated: false },
    center: { xPx: frame.cx, yPx: frame.cy, sigmaPx: 0.01, sigmaXPx: 0.01, sigmaYPx: 0.01 },
    distortion: { axisRatio: frame.q, axisRatioSigma: 1e-4, angleDeg: frame.angleDeg, angleSigmaDeg: 0.1, perRing: [] },
    masks: { saturationLevel: 65535, saturatedPixels: 0, hotPixels: 0, beamStopFound: false, beamStopNote: 'none', polygonCount: 0, excludedFraction: 0 },
    rings: analyzed,
    profile: { rMinPx: 0, binWidthPx: 1, radiusPx: [], mean: [], background: [] },
    candidates: [],
    ambiguities: [],
    secondPhase: [],
    conclusion: { conclusive: false, reason: 'synthetic' },
    status: 'ok',
    warnings: [],
    notes: [],
    timingsMs: {},
  };
}

/** A raster with a flat level and Gaussian rings (FWHM 3 px, height `peak`) at the corrected radii. */
export function syntheticRaster(width: number, height: number, frame: SyntheticFrame, radii: number[], level = 100, peak = 400): Raster {
  const data = new Float32Array(width * height);
  const a = (frame.angleDeg * Math.PI) / 180;
  const s2 = (3 / 2.3548) ** 2;
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const dx = i - frame.cx;
      const dy = j - frame.cy;
      const u = dx * Math.cos(a) + dy * Math.sin(a);
      const v = -dx * Math.sin(a) + dy * Math.cos(a);
      const r = Math.sqrt((u * u) / frame.q + frame.q * v * v);
      let value = level;
      for (const R of radii) value += peak * Math.exp(-((r - R) ** 2) / (2 * s2));
      data[j * width + i] = value;
    }
  }
  return { width, height, data };
}
