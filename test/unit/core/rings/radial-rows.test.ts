/**
 * The radial pass as the unit of partitioned work (accumulateRadialRows):
 *  - its sub-pixel bins are exactly those of plain s x s splitting with a square
 *    root for every sub-pixel (written out here as the reference), for many
 *    frames, subdivisions and bin widths, though it takes most bins from a
 *    first-order expansion of the radius;
 *  - sums over bands of rows, merged, equal the sums over the whole image
 *    (counts and integer value sums exactly, scatter moments to rounding).
 */
import { describe, expect, it } from 'vitest';
import {
  accumulateRadialRows,
  integrateRadialProfile,
  mergeRadialAccumulators,
  radialProfileFromAccumulators,
  type RadialAccumulators,
  type RadialBinning,
} from '../../../../core/rings/azimuthal-integration';
import { integrationFrame, prepareIntegrationGeometry, subPixelOffsets, type IntegrationFrame } from '../../../../core/rings/integration-geometry';
import type { PatternFrame } from '../../../../core/rings/pattern-frame';
import { splitRows } from '../../../../core/rings/row-bands';
import { mulberry32 } from '../../../support/seeded-random';

interface TestImage {
  width: number;
  height: number;
  data: Float32Array;
}

/** Integer counts around 100-400 with a few NaN and infinite samples (seeded). */
function integerImage(width: number, height: number, seed: number): TestImage {
  const rand = mulberry32(seed);
  const data = Float32Array.from({ length: width * height }, () => Math.floor(100 + 300 * rand()));
  data[3] = Number.NaN;
  data[width + 5] = Number.POSITIVE_INFINITY;
  return { width, height, data };
}

function randomMask(width: number, height: number, seed: number) {
  const rand = mulberry32(seed);
  return { width, height, excluded: Uint8Array.from({ length: width * height }, () => (rand() < 0.1 ? 1 : 0)) };
}

/**
 * The reference: every sub-pixel's radius by its own square root, each to the bin
 * floor((R - rMin) / w); the sums kept as in accumulateRadialRows (integer counts,
 * count x value, squared counts per pixel and bin), the moments of whole pixels in
 * the bin of their centre.
 */
function referenceSums(img: TestImage, mask: Uint8Array | null, g: IntegrationFrame, b: RadialBinning): RadialAccumulators {
  const n = b.binCount;
  const count = new Float64Array(n), squares = new Float64Array(n), values = new Float64Array(n), moments = new Float64Array(9 * n);
  const off = subPixelOffsets(b.subdivision);
  const invW = 1 / b.binWidthPx;
  const t = g.transform;
  for (let j = 0; j < img.height; j++) {
    const dy = j - t.cy;
    for (let i = 0; i < img.width; i++) {
      const p = j * img.width + i;
      const v = img.data[p]!;
      if ((mask && mask[p]) || !Number.isFinite(v)) continue;
      const dx = i - t.cx;
      const r0 = Math.sqrt(dx * (g.kxx * dx + 2 * g.kxy * dy) + g.kyy * dy * dy);
      const u0 = (r0 - b.rMinPx) * invW;
      if (u0 >= 0 && u0 < n) {
        const k = Math.floor(u0);
        const x = r0 - (b.rMinPx + (k + 0.5) * b.binWidthPx);
        const m = [1, x, x * x, x * x * x, x * x * x * x, v, x * v, x * x * v, v * v];
        for (let q = 0; q < 9; q++) moments[9 * k + q] += m[q]!;
      }
      const perBin = new Map<number, number>();
      for (const oy of off) {
        const yy = dy + oy;
        for (const ox of off) {
          const xs = dx + ox;
          const u = (Math.sqrt(xs * (g.kxx * xs + 2 * g.kxy * yy) + g.kyy * yy * yy) - b.rMinPx) * invW;
          if (u < 0 || u >= n) continue;
          const k = Math.floor(u);
          perBin.set(k, (perBin.get(k) ?? 0) + 1);
        }
      }
      for (const [k, c] of perBin) {
        count[k] += c;
        squares[k] += c * c;
        values[k] += c * v;
      }
    }
  }
  return { subPixelCount: count, subPixelCountSquared: squares, subPixelValueSum: values, moments };
}

