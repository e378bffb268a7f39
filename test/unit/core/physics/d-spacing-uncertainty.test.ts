import { describe, expect, it } from 'vitest';
import { dSpacingFromRadiusA, dSpacingWithUncertainty, electronWavelengthA, electronWavelengthSlopeAPerV } from '../../../../core/physics';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

const camera = { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: 5000 };

describe('dSpacingWithUncertainty', () => {
  it('matches central finite differences of dSpacingFromRadiusA for each input', () => {
    const r = 900;
    const est = dSpacingWithUncertainty(r, 0.05, camera, { cameraLengthSigmaPx: 5, wavelengthSigmaA: 1e-6 });
    const h = 1e-3;
    const dR = (dSpacingFromRadiusA(r + h, camera) - dSpacingFromRadiusA(r - h, camera)) / (2 * h);
    const dL =
      (dSpacingFromRadiusA(r, { ...camera, cameraLengthPx: camera.cameraLengthPx + h }) -
        dSpacingFromRadiusA(r, { ...camera, cameraLengthPx: camera.cameraLengthPx - h })) / (2 * h);
    const hl = 1e-9;
    const dLam =
      (dSpacingFromRadiusA(r, { ...camera, wavelengthA: camera.wavelengthA + hl }) -
        dSpacingFromRadiusA(r, { ...camera, wavelengthA: camera.wavelengthA - hl })) / (2 * hl);
    expect(Math.sqrt(est.varianceParts.radius) / Math.abs(dR * 0.05) - 1).toBeLessThan(1e-6);
    expect(Math.sqrt(est.varianceParts.cameraLength) / Math.abs(dL * 5) - 1).toBeLessThan(1e-6);
    expect(Math.sqrt(est.varianceParts.wavelength) / Math.abs(dLam * 1e-6) - 1).toBeLessThan(1e-6);
  });

  it('agrees with a seeded Monte Carlo (seed 20261201, 40000 draws) to 3%', () => {
    const rand = mulberry32(20261201);
    const r = 1200;
    const sR = 0.3;
    const sL = 40;
    const est = dSpacingWithUncertainty(r, sR, camera, { cameraLengthSigmaPx: sL, wavelengthSigmaA: 0 });
    const n = 40000;
    let sum = 0;
    let sum2 = 0;
    for (let i = 0; i < n; i++) {
      const d = dSpacingFromRadiusA(r + sR * gaussian(rand), { ...camera, cameraLengthPx: camera.cameraLengthPx + sL * gaussian(rand) });
      sum += d;
      sum2 += d * d;
    }
    const sd = Math.sqrt(sum2 / n - (sum / n) ** 2);
    expect(Math.abs(sd / est.dSigmaA - 1)).toBeLessThan(0.03);
  });

  it('fully correlated radius and camera length errors of the same relative size cancel (small angle)', () => {
    // R and L scaled together leave R/L, hence d, unchanged: sigma_d -> 0 with rho = 1.
    const r = 300;
    const est = dSpacingWithUncertainty(r, r * 1e-3, camera, {
      cameraLengthSigmaPx: camera.cameraLengthPx * 1e-3,
      wavelengthSigmaA: 0,
      radiusCameraCorrelation: 1,
    });
    expect(est.dSigmaA / est.dA).toBeLessThan(1e-9);
  });

  it('rejects negative uncertainties and out-of-range correlations', () => {
    expect(() => dSpacingWithUncertainty(100, -1, camera, { cameraLengthSigmaPx: 0, wavelengthSigmaA: 0 })).toThrow(/radiusSigmaPx/);
    expect(() => dSpacingWithUncertainty(100, 0, camera, { cameraLengthSigmaPx: 0, wavelengthSigmaA: 0, radiusCameraCorrelation: 2 })).toThrow(/Correlation/);
  });
});

describe('electronWavelengthSlopeAPerV', () => {
  it('equals the finite-difference slope of electronWavelengthA', () => {
    for (const v of [80e3, 200e3, 1e6]) {
      const fd = (electronWavelengthA(v + 1) - electronWavelengthA(v - 1)) / 2;
      expect(electronWavelengthSlopeAPerV(v) / fd - 1).toBeLessThan(1e-6);
    }
  });
});
