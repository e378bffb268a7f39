/**
 * The calibration loop with the simulator: a gold standard taken with a camera
 * 2.3 % longer than its nominal setting, calibrated; then an unknown (TiN) at the
 * same settings analysed with that calibration. Targets (issue 4): camera constant
 * within 0.02 % of the truth on a clean standard, the unknown's lattice constant
 * within 0.05 %.
 */
import { describe, expect, it } from 'vitest';
import { calibrateCamera } from '../../../../core/calibration';
import { findPhase, phaseLibrary } from '../../../../core/crystal';
import { analyze, reindexAnalysis, type AnalysisSettings } from '../../../../core/pipeline';
import { simulatePattern, type SimulationSpec } from '../../../../core/simulate';
import { loadOpenCv } from '../../../../app/node/load-opencv';

const NOMINAL_LP = 0.8 / 28e-6;
const TRUE_LP = NOMINAL_LP * 1.023;

function spec(phaseId: string, latticeScale: number, seed: number): SimulationSpec {
  return {
    widthPx: 768,
    heightPx: 768,
    voltageV: 200e3,
    cameraLengthPx: TRUE_LP,
    frame: { centerXPx: 380.4, centerYPx: 391.8, axisRatio: 1.01, angleDeg: 40 },
    phases: [{ phase: findPhase(phaseId)!, latticeScale }],
    peakCounts: 2000,
    ringFwhmPx: 2.5,
    background: { levelCounts: 300 },
    beamStop: { radiusPx: 25, stemAngleDeg: 100, stemWidthPx: 16, transmission: 0.02 },
    seed,
  };
}

const settings = (nominal: boolean): AnalysisSettings => ({
  camera: { voltageV: 200e3, cameraLengthPx: NOMINAL_LP, cameraLengthSigmaPx: 0, source: nominal ? 'nominal 0.8 m' : '', calibrated: false },
  image: { bitsPerSample: 16, sampleFormat: 'uint' },
  phases: phaseLibrary(),
});

describe('calibrateCamera on a simulated gold standard', () => {
  const cv = loadOpenCv();
  const gold = findPhase('Au')!;

  it('recovers the camera length within 0.02 % and calibrates a TiN film at the same settings within 0.05 % in a', () => {
    const standard = analyze(simulatePattern(spec('Au', 1, 4101)).raster, settings(true), undefined, cv);
    const outcome = calibrateCamera([standard], gold, { nominalCameraLengthPx: NOMINAL_LP });
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    const c = outcome.calibration;
    const cameraError = c.cameraLengthPx / TRUE_LP - 1;
    console.log(`camera length: fitted ${c.cameraLengthPx.toFixed(2)} +- ${c.cameraLengthSigmaPx.toFixed(2)} px, truth ${TRUE_LP.toFixed(2)} px, error ${(cameraError * 1e6).toFixed(1)} ppm; ${c.residuals.length} rings`);
    expect(Math.abs(cameraError)).toBeLessThan(2e-4);
    expect(Math.abs(cameraError)).toBeLessThan(4 * c.cameraLengthSigmaPx / c.cameraLengthPx + 2e-5);
    expect(c.deviationFromNominal).toBeCloseTo(0.023, 3);
    expect(Math.abs(c.distortion.axisRatio - 1.01)).toBeLessThan(5e-4);

    const tinScale = 1.0012;
    const unknown = analyze(simulatePattern(spec('TiN', tinScale, 4102)).raster, settings(true), undefined, cv);
    const calibrated = reindexAnalysis(unknown, { voltageV: 200e3, cameraLengthPx: c.cameraLengthPx, cameraLengthSigmaPx: c.cameraLengthSigmaPx, source: 'gold standard', calibrated: true }, phaseLibrary());
    const best = calibrated.candidates[0]!;
    const trueA = findPhase('TiN')!.cell.aA * tinScale;
    const aError = best.aA / trueA - 1;
    console.log(`TiN: a = ${best.aA.toFixed(5)} +- ${best.aSigmaA.toFixed(5)} Å, truth ${trueA.toFixed(5)} Å, error ${(aError * 1e6).toFixed(1)} ppm`);
    expect(best.phase).toBe('TiN');
    expect(Math.abs(aError)).toBeLessThan(5e-4);
    // The camera's uncertainty is in the lattice constant's.
    expect(best.aSigmaA / best.aA).toBeGreaterThanOrEqual(0.99 * (c.cameraLengthSigmaPx / c.cameraLengthPx));
    expect(calibrated.warnings.join(' ')).not.toMatch(/nominal, not calibrated/);
  });

  it('warns when the fit is more than 5 % from the nominal camera length, and fails for a wrong standard', () => {
    const standard = analyze(simulatePattern(spec('Au', 1, 4103)).raster, settings(true), undefined, cv);
    const far = calibrateCamera([standard], gold, { nominalCameraLengthPx: TRUE_LP / 1.07, nominalWindow: 0.15 });
    expect(far.ok).toBe(true);
    if (far.ok) expect(far.calibration.warnings.join(' ')).toMatch(/differs from the nominal one by 7\.0 %/);
    const wrong = calibrateCamera([standard], findPhase('Si')!, { nominalCameraLengthPx: NOMINAL_LP, nominalWindow: 0.03 });
    expect(wrong.ok).toBe(false);
  });
});