function binning(g: IntegrationFrame, rMinPx: number, binWidthPx: number, subdivision: number): RadialBinning {
  return { rMinPx, binWidthPx, subdivision, binCount: Math.ceil((g.maxRadiusPx + 1 - rMinPx) / binWidthPx - 1e-9), sector: null };
}

/** Largest |a - b| relative to the largest |b| of each moment kind (n, x, x^2, ...). */
function momentRelativeDifference(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let q = 0; q < 9; q++) {
    let scale = 0, diff = 0;
    for (let k = q; k < a.length; k += 9) {
      scale = Math.max(scale, Math.abs(b[k]!));
      diff = Math.max(diff, Math.abs(a[k]! - b[k]!));
    }
    if (scale > 0) worst = Math.max(worst, diff / scale);
  }
  return worst;
}

const FRAMES: PatternFrame[] = [
  { centerXPx: 63.37, centerYPx: 58.81, axisRatio: 1.025, angleDeg: 35 },
  { centerXPx: 60, centerYPx: 55, axisRatio: 1, angleDeg: 0 }, // centre on a pixel centre: many radii tie
  { centerXPx: 59.5, centerYPx: 60.5, axisRatio: 1.1, angleDeg: 90 }, // on a pixel corner, strong distortion
  { centerXPx: -35.2, centerYPx: 40.7, axisRatio: 1.012, angleDeg: 151 }, // centre outside: arcs
  { centerXPx: 130.4, centerYPx: 118.3, axisRatio: 1.3, angleDeg: 12.5 }, // beyond the far corner
];

