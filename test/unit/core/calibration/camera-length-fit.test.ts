import { describe, expect, it } from 'vitest';
import { fitCameraLength, type StandardRing } from '../../../../core/calibration';
import { electronWavelengthA, ringRadiusPx } from '../../../../core/physics';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

const lambda = electronWavelengthA(200e3);
// Gold d-spacings from a = 4.0786 Å (NBS Circular 539, from memory), N = h^2 + k^2 + l^2 of fcc.
const goldD = [3, 4, 8, 11, 12, 16, 19, 20].map((n) => 4.0786 / Math.sqrt(n));

function rings(lp: number, sigma: number, seed: number, outlierAt = -1): StandardRing[] {
  const rand = mulberry32(seed);
  return goldD.map((d, i) => ({
    hkl: [i, 0, 0] as const,
    radiusPx: ringRadiusPx(d, { wavelengthA: lambda, cameraLengthPx: lp }) + sigma * gaussian(rand) + (i === outlierAt ? 40 * sigma : 0),
    radiusSigmaPx: sigma,
    dRefA: d,
    label: `ring ${i + 1}`,
    imageIndex: 0,
  }));
}

describe('fitCameraLength', () => {
  it('recovers Lp exactly from exact radii (exact geometry, not small-angle)', () => {
    const fit = fitCameraLength(rings(30000, 1e-9, 1), lambda);
    expect(fit.ok).toBe(true);
    if (fit.ok) expect(fit.cameraLengthPx / 30000 - 1).toBeLessThan(1e-10);
  });

  it('gives a sigma that matches the scatter of 300 seeded fits (seeds 100-399) within 12 %', () => {
    const values: number[] = [];
    let predicted = 0;
    for (let s = 100; s < 400; s++) {
      const fit = fitCameraLength(rings(30000, 0.02, s), lambda);
      if (!fit.ok) throw new Error(fit.reason);
      values.push(fit.cameraLengthPx);
      predicted = fit.cameraLengthSigmaPropagatedPx;
    }
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const sd = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
    expect(Math.abs(sd / predicted - 1)).toBeLessThan(0.12);
  });

  it('rejects a ring 40 sigma off and reports it, keeping the fit on the others', () => {
    const fit = fitCameraLength(rings(30000, 0.02, 7, 3), lambda);
    expect(fit.ok).toBe(true);
    if (!fit.ok) return;
    expect(fit.residuals.filter((r) => r.rejected).map((r) => r.label)).toEqual(['ring 4']);
    expect(Math.abs(fit.cameraLengthPx / 30000 - 1)).toBeLessThan(2e-5);
    expect(fit.usedCount).toBe(7);
  });

  it('reports residuals in ppm of d consistent with the fitted camera', () => {
    const fit = fitCameraLength(rings(30000, 0.02, 9), lambda);
    if (!fit.ok) throw new Error(fit.reason);
    for (const r of fit.residuals) expect(r.residualPpm).toBeCloseTo((r.dFitA / r.dRefA - 1) * 1e6, 9);
  });

  it('refuses to calibrate on fewer than 3 rings, saying so', () => {
    const fit = fitCameraLength(rings(30000, 0.02, 3).slice(0, 2), lambda);
    expect(fit.ok).toBe(false);
    if (!fit.ok) expect(fit.reason).toMatch(/only 2 usable rings/);
  });
});
