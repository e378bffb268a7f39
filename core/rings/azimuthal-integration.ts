/**
 * Azimuthal integration: the radial profile of an image in the corrected
 * (area-preserving elliptical) frame, with sub-pixel splitting and the mask.
 *
 * Splitting. Each pixel is split into s x s equal sub-pixels whose centres sit at
 * offsets (a + 1/2)/s - 1/2 from the pixel centre; each sub-pixel carries 1/s^2 of
 * the pixel's area and value and goes whole to the bin of its exact corrected
 * radius. s = 1 assigns each pixel whole to the bin of its centre.
 *
 * Bias. A curved ring is displaced inward in the profile by the three
 * sampling kernels (the pixel integral, the split, the bin's annulus), by
 * [(2 - 1/s^2)/24 + w^2/12] / R px to second order: profile-radius-shift.ts
 * derives it and measure-rings.ts adds it back to fitted radii. With s = 1 the
 * pixel radii of a centre on a pixel corner or centre take few distinct values
 * and the profile aliases (errors of several hundredths of a pixel at R = 30
 * px in the unit tests); s >= 3 removes that.
 *
 * Standard error per bin, from the scatter of pixel values (default): the whole
 * pixels whose centres fall in the bin are fitted by a quadratic in their centre
 * radius, so that the slope and curvature of a ring's flank across the bin are
 * not taken for noise; the residual variance sigma^2 = RSS / (n - 3) of those n
 * pixels, with A = the bin's split unmasked area, gives stdErr = sigma / sqrt(A).
 * Counting A as the number of independent samples keeps the total information
 * of a fit over many bins right even though a split pixel correlates
 * neighbouring bins: sum_b A_b / sigma^2 = N / sigma^2 for N whole pixels (the
 * split conserves area). With `noise: { kind: 'poisson' }` it is
 * sqrt(mean / c + readNoise^2) / sqrt(A) instead, c the counts per value.
 * The bin's own variance is smaller, sigma^2 / n_eff with n_eff = (sum f)^2 /
 * sum f^2 (Kish's effective sample size, L. Kish, Survey Sampling, Wiley 1965;
 * from memory), returned as effectiveCount: a fit's chi-square over split bins
 * is expected near sum(A / n_eff) - m, not n - m (peak-fit.ts uses it).
 *
 * Masked pixels and non-finite values are skipped. An optional sector keeps the
 * pixels whose centre azimuth lies in it (whole pixels, by their centre).
 */

import type { Raster } from '../image/raster';
import {
  inSector,
  subPixelOffsets,
  validateIntegrationInputs,
  validateSector,
  validateSubdivision,
  type AzimuthSector,
  type IntegrationGeometry,
} from './integration-geometry';
import { correctedAzimuthRad } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import type { RadialProfile } from './radial-profile';

/** How the standard error of each bin is obtained. */
export type ProfileNoise =
  | { kind: 'scatter' }
  | {
      kind: 'poisson';
      /** Detected counts (e.g. electrons) per unit of pixel value, > 0. */
      countsPerValue: number;
      /** Read noise of one pixel in pixel-value units, >= 0 (default 0). */
      readNoiseValue?: number;
    };

export interface RadialIntegrationOptions {
  /** Inner edge of the first bin, px (>= 0; default 0). */
  rMinPx?: number;
  /** Outer limit, px (> rMinPx; default: the largest pixel radius in the image plus 1). */
  rMaxPx?: number;
  /** Bin width, px (> 0; default 0.5). */
  binWidthPx?: number;
  /** Sub-pixels per pixel side, integer 1..16 (default 3). */
  subdivision?: number;
  /** Keep only pixels whose centre azimuth lies in this sector (default: all azimuths). */
  sector?: AzimuthSector;
  /** Standard error from the scatter of pixel values (default) or from Poisson counts. */
  noise?: ProfileNoise;
}

