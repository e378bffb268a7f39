/**
 * The two-pass fit on a simulated gold film (core/simulate, camera length known exactly),
 * analysed under cameras far from the truth. Target of issue 4: the camera length within
 * 0.02 % of the truth on a clean standard. The reference a of gold is the phase library's
 * (NBS Circular 539, from memory, as the library says).
 */
import { describe, expect, it } from 'vitest';
import { fitCameraOnStandard } from '../../../../core/calibration';
import { findPhase } from '../../../../core/crystal';
import { simulatedStandard, TRUE_LP } from './simulated-standard';

const gold = findPhase('Au')!;

describe('fitCameraOnStandard', () => {
  it.each([
    ['half', 0.5],
    ['2.5 times', 2.5],
  ])('recovers the camera length within 0.02 %% from an analysis made under a camera %s the truth, with no nominal camera', (_, factor) => {
    const analysis = simulatedStandard('Au', 5201, TRUE_LP * factor);
    const outcome = fitCameraOnStandard([analysis], gold, null);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    const fit = outcome.calibration;
    const error = fit.cameraLengthPx / TRUE_LP - 1;
    console.log(`analysed at ${factor} x the camera: L/p ${fit.cameraLengthPx.toFixed(3)} +- ${fit.cameraLengthSigmaPx.toFixed(3)} px, error ${(error * 1e6).toFixed(1)} ppm, ${fit.residuals.map((r) => r.hkl.join('')).join(' ')}`);
    expect(Math.abs(error)).toBeLessThan(2e-4);
    expect(fit.nominalCameraLengthPx).toBeNull();
    // Gold's rings (fcc: h, k, l all odd or all even) from 111 outwards are matched.
    expect(fit.residuals.map((r) => r.hkl.join(''))).toEqual(expect.arrayContaining(['111', '200', '220', '311', '222', '400']));
    // Every measured ring of a clean gold film is gold's.
    expect(fit.standardRings[0]!.length).toBe(analysis.rings.length);
  });

  it('uses the nominal camera length: a fit 7 % from it is warned about', () => {
    const analysis = simulatedStandard('Au', 5202);
    const outcome = fitCameraOnStandard([analysis], gold, TRUE_LP / 1.07);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.calibration.nominalCameraLengthPx).toBeCloseTo(TRUE_LP / 1.07, 6);
    expect(outcome.calibration.warnings.join(' ')).toMatch(/differs from the nominal one by 7\.0 %/);
  });

  it('gives a reason, not a fit, when the analyses hold no rings', () => {
    const analysis = simulatedStandard('Au', 5203);
    const outcome = fitCameraOnStandard([{ ...analysis, rings: [] }], gold, null);
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.reason).toMatch(/\S/);
  });
});