describe('accumulateRadialRows', () => {
  const img = integerImage(128, 116, 501);
  const mask = randomMask(128, 116, 502);

  it('bins every sub-pixel exactly as splitting with a square root per sub-pixel (5 frames x s 2-5 x w 0.1-1 px, seeds 501-502)', () => {
    let cases = 0;
    for (const frame of FRAMES) {
      const g = integrationFrame(img.width, img.height, frame);
      for (const s of [2, 3, 4, 5]) {
        for (const [rMin, w] of [[0, 0.5], [3.3, 0.25], [7, 1], [0.4, 0.1]] as const) {
          const b = binning(g, rMin, w, s);
          const got = accumulateRadialRows(img, mask, g, b, 0, img.height);
          const want = referenceSums(img, mask.excluded, g, b);
          expect(Array.from(got.subPixelCount)).toEqual(Array.from(want.subPixelCount));
          expect(Array.from(got.subPixelCountSquared)).toEqual(Array.from(want.subPixelCountSquared));
          // Integer values: every product and sum is exact, whatever the order.
          expect(Array.from(got.subPixelValueSum)).toEqual(Array.from(want.subPixelValueSum));
          expect(momentRelativeDifference(got.moments, want.moments)).toBeLessThan(1e-12);
          cases++;
        }
      }
    }
    expect(cases).toBe(80);
  });

  it('gives the same profile as before the screening: area, mean and stdErr against the plain float sums to 1e-12', () => {
    // The earlier integration summed each pixel's fraction f = c / s^2 as floats; the counts
    // now summed as integers differ from it by rounding only.
    const frame = FRAMES[0]!;
    const g = prepareIntegrationGeometry(img.width, img.height, frame);
    const p = integrateRadialProfile(img, mask, g, { subdivision: 3, binWidthPx: 0.5 });
    const b = binning(g, 0, 0.5, 3);
    const ref = referenceSums(img, mask.excluded, g, b);
    for (let k = 0; k < b.binCount; k++) {
      if (ref.subPixelCount[k] === 0) continue;
      expect(Math.abs(p.area[k]! - ref.subPixelCount[k]! / 9)).toBeLessThan(1e-12 * p.area[k]!);
      expect(Math.abs(p.mean[k]! - ref.subPixelValueSum[k]! / ref.subPixelCount[k]!)).toBeLessThan(1e-12 * p.mean[k]!);
    }
  });

  it('sums over bands of rows merge into the sums over the whole image: counts and integer value sums exactly, moments to 1e-13', () => {
    for (const frame of FRAMES) {
      const g = integrationFrame(img.width, img.height, frame);
      const b = binning(g, 2, 0.5, 3);
      const whole = accumulateRadialRows(img, mask, g, b, 0, img.height);
      for (const bandCount of [2, 3, 7]) {
        const parts = splitRows(img.height, bandCount).map((band) => accumulateRadialRows(img, mask, g, b, band.rowStart, band.rowEnd));
        const merged = mergeRadialAccumulators(parts);
        expect(Array.from(merged.subPixelCount)).toEqual(Array.from(whole.subPixelCount));
        expect(Array.from(merged.subPixelCountSquared)).toEqual(Array.from(whole.subPixelCountSquared));
        expect(Array.from(merged.subPixelValueSum)).toEqual(Array.from(whole.subPixelValueSum));
        expect(momentRelativeDifference(merged.moments, whole.moments)).toBeLessThan(1e-13);
        // And so the profiles: the same bins, mean and area; stdErr (from the moments) to 1e-9.
        const pw = radialProfileFromAccumulators(whole, b);
        const pm = radialProfileFromAccumulators(merged, b);
        expect(Array.from(pm.area)).toEqual(Array.from(pw.area));
        expect(Array.from(pm.mean)).toEqual(Array.from(pw.mean));
        for (let k = 0; k < b.binCount; k++) {
          if (Number.isFinite(pw.stdErr[k]!)) expect(Math.abs(pm.stdErr[k]! - pw.stdErr[k]!)).toBeLessThanOrEqual(1e-9 * pw.stdErr[k]!);
          else expect(Number.isNaN(pm.stdErr[k]!)).toBe(true);
        }
      }
    }
  });

  it('adds nothing for an empty band of rows, and refuses parts of different sizes', () => {
    const g = integrationFrame(img.width, img.height, FRAMES[0]!);
    const b = binning(g, 0, 0.5, 3);
    const none = accumulateRadialRows(img, mask, g, b, 40, 40);
    expect(none.subPixelCount.every((c) => c === 0)).toBe(true);
    expect(() => mergeRadialAccumulators([])).toThrow(/at least one part/);
    const other = accumulateRadialRows(img, mask, g, { ...b, binCount: b.binCount - 1 }, 0, 1);
    expect(() => mergeRadialAccumulators([none, other])).toThrow(/bins/);
  });
});

describe('integrationFrame', () => {
  it('finds the same smallest and largest pixel radius as the per-pixel table, exactly (60 seeded frames, seed 503)', () => {
    const rand = mulberry32(503);
    for (let trial = 0; trial < 60; trial++) {
      const width = 1 + Math.floor(rand() * 90);
      const height = 1 + Math.floor(rand() * 90);
      const frame = {
        centerXPx: -60 + rand() * (width + 120),
        centerYPx: -60 + rand() * (height + 120),
        axisRatio: 1 + (trial % 3 === 0 ? 0 : rand() * 0.6),
        angleDeg: rand() * 180,
      };
      const table = prepareIntegrationGeometry(width, height, frame);
      const light = integrationFrame(width, height, frame);
      expect(light.minRadiusPx).toBe(table.minRadiusPx);
      expect(light.maxRadiusPx).toBe(table.maxRadiusPx);
      expect(light.kxx).toBe(table.kxx);
      expect(light.kxy).toBe(table.kxy);
      expect(light.kyy).toBe(table.kyy);
      expect('radiusPx' in light).toBe(false);
    }
  });
});