/** Scatter moments per bin: 9 numbers per bin. */
const MOMENTS = 9;
// Layout of one bin's moments over the whole pixels whose centre falls in it, with
// x = pixel-centre radius minus bin centre and y = pixel value:
// 0: n, 1: sum x, 2: x^2, 3: x^3, 4: x^4, 5: y, 6: x y, 7: x^2 y, 8: y^2.

/**
 * Radial profile of `raster` in the frame of `geometry`.
 * Bin k covers [rMinPx + k w, rMinPx + (k + 1) w); the last bin may reach past rMaxPx.
 * @example
 *   const g = prepareIntegrationGeometry(raster.width, raster.height, { centerXPx: 1021.4, centerYPx: 1030.2, axisRatio: 1.01, angleDeg: 35 });
 *   const p = integrateRadialProfile(raster, mask, g, { rMinPx: 40, binWidthPx: 0.5, subdivision: 3 });
 *   // p.mean[k] at p.radiusPx[k], with p.stdErr[k] and p.area[k]
 * @param raster the image (not mutated)
 * @param mask pixels to ignore, or null for none
 * @param geometry per-pixel radii of this image size and frame (prepareIntegrationGeometry)
 * @throws RangeError for sizes that do not match or options out of range
 */
export function integrateRadialProfile(
  raster: Raster,
  mask: PixelMask | null,
  geometry: IntegrationGeometry,
  options: RadialIntegrationOptions = {},
): RadialProfile {
  validateIntegrationInputs(raster, mask, geometry);
  const rMin = options.rMinPx ?? 0;
  const rMax = options.rMaxPx ?? geometry.maxRadiusPx + 1;
  const w = options.binWidthPx ?? 0.5;
  const s = options.subdivision ?? 3;
  const noise = options.noise ?? { kind: 'scatter' };
  if (!(rMin >= 0) || !Number.isFinite(rMin)) throw new RangeError(`rMinPx must be a finite number >= 0; got ${rMin}`);
  if (!(rMax > rMin) || !Number.isFinite(rMax)) throw new RangeError(`rMaxPx must be finite and greater than rMinPx (${rMin}); got ${rMax}`);
  if (!(w > 0) || !Number.isFinite(w)) throw new RangeError(`binWidthPx must be a positive, finite width in px; got ${w}`);
  validateSubdivision(s);
  if (options.sector) validateSector(options.sector);
  if (noise.kind === 'poisson') {
    if (!(noise.countsPerValue > 0) || !Number.isFinite(noise.countsPerValue)) {
      throw new RangeError(`noise.countsPerValue must be positive and finite; got ${noise.countsPerValue}`);
    }
    const rn = noise.readNoiseValue ?? 0;
    if (!(rn >= 0) || !Number.isFinite(rn)) throw new RangeError(`noise.readNoiseValue must be finite and >= 0; got ${rn}`);
  }
  const binCount = Math.ceil((rMax - rMin) / w - 1e-9);
  if (binCount > 10_000_000) throw new RangeError(`the radial range ${rMin}..${rMax} px at binWidthPx ${w} makes ${binCount} bins; widen the bins`);

  const acc = accumulateMoments(raster, mask, geometry, rMin, w, binCount, s, options.sector ?? null);
  return profileFromMoments(acc, rMin, w, binCount, s, noise);
}

interface Accumulators {
  /** Split area, sum of squared pixel fractions and split value sum per bin. */
  area: Float64Array;
  area2: Float64Array;
  sum: Float64Array;
  /** Scatter moments of whole pixels in the bin of their centre radius: MOMENTS per bin. */
  moments: Float64Array;
}

