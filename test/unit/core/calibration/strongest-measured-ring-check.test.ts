/**
 * The refusal of a fit whose strongest measured ring is not the standard's, on a simulated
 * gold film (core/simulate). Tungsten (bcc, a = 3.165 Å; library value) aliases gold's
 * (fcc, a = 4.078 Å) 200, 220, 222 and 400 rings at a camera sqrt 2 x 3.165 / 4.078 = 1.098
 * times the true one (fcc d_200 = a/2 against bcc d_110 = a/sqrt 2), which leaves gold's
 * strongest ring, 111, unexplained.
 */
import { describe, expect, it } from 'vitest';
import { fitCameraOnStandard, strongestRingsNotOfStandard } from '../../../../core/calibration';
import { findPhase } from '../../../../core/crystal';
import { dSpacingFromRadiusA } from '../../../../core/physics';
import { simulatedStandard, TRUE_LP } from './simulated-standard';

describe('strongestRingsNotOfStandard', () => {
  const analysis = simulatedStandard('Au', 5301);
  const strongest = analysis.rings.reduce((best, r, i) => (r.snr > analysis.rings[best]!.snr ? i : best), 0);

  it('finds nothing when gold is calibrated on gold', () => {
    const outcome = fitCameraOnStandard([analysis], findPhase('Au')!, TRUE_LP);
    expect(outcome.ok).toBe(true);
    if (outcome.ok) expect(strongestRingsNotOfStandard(outcome.calibration, [analysis])).toEqual([]);
  });

  it("names gold's strongest ring, with its radius, SNR and d under the fit, when gold is calibrated on tungsten", () => {
    // Nominal camera 1.098 x the truth: the alias lies inside calibrateCamera's 15 % assignment window.
    const outcome = fitCameraOnStandard([analysis], findPhase('W')!, TRUE_LP * 1.098);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    const fit = outcome.calibration;
    expect(fit.standardRings[0]).not.toContain(strongest);
    const found = strongestRingsNotOfStandard(fit, [analysis]);
    expect(found).toHaveLength(1);
    const ring = analysis.rings[strongest]!;
    expect(found[0]).toEqual({ imageIndex: 0, ringIndex: strongest, radiusPx: ring.radiusPx, snr: ring.snr, dA: dSpacingFromRadiusA(ring.radiusPx, fit) });
    // Gold's 111 (d = 4.078 / sqrt 3 = 2.354 Å) seen under a camera about 1.098 x too long.
    expect(found[0]!.dA / 2.3545).toBeGreaterThan(1.05);
  });

  it('skips images without rings and reports the image index of the others', () => {
    const outcome = fitCameraOnStandard([analysis], findPhase('W')!, TRUE_LP * 1.098);
    if (!outcome.ok) throw new Error(outcome.reason);
    const fit = { ...outcome.calibration, standardRings: [[], ...outcome.calibration.standardRings] };
    const found = strongestRingsNotOfStandard(fit, [{ ...analysis, rings: [] }, analysis]);
    expect(found.map((f) => f.imageIndex)).toEqual([1]);
  });
});
