/**
 * How the noise of one pixel grows with its level, estimated from the image
 * itself: var(level) = readVariance + varianceSlope * level. A counting detector
 * behind a gain g with read noise s has exactly this form (var = s^2 + g * signal,
 * the photon-transfer relation; common practice in detector characterisation),
 * with any pedestal absorbed into readVariance.
 *
 * Estimate: second differences d = v(i-1, j) - 2 v(i, j) + v(i+1, j) of
 * horizontal triples of unmasked pixels have variance 6 var(v) where the image is
 * locally linear (first differences would also carry the slope of every ring
 * flank). The triples are sorted into 24 bins of their mean level, equally spaced
 * in sqrt(level) over the 0.1-99.9 % range; in each bin of at least 100 triples the
 * variance is (1.4826 MAD(d))^2 / 6 (the MAD is robust to ring crests, spots and
 * hot pixels; 1.4826 makes it the standard deviation of a normal distribution),
 * and a straight line is fitted to variance against level by least squares, each
 * bin weighted by the inverse variance of its estimate (count / variance^2).
 */
import type { Raster } from '../image/raster';
import type { PixelMask } from './pixel-mask';
import { medianInPlace, selectTwoInPlace } from './sample-median';

export interface PixelNoiseModel {
  /** Variance at level 0, (data units)^2 (may be negative when the camera adds a pedestal). */
  readVariance: number;
  /** Increase of variance per unit level, data units (>= 0; the gain of a counting detector). */
  varianceSlope: number;
  /** Smallest variance seen in any level bin, the floor applied by noiseSigmaAt. */
  minimumVariance: number;
  /** Pixel triples that went into the estimate. */
  pairCount: number;
}

const LEVEL_BINS = 24;
const MAX_TRIPLES = 200_000;
/** Fewest triples a level bin needs to count. */
const MIN_BIN_COUNT = 100;

/**
 * @param raster the image
 * @param mask pixels to ignore (optional)
 * @returns the model; for an image with fewer than 48 usable triples, a model of zero noise
 *   with pairCount saying so (callers treat pairCount < 48 as "unknown")
 */
export function estimatePixelNoise(raster: Raster, mask?: PixelMask): PixelNoiseModel {
  const { width, height, data } = raster;
  const excluded = mask?.excluded;
  const rowStep = Math.max(1, Math.floor((height * (width / 3)) / MAX_TRIPLES));
  const levels: number[] = [];
  const diffs: number[] = [];
  for (let j = 0; j < height; j += rowStep) {
    const base = j * width;
    for (let i = 1; i + 1 < width; i += 3) {
      const p = base + i;
      if (excluded && (excluded[p - 1] || excluded[p] || excluded[p + 1])) continue;
      const a = data[p - 1]!;
      const b = data[p]!;
      const c = data[p + 1]!;
      if (!Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(c)) continue;
      levels.push((a + b + c) / 3);
      diffs.push(a - 2 * b + c);
    }
  }
  const n = levels.length;
  if (n < 2 * LEVEL_BINS) return { readVariance: 0, varianceSlope: 0, minimumVariance: 0, pairCount: n };
  // Level bins equally spaced in sqrt(level - low) between the 0.1 % and 99.9 % quantiles
  // (Poisson-like variance grows with level, so this spreads the bins over the range the
  // line must span; equal-count bins would crowd into the dark background).
  // The two quantiles by selection (exactly the elements a sort would put at those ranks).
  const [low, high] = selectTwoInPlace(Float64Array.from(levels), Math.floor(0.001 * (n - 1)), Math.floor(0.999 * (n - 1)));
  const span = Math.sqrt(Math.max(high - low, 0));
  const members: number[][] = Array.from({ length: LEVEL_BINS }, () => []);
  const levelSum = new Float64Array(LEVEL_BINS);
  for (let k = 0; k < n; k++) {
    const L = levels[k]!;
    if (L < low || L > high) continue;
    const b = span > 0 ? Math.min(LEVEL_BINS - 1, Math.floor((Math.sqrt(L - low) / span) * LEVEL_BINS)) : 0;
    members[b]!.push(diffs[k]!);
    levelSum[b] += L;
  }
  const binLevel: number[] = [];
  const binVariance: number[] = [];
  const binWeight: number[] = [];
  for (let b = 0; b < LEVEL_BINS; b++) {
    const count = members[b]!.length;
    if (count < MIN_BIN_COUNT) continue;
    const d = Float64Array.from(members[b]!);
    const med = medianInPlace(d);
    for (let k = 0; k < d.length; k++) d[k] = Math.abs(d[k]! - med);
    const mad = medianInPlace(d);
    const variance = (1.4826 * mad) ** 2 / 6;
    binLevel.push(levelSum[b]! / count);
    binVariance.push(variance);
    // A variance estimated from `count` samples scatters by about variance sqrt(2.7 / count)
    // (MAD-based; about 1.6 times the variance of the sample variance).
    binWeight.push(variance > 0 ? count / (variance * variance) : 0);
  }
  const nBins = binLevel.length;
  if (nBins === 0) return { readVariance: 0, varianceSlope: 0, minimumVariance: 0, pairCount: 0 };
  let minimumVariance = Infinity;
  for (const v of binVariance) if (v > 0 && v < minimumVariance) minimumVariance = v;
  if (!Number.isFinite(minimumVariance)) minimumVariance = 0;
  // Weighted straight-line least squares of variance on level.
  let sw = 0, sl = 0, sv = 0;
  for (let b = 0; b < nBins; b++) { sw += binWeight[b]!; sl += binWeight[b]! * binLevel[b]!; sv += binWeight[b]! * binVariance[b]!; }
  if (!(sw > 0)) return { readVariance: 0, varianceSlope: 0, minimumVariance, pairCount: n };
  const ml = sl / sw;
  const mv = sv / sw;
  let sxx = 0, sxy = 0;
  for (let b = 0; b < nBins; b++) {
    sxx += binWeight[b]! * (binLevel[b]! - ml) ** 2;
    sxy += binWeight[b]! * (binLevel[b]! - ml) * (binVariance[b]! - mv);
  }
  let slope = sxx > 0 ? sxy / sxx : 0;
  if (!(slope > 0)) slope = 0;
  const readVariance = slope > 0 ? mv - slope * ml : medianInPlace(Float64Array.from(binVariance));
  return { readVariance, varianceSlope: slope, minimumVariance, pairCount: n };
}

/** Standard deviation of a pixel at `level` under the model, never below sqrt(minimumVariance). */
export function noiseSigmaAt(model: PixelNoiseModel, level: number): number {
  return Math.sqrt(Math.max(model.readVariance + model.varianceSlope * level, model.minimumVariance));
}