function accumulateMoments(
  raster: Raster,
  mask: PixelMask | null,
  g: IntegrationGeometry,
  rMin: number,
  w: number,
  n: number,
  s: number,
  sector: AzimuthSector | null,
): Accumulators {
  const area = new Float64Array(n);
  const area2 = new Float64Array(n);
  const sum = new Float64Array(n);
  const moments = new Float64Array(n * MOMENTS);
  const { width, height, kxx, kxy, kyy, radiusPx } = g;
  const data = raster.data;
  const excluded = mask ? mask.excluded : null;
  const invW = 1 / w;
  const off = subPixelOffsets(s);
  const share = 1 / (s * s);
  const reach = Math.SQRT1_2 * g.maxRadialGradient + 1e-9;
  // Skipping margin: the float32 table is good to 2^-23 relative.
  const rLo = rMin - reach - 1e-3 - rMin * 2e-7;
  const rHi = rMin + n * w + reach + 1e-3 + (rMin + n * w) * 2e-7;
  // Bins one pixel's sub-pixels can reach, and how many bits a count of up to s^2 needs.
  const slots = Math.ceil(2 * reach * invW) + 2;
  const bits = Math.ceil(Math.log2(s * s + 1));
  const usePacking = slots * bits <= 31;
  const slotMask = (1 << bits) - 1;
  const counts = new Int32Array(slots);
  const t = g.transform;
  const cx = t.cx;
  const cy = t.cy;

  for (let j = 0; j < height; j++) {
    const dy = j - cy;
    const rowXY = 2 * kxy * dy;
    const rowYY = kyy * dy * dy;
    const row = j * width;
    for (let i = 0; i < width; i++) {
      const p = row + i;
      if (excluded !== null && excluded[p] !== 0) continue;
      const rTable = radiusPx[p]!;
      if (rTable < rLo || rTable >= rHi) continue;
      const v = data[p]!;
      if (v - v !== 0) continue; // NaN or infinite
      if (sector !== null && !inSector(correctedAzimuthRad(t, i, j), sector)) continue;
      // The table (float32) only skips pixels; the centre radius itself is exact.
      const dx = i - cx;
      const r0 = Math.sqrt(dx * (kxx * dx + rowXY) + rowYY);
      // Whole pixel into the scatter moments of the bin of its centre.
      const u0 = (r0 - rMin) * invW;
      if (u0 >= 0 && u0 < n) {
        const kc = u0 | 0;
        const x = r0 - (rMin + (kc + 0.5) * w);
        const xx = x * x;
        const o = kc * MOMENTS;
        moments[o] += 1;
        moments[o + 1] += x;
        moments[o + 2] += xx;
        moments[o + 3] += xx * x;
        moments[o + 4] += xx * xx;
        moments[o + 5] += v;
        moments[o + 6] += x * v;
        moments[o + 7] += xx * v;
        moments[o + 8] += v * v;
      }
      if (s === 1) {
        if (u0 >= 0 && u0 < n) {
          const kc = u0 | 0;
          area[kc] += 1;
          area2[kc] += 1;
          sum[kc] += v;
        }
        continue;
      }
      // Sub-pixels, each to the bin of its exact corrected radius. Counts per bin
      // (relative to kBase) are packed `bits` bits a slot into one integer, so the
      // inner loop writes no memory; wide spans fall back to a small array.
      const kBase = Math.floor((r0 - reach - rMin) * invW);
      const inside = kBase >= 0 && kBase + slots <= n;
      let packed = 0;
      for (let b = 0; b < s; b++) {
        const yy = dy + off[b]!;
        const cyy = kyy * yy * yy;
        const bxy = 2 * kxy * yy;
        for (let a = 0; a < s; a++) {
          const xs = dx + off[a]!;
          const u = (Math.sqrt(xs * (kxx * xs + bxy) + cyy) - rMin) * invW;
          if (!inside && (u < 0 || u >= n)) continue;
          let d = (u | 0) - kBase;
          if (d < 0) d = 0;
          else if (d >= slots) d = slots - 1;
          if (usePacking) packed += 1 << (bits * d);
          else counts[d]!++;
        }
      }
      const fv = v * share;
      if (usePacking) {
        for (let d = 0; packed !== 0; d++, packed >>>= bits) {
          const c = packed & slotMask;
          if (c === 0) continue;
          const f = c * share;
          area[kBase + d] += f;
          area2[kBase + d] += f * f;
          sum[kBase + d] += c * fv;
        }
      } else {
        for (let d = 0; d < slots; d++) {
          const c = counts[d]!;
          if (c === 0) continue;
          counts[d] = 0;
          const f = c * share;
          area[kBase + d] += f;
          area2[kBase + d] += f * f;
          sum[kBase + d] += c * fv;
        }
      }
    }
  }
  return { area, area2, sum, moments };
}

