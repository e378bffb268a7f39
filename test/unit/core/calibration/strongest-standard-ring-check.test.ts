/**
 * The refusal of a fit in which the standard's strongest ring, inside the measured range, was
 * not matched, on a simulated gold film (core/simulate) with its strongest measured ring, 111
 * (also gold's strongest by the library's kinematic intensities, core/crystal predictRings),
 * taken out of the measured rings.
 */
import { describe, expect, it } from 'vitest';
import { fitCameraOnStandard, missingStrongestStandardRings } from '../../../../core/calibration';
import { findPhase } from '../../../../core/crystal';
import { simulatedStandard, TRUE_LP } from './simulated-standard';

const gold = findPhase('Au')!;

describe('missingStrongestStandardRings', () => {
  const analysis = simulatedStandard('Au', 5401);
  const strongest = analysis.rings.reduce((best, r, i) => (r.snr > analysis.rings[best]!.snr ? i : best), 0);
  const without111 = { ...analysis, rings: analysis.rings.filter((_, i) => i !== strongest) };

  it('finds nothing on the whole gold film', () => {
    const outcome = fitCameraOnStandard([analysis], gold, TRUE_LP);
    if (!outcome.ok) throw new Error(outcome.reason);
    expect(missingStrongestStandardRings(outcome.calibration, [analysis], gold)).toEqual([]);
  });

  it("names gold's 111 and where it would lie when that ring is missing from the measured rings", () => {
    const outcome = fitCameraOnStandard([without111], gold, TRUE_LP);
    if (!outcome.ok) throw new Error(outcome.reason);
    const found = missingStrongestStandardRings(outcome.calibration, [without111], gold);
    expect(found).toHaveLength(1);
    expect(found[0]!.imageIndex).toBe(0);
    expect(found[0]!.ring.families.map((f) => f.hkl.join(''))).toEqual(['111']);
    // d_111 = a / sqrt 3 with the library's a of gold.
    expect(found[0]!.ring.dA).toBeCloseTo(gold.cell.aA / Math.sqrt(3), 6);
    // Under the fitted camera it would lie where the film's 111 ring was measured (the fit is good to ppm).
    expect(Math.abs(found[0]!.radiusPx - analysis.rings[strongest]!.radiusPx)).toBeLessThan(0.05);
  });

  it('finds nothing when the strongest ring lies inside the profile\'s inner edge (outside the measured range)', () => {
    const outcome = fitCameraOnStandard([without111], gold, TRUE_LP);
    if (!outcome.ok) throw new Error(outcome.reason);
    const inner = { ...without111, profile: { ...without111.profile, rMinPx: analysis.rings[strongest]!.radiusPx + 1 } };
    expect(missingStrongestStandardRings(outcome.calibration, [inner], gold)).toEqual([]);
  });

  it('finds nothing for an image without rings, and reports the image index of the others', () => {
    const outcome = fitCameraOnStandard([without111], gold, TRUE_LP);
    if (!outcome.ok) throw new Error(outcome.reason);
    const found = missingStrongestStandardRings(outcome.calibration, [{ ...analysis, rings: [] }, without111], gold);
    // The second image, without its 111 ring, is the one named.
    expect(found.map((f) => f.imageIndex)).toEqual([1]);
  });
});
