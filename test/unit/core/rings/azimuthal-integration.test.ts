import { describe, expect, it } from 'vitest';
import { binScatterVariance, integrateRadialProfile } from '../../../../core/rings/azimuthal-integration';
import { prepareIntegrationGeometry } from '../../../../core/rings/integration-geometry';
import { correctedAzimuthRad, frameTransform } from '../../../../core/rings/pattern-frame';
import { mulberry32 } from '../../../support/seeded-random';
import { renderAnalyticImage, withPoissonNoise } from './analytic-ring-image';

const frame = { centerXPx: 60.37, centerYPx: 57.81, axisRatio: 1.025, angleDeg: 35 };

function constantImage(width: number, height: number, value: number) {
  return { width, height, data: new Float32Array(width * height).fill(value) };
}

describe('integrateRadialProfile', () => {
  const g = prepareIntegrationGeometry(120, 110, frame);

  it('gives a uniform image its value in every bin with zero scatter, and areas that add up to the pixels', () => {
    for (const subdivision of [1, 2, 3]) {
      const p = integrateRadialProfile(constantImage(120, 110, 7), null, g, { subdivision, binWidthPx: 0.5 });
      let area = 0;
      for (let k = 0; k < p.mean.length; k++) {
        area += p.area[k]!;
        if (p.area[k]! > 0) expect(p.mean[k]).toBeCloseTo(7, 5);
        if (p.area[k]! > 20) expect(p.stdErr[k]!).toBeLessThan(1e-4);
      }
      // The default range covers every pixel, so every pixel's area lands in some bin.
      expect(area).toBeCloseTo(120 * 110, 6);
    }
  });

  it('makes each bin as large as its annulus, 2 pi r w, in the area-preserving elliptical frame', () => {
    const p = integrateRadialProfile(constantImage(120, 110, 1), null, g, { subdivision: 4, binWidthPx: 1, rMinPx: 10, rMaxPx: 50 });
    for (let k = 0; k < p.mean.length; k++) {
      const annulus = 2 * Math.PI * p.radiusPx[k]! * 1;
      expect(Math.abs(p.area[k]! / annulus - 1)).toBeLessThan(0.02);
    }
  });

  it('sums the values it covers: the bins of a restricted range hold the split share of each pixel', () => {
    const rand = mulberry32(31);
    const img = { width: 120, height: 110, data: Float32Array.from({ length: 120 * 110 }, () => 100 * rand()) };
    const whole = integrateRadialProfile(img, null, g, { subdivision: 3, binWidthPx: 0.5 });
    let total = 0;
    for (let p = 0; p < img.data.length; p++) total += img.data[p]!;
    expect(whole.sum.reduce((a, b) => a + b, 0)).toBeCloseTo(total, 3);
    // A sub-range is a slice of the whole (same bin edges when rMin is a multiple of w).
    const part = integrateRadialProfile(img, null, g, { subdivision: 3, binWidthPx: 0.5, rMinPx: 20, rMaxPx: 30 });
    for (let k = 0; k < part.mean.length; k++) {
      expect(part.sum[k]).toBeCloseTo(whole.sum[k + 40]!, 6);
      expect(part.area[k]).toBeCloseTo(whole.area[k + 40]!, 9);
    }
  });

  it('honours the mask and skips non-finite pixel values', () => {
    const img = constantImage(120, 110, 5);
    const mask = { width: 120, height: 110, excluded: new Uint8Array(120 * 110) };
    for (let j = 0; j < 110; j++) for (let i = 0; i < 60; i++) {
      mask.excluded[j * 120 + i] = 1;
      img.data[j * 120 + i] = 1e9;
    }
    img.data[30 * 120 + 100] = Number.NaN;
    img.data[31 * 120 + 100] = Number.POSITIVE_INFINITY;
    const p = integrateRadialProfile(img, mask, g, { subdivision: 2, binWidthPx: 0.5 });
    let area = 0;
    for (let k = 0; k < p.mean.length; k++) {
      area += p.area[k]!;
      if (p.area[k]! > 0) expect(p.mean[k]).toBeCloseTo(5, 5);
    }
    expect(area).toBeCloseTo(60 * 110 - 2, 6);
  });

  it('gives empty bins NaN mean and stdErr and zero area (the centre outside the image)', () => {
    const g2 = prepareIntegrationGeometry(40, 40, { centerXPx: -30, centerYPx: 20, axisRatio: 1, angleDeg: 0 });
    const p = integrateRadialProfile(constantImage(40, 40, 1), null, g2, { binWidthPx: 1, rMinPx: 0, rMaxPx: 60 });
    expect(p.area[10]).toBe(0);
    expect(Number.isNaN(p.mean[10]!)).toBe(true);
    expect(Number.isNaN(p.stdErr[10]!)).toBe(true);
    expect(p.area[45]!).toBeGreaterThan(10);
  });

  it('estimates stdErr from the scatter as Poisson noise would, on the flat background and across ring flanks (seed 8)', () => {
    const rings = [{ radiusPx: 30.2, fwhmPx: 2.5, eta: 0.2, area: 4000 }];
    const clean = renderAnalyticImage({ width: 120, height: 110, frame, rings, background: () => 150, supersample: 4 });
    const img = withPoissonNoise(clean, mulberry32(8));
    const p = integrateRadialProfile(img, null, g, { subdivision: 3, binWidthPx: 0.5, rMinPx: 8, rMaxPx: 52 });
    const ratios: number[] = [];
    const flank: number[] = [];
    for (let k = 0; k < p.mean.length; k++) {
      const poisson = Math.sqrt(p.mean[k]! / p.area[k]!);
      const ratio = p.stdErr[k]! / poisson;
      ratios.push(ratio);
      if (Math.abs(p.radiusPx[k]! - 30.2) < 2.5) flank.push(ratio);
    }
    const median = (a: number[]) => [...a].sort((x, y) => x - y)[a.length >> 1]!;
    expect(Math.abs(median(ratios) - 1)).toBeLessThan(0.05);
    // The quadratic in radius within each bin keeps the steep flanks (up to 1300 counts/px per px) from counting as noise.
    expect(median(flank)).toBeLessThan(1.15);
    expect(median(flank)).toBeGreaterThan(0.85);
  });

  it('gives the Poisson standard error sqrt(mean / c + readNoise^2) / sqrt(area) when asked', () => {
    const p = integrateRadialProfile(constantImage(120, 110, 40), null, g, { noise: { kind: 'poisson', countsPerValue: 4, readNoiseValue: 2 } });
    expect(p.stdErrSource).toBe('poisson');
    const k = 80;
    expect(p.stdErr[k]).toBeCloseTo(Math.sqrt(40 / 4 + 4) / Math.sqrt(p.area[k]!), 10);
  });

  it('counts split pixels as more effective samples than their area, and whole pixels as exactly their area', () => {
    const whole = integrateRadialProfile(constantImage(120, 110, 1), null, g, { subdivision: 1, binWidthPx: 0.5, rMinPx: 10, rMaxPx: 40 });
    const split = integrateRadialProfile(constantImage(120, 110, 1), null, g, { subdivision: 3, binWidthPx: 0.5, rMinPx: 10, rMaxPx: 40 });
    for (let k = 0; k < whole.mean.length; k++) {
      expect(whole.effectiveCount![k]).toBeCloseTo(whole.area[k]!, 9);
      expect(split.effectiveCount![k]!).toBeGreaterThan(1.3 * split.area[k]!);
    }
  });

  it('restricts the profile to an azimuthal sector of whole pixels', () => {
    const full = integrateRadialProfile(constantImage(120, 110, 1), null, g, { binWidthPx: 1, rMinPx: 10, rMaxPx: 40 });
    const sector = { startRad: Math.PI / 2, widthRad: Math.PI / 2 };
    const quarter = integrateRadialProfile(constantImage(120, 110, 1), null, g, { binWidthPx: 1, rMinPx: 10, rMaxPx: 40, sector });
    const a = full.area.reduce((x, y) => x + y, 0);
    const q = quarter.area.reduce((x, y) => x + y, 0);
    expect(Math.abs(q / a - 0.25)).toBeLessThan(0.01);
    // Every pixel that contributed lies in the sector: a sector image that is 1 inside and 0 outside averages to 1.
    const t = frameTransform(frame);
    const img = constantImage(120, 110, 0);
    for (let j = 0; j < 110; j++) for (let i = 0; i < 120; i++) {
      const az = correctedAzimuthRad(t, i, j);
      if (az >= Math.PI / 2) img.data[j * 120 + i] = 1;
    }
    const inside = integrateRadialProfile(img, null, g, { binWidthPx: 1, rMinPx: 10, rMaxPx: 40, sector });
    for (let k = 0; k < inside.mean.length; k++) expect(inside.mean[k]).toBeCloseTo(1, 12);
  });

  it('refuses options out of range, naming them', () => {
    const img = constantImage(120, 110, 1);
    expect(() => integrateRadialProfile(img, null, g, { rMinPx: -1 })).toThrow(/rMinPx must be a finite number >= 0; got -1/);
    expect(() => integrateRadialProfile(img, null, g, { rMinPx: 5, rMaxPx: 5 })).toThrow(/rMaxPx must be finite and greater than rMinPx/);
    expect(() => integrateRadialProfile(img, null, g, { binWidthPx: 0 })).toThrow(/binWidthPx must be a positive/);
    expect(() => integrateRadialProfile(img, null, g, { subdivision: 0 })).toThrow(/subdivision/);
    expect(() => integrateRadialProfile(img, null, g, { sector: { startRad: 0, widthRad: 0 } })).toThrow(/sector.widthRad/);
    expect(() => integrateRadialProfile(img, null, g, { noise: { kind: 'poisson', countsPerValue: 0 } })).toThrow(/countsPerValue/);
    expect(() => integrateRadialProfile(constantImage(10, 10, 1), null, g)).toThrow(/raster is 10 x 10/);
  });
});