/**
 * Residual variance of the pixel values in one bin about a least-squares
 * quadratic in x (falling back to a straight line, then a constant, when the
 * bin's pixel radii do not spread enough to fix the higher terms), divided by
 * (n - parameters). NaN when the bin holds 2 pixels or fewer.
 * @param m the 9 moments of the bin (layout of MOMENTS), read from `offset`
 */
export function binScatterVariance(m: ArrayLike<number>, offset = 0): number {
  const s0 = m[offset]!;
  const s1 = m[offset + 1]!;
  const s2 = m[offset + 2]!;
  const s3 = m[offset + 3]!;
  const s4 = m[offset + 4]!;
  const t0 = m[offset + 5]!;
  const t1 = m[offset + 6]!;
  const t2 = m[offset + 7]!;
  const yy = m[offset + 8]!;
  if (!(s0 > 2)) return Number.NaN;
  // Centred second moment of x: how far the pixel radii spread within the bin.
  const varX = s2 / s0 - (s1 / s0) ** 2;
  if (s0 > 6 && varX > 1e-6) {
    // Quadratic: solve [[s0,s1,s2],[s1,s2,s3],[s2,s3,s4]] beta = [t0,t1,t2] by Cramer's rule.
    const det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
    const scale = s0 * s0 * s0 * varX * varX * varX;
    if (det > 1e-9 * scale) {
      const b0 = (t0 * (s2 * s4 - s3 * s3) - s1 * (t1 * s4 - s3 * t2) + s2 * (t1 * s3 - s2 * t2)) / det;
      const b1 = (s0 * (t1 * s4 - t2 * s3) - t0 * (s1 * s4 - s3 * s2) + s2 * (s1 * t2 - t1 * s2)) / det;
      const b2 = (s0 * (s2 * t2 - s3 * t1) - s1 * (s1 * t2 - t1 * s2) + t0 * (s1 * s3 - s2 * s2)) / det;
      const rss = yy - (b0 * t0 + b1 * t1 + b2 * t2);
      return Math.max(rss, 0) / (s0 - 3);
    }
  }
  if (s0 > 4 && varX > 1e-9) {
    const sxx = s2 - (s1 * s1) / s0;
    const sxy = t1 - (s1 * t0) / s0;
    const rss = yy - (t0 * t0) / s0 - (sxy * sxy) / sxx;
    return Math.max(rss, 0) / (s0 - 2);
  }
  return Math.max(yy - (t0 * t0) / s0, 0) / (s0 - 1);
}

function profileFromMoments(acc: Accumulators, rMin: number, w: number, n: number, s: number, noise: ProfileNoise): RadialProfile {
  const radiusPx = new Float64Array(n);
  const mean = new Float64Array(n);
  const stdErr = new Float64Array(n);
  const effectiveCount = new Float64Array(n);
  const { area, area2, sum, moments } = acc;
  for (let k = 0; k < n; k++) {
    radiusPx[k] = rMin + (k + 0.5) * w;
    const a = area[k]!;
    if (!(a > 0)) {
      mean[k] = Number.NaN;
      stdErr[k] = Number.NaN;
      effectiveCount[k] = 0;
      continue;
    }
    const m = sum[k]! / a;
    mean[k] = m;
    effectiveCount[k] = (a * a) / area2[k]!;
    if (noise.kind === 'poisson') {
      const rn = noise.readNoiseValue ?? 0;
      stdErr[k] = Math.sqrt(Math.max(m, 0) / noise.countsPerValue + rn * rn) / Math.sqrt(a);
    } else {
      stdErr[k] = Math.sqrt(binScatterVariance(moments, k * MOMENTS) / a);
    }
  }
  return { rMinPx: rMin, binWidthPx: w, radiusPx, mean, sum, area, stdErr, effectiveCount, subdivision: s, stdErrSource: noise.kind };
}
