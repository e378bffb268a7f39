import { describe, expect, it } from 'vitest';
import { integrateRadialProfile } from '../../../../core/rings/azimuthal-integration';
import { prepareIntegrationGeometry } from '../../../../core/rings/integration-geometry';
import {
  countingNoiseModel,
  estimateProfileNoiseModel,
  noiseVarianceAt,
  profileNoiseStdErr,
} from '../../../../core/rings/profile-noise-model';
import { gaussian, mulberry32 } from '../../../support/seeded-random';
import { poissonDeviate, renderAnalyticImage } from './analytic-ring-image';

const frame = { centerXPx: 70.4, centerYPx: 66.2, axisRatio: 1, angleDeg: 0 };
const g = prepareIntegrationGeometry(140, 130, frame);

/** Counts of a decaying background seen through a gain: value = counts / countsPerValue + read noise. */
function detectorImage(countsPerValue: number, readNoiseValue: number, seed: number, rings = [] as { radiusPx: number; fwhmPx: number; eta: number; area: number }[]) {
  const clean = renderAnalyticImage({ width: 140, height: 130, frame, rings, background: (r) => 900 * Math.exp(-r / 30) + 60, supersample: 2 });
  const rand = mulberry32(seed);
  const data = clean.data.map((mu) => poissonDeviate(mu, rand) / countsPerValue + readNoiseValue * gaussian(rand));
  return { width: 140, height: 130, data };
}

describe('estimateProfileNoiseModel', () => {
  it('finds the gain of a counting detector: variance = mean / c with c = 4 counts per value (seed 41)', () => {
    const p = integrateRadialProfile(detectorImage(4, 0, 41), null, g, { rMinPx: 4, rMaxPx: 64 });
    const m = estimateProfileNoiseModel(p)!;
    expect(m.source).toBe('linear');
    // Within 3 of its own standard errors, which are a few per cent of the slope here.
    expect(Math.abs(m.varianceSlope - 0.25)).toBeLessThan(3 * m.varianceSlopeSigma);
    expect(m.varianceSlopeSigma).toBeLessThan(0.04 * 0.25);
    expect(Math.abs(m.varianceOffset)).toBeLessThan(3 * m.varianceOffsetSigma);
  });

  it('finds read noise as the variance offset: sigma_r = 3 value units gives b = 9 (seed 42)', () => {
    const p = integrateRadialProfile(detectorImage(4, 3, 42), null, g, { rMinPx: 4, rMaxPx: 64 });
    const m = estimateProfileNoiseModel(p)!;
    expect(Math.abs(m.varianceSlope - 0.25)).toBeLessThan(3 * m.varianceSlopeSigma);
    expect(Math.abs(m.varianceOffset - 9)).toBeLessThan(3 * m.varianceOffsetSigma);
    expect(m.varianceOffsetSigma).toBeLessThan(1.5);
  });

  it('is not pulled by ring bins left in, nor when they are excluded (seed 43)', () => {
    const rings = [{ radiusPx: 30.3, fwhmPx: 2.5, eta: 0.3, area: 3000 }, { radiusPx: 50.8, fwhmPx: 3, eta: 0.3, area: 2000 }];
    const p = integrateRadialProfile(detectorImage(2, 0, 43, rings), null, g, { rMinPx: 4, rMaxPx: 64 });
    const all = estimateProfileNoiseModel(p)!;
    expect(Math.abs(all.varianceSlope - 0.5)).toBeLessThan(3 * all.varianceSlopeSigma);
    const exclude = p.radiusPx.map((r) => (rings.some((ring) => Math.abs(r - ring.radiusPx) < 9) ? 1 : 0));
    const away = estimateProfileNoiseModel(p, { exclude })!;
    expect(Math.abs(away.varianceSlope - 0.5)).toBeLessThan(3 * away.varianceSlopeSigma);
    expect(away.binsUsed).toBeLessThan(all.binsUsed);
  });

  it('falls back to a constant variance over a flat background, where the slope cannot be told', () => {
    const rand = mulberry32(44);
    const img = { width: 140, height: 130, data: Float32Array.from({ length: 140 * 130 }, () => 100 + 5 * gaussian(rand)) };
    const m = estimateProfileNoiseModel(integrateRadialProfile(img, null, g, { rMinPx: 4, rMaxPx: 64 }))!;
    expect(m.source).toBe('constant');
    expect(m.varianceSlope).toBe(0);
    expect(Math.abs(m.varianceOffset - 25)).toBeLessThan(3 * m.varianceOffsetSigma);
  });

  it('returns null for a profile with fewer than 5 usable bins', () => {
    const img = { width: 140, height: 130, data: new Float32Array(140 * 130).fill(1) };
    const p = integrateRadialProfile(img, null, g, { rMinPx: 0, rMaxPx: 3, binWidthPx: 1 });
    expect(estimateProfileNoiseModel(p)).toBeNull();
    expect(() => estimateProfileNoiseModel(p, { exclude: [1] })).toThrow(/one entry per profile bin/);
  });
});

describe('countingNoiseModel / noiseVarianceAt / profileNoiseStdErr', () => {
  it('gives variance mu / c + sigma_r^2 and the standard error of each bin mean', () => {
    const m = countingNoiseModel(4, 2);
    expect(noiseVarianceAt(m, 40)).toBeCloseTo(14, 12);
    const p = integrateRadialProfile({ width: 140, height: 130, data: new Float32Array(140 * 130).fill(40) }, null, g, { rMinPx: 10, rMaxPx: 20 });
    const e = profileNoiseStdErr(p, m);
    expect(e[5]).toBeCloseTo(Math.sqrt(14 / p.area[5]!), 12);
  });
  it('refuses a non-positive gain or negative read noise', () => {
    expect(() => countingNoiseModel(0)).toThrow(/countsPerValue must be positive/);
    expect(() => countingNoiseModel(1, -1)).toThrow(/readNoiseValue/);
  });
});