describe('binScatterVariance', () => {
  it('is the residual variance about a least-squares quadratic in x, over n - 3', () => {
    // y = 2 + 3x - x^2 plus known residuals e with sum e = sum x e = sum x^2 e = 0 would be exact; use a generic set instead.
    const xs = [-0.4, -0.3, -0.1, 0, 0.1, 0.2, 0.35, 0.45];
    const es = [0.5, -0.2, 0.1, -0.4, 0.3, -0.1, 0.2, -0.3];
    const m = new Float64Array(9);
    xs.forEach((x, i) => {
      const y = 2 + 3 * x - x * x + es[i]!;
      m[0] += 1; m[1] += x; m[2] += x * x; m[3] += x ** 3; m[4] += x ** 4;
      m[5] += y; m[6] += x * y; m[7] += x * x * y; m[8] += y * y;
    });
    // Reference: ordinary least squares via the normal equations solved here independently (Gaussian elimination).
    const a = [[m[0]!, m[1]!, m[2]!], [m[1]!, m[2]!, m[3]!], [m[2]!, m[3]!, m[4]!]];
    const b = [m[5]!, m[6]!, m[7]!];
    for (let c = 0; c < 3; c++) for (let r = c + 1; r < 3; r++) {
      const f = a[r]![c]! / a[c]![c]!;
      for (let k = c; k < 3; k++) a[r]![k]! -= f * a[c]![k]!;
      b[r]! -= f * b[c]!;
    }
    const beta = [0, 0, 0];
    for (let r = 2; r >= 0; r--) {
      let sum = b[r]!;
      for (let k = r + 1; k < 3; k++) sum -= a[r]![k]! * beta[k]!;
      beta[r] = sum / a[r]![r]!;
    }
    const rss = xs.reduce((acc, x, i) => acc + (2 + 3 * x - x * x + es[i]! - (beta[0]! + beta[1]! * x + beta[2]! * x * x)) ** 2, 0);
    expect(binScatterVariance(m)).toBeCloseTo(rss / (8 - 3), 10);
  });
  it('is NaN for a bin of two pixels or fewer', () => {
    expect(Number.isNaN(binScatterVariance(Float64Array.from([2, 0, 0, 0, 0, 3, 0, 0, 5])))).toBe(true);
  });
});
