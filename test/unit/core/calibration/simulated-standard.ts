/**
 * A simulated standard film for the calibration tests: a 768 x 768 pattern of one phase at
 * 200 kV with a known camera length (our own simulator, core/simulate), analysed by core's
 * pipeline under whatever camera the test gives. The truth is the simulator's input.
 */
import { findPhase } from '../../../../core/crystal';
import { analyze, type AnalysisResult } from '../../../../core/pipeline';
import { simulatePattern } from '../../../../core/simulate';
import { loadOpenCv } from '../../../../app/node/load-opencv';

/** The simulated camera length over pixel pitch (0.45 m at 28 µm pixels: gold rings out to 422 in the frame), px. */
export const TRUE_LP = 0.45 / 28e-6;

export const VOLTAGE_V = 200e3;

/** The pattern of `phaseId` (seeded), analysed as if the camera were `analysisLp` px (the truth by default). */
export function simulatedStandard(phaseId: string, seed: number, analysisLp = TRUE_LP): AnalysisResult {
  const { raster } = simulatePattern({
    widthPx: 768,
    heightPx: 768,
    voltageV: VOLTAGE_V,
    cameraLengthPx: TRUE_LP,
    frame: { centerXPx: 383.6, centerYPx: 379.2, axisRatio: 1.008, angleDeg: 25 },
    phases: [{ phase: findPhase(phaseId)!, latticeScale: 1 }],
    peakCounts: 1800,
    ringFwhmPx: 2.6,
    background: { levelCounts: 300 },
    beamStop: { radiusPx: 22, stemAngleDeg: 100, stemWidthPx: 14, transmission: 0.02 },
    seed,
  });
  return analyze(
    raster,
    {
      camera: { voltageV: VOLTAGE_V, cameraLengthPx: analysisLp, cameraLengthSigmaPx: 0, source: 'test camera', calibrated: false },
      image: { bitsPerSample: 16, sampleFormat: 'uint' },
      phases: [findPhase(phaseId)!],
    },
    undefined,
    loadOpenCv(),
  );
}
