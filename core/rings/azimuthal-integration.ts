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
  integrationFrameOf,
  subPixelOffsets,
  validateIntegrationInputs,
  validateSector,
  validateSubdivision,
  type AzimuthSector,
  type IntegrationFrame,
} from './integration-geometry';
import { correctedAzimuthRad } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import type { RadialProfile } from './radial-profile';
import { runRowBands, type RowBand, type RowBandImages, type RowBandRunner } from './row-bands';

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

/** The bins and the splitting of one radial integration (plain data, the same for every band of rows). */
export interface RadialBinning {
  rMinPx: number;
  binWidthPx: number;
  binCount: number;
  /** Sub-pixels per pixel side, 1..16. */
  subdivision: number;
  sector: AzimuthSector | null;
}

/**
 * Partial sums of a radial integration over some rows of the image. Sums over
 * disjoint sets of rows add up, entry by entry, to the sums over their union
 * (mergeRadialAccumulators). Sub-pixel counts are kept as integers (exact in
 * float64), so counts and areas merge exactly, and so do the value sums of an
 * integer-valued image (16-bit cameras: every product and sum is an integer
 * below 2^53); the scatter moments merge to rounding.
 */
export interface RadialAccumulators {
  /** Sub-pixels that fell in each bin: area = count / s^2. */
  subPixelCount: Float64Array;
  /** Sum over pixels of the squared count of the pixel's sub-pixels in the bin: sum f^2 = this / s^4. */
  subPixelCountSquared: Float64Array;
  /** Sum over sub-pixels of the pixel value: split value sum = this / s^2. */
  subPixelValueSum: Float64Array;
  /** Scatter moments of whole pixels in the bin of their centre radius: MOMENTS per bin. */
  moments: Float64Array;
}

/**
 * Radial profile of `raster` in the frame of `geometry`.
 * Bin k covers [rMinPx + k w, rMinPx + (k + 1) w); the last bin may reach past rMaxPx.
 * @example
 *   const g = integrationFrame(raster.width, raster.height, { centerXPx: 1021.4, centerYPx: 1030.2, axisRatio: 1.01, angleDeg: 35 });
 *   const p = integrateRadialProfile(raster, mask, g, { rMinPx: 40, binWidthPx: 0.5, subdivision: 3 });
 *   // p.mean[k] at p.radiusPx[k], with p.stdErr[k] and p.area[k]
 * @param raster the image (not mutated)
 * @param mask pixels to ignore, or null for none
 * @param geometry the frame of this image size (integrationFrame or prepareIntegrationGeometry)
 * @param runner runs the pixel pass on bands of rows (e.g. a worker pool); default this thread, in one band
 * @throws RangeError for sizes that do not match or options out of range
 */
export function integrateRadialProfile(
  raster: Raster,
  mask: PixelMask | null,
  geometry: IntegrationFrame,
  options: RadialIntegrationOptions = {},
  runner?: RowBandRunner,
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

  const binning: RadialBinning = { rMinPx: rMin, binWidthPx: w, binCount, subdivision: s, sector: options.sector ?? null };
  const frame = integrationFrameOf(geometry);
  const parts = runRowBands(runner, 'radialProfile', { raster, mask }, { geometry: frame, binning }, raster.height, accumulateRadialRowsPass);
  return radialProfileFromAccumulators(mergeRadialAccumulators(parts), binning, noise);
}

/** Empty sums for `binCount` bins. */
export function emptyRadialAccumulators(binCount: number): RadialAccumulators {
  return {
    subPixelCount: new Float64Array(binCount),
    subPixelCountSquared: new Float64Array(binCount),
    subPixelValueSum: new Float64Array(binCount),
    moments: new Float64Array(binCount * MOMENTS),
  };
}

/**
 * Adds up partial sums of the same binning (the parts are not mutated unless
 * there is only one, which is returned as it is).
 * @throws RangeError when the parts have different bin counts or none is given
 */
export function mergeRadialAccumulators(parts: readonly RadialAccumulators[]): RadialAccumulators {
  if (parts.length === 0) throw new RangeError('mergeRadialAccumulators needs at least one part; got none');
  if (parts.length === 1) return parts[0]!;
  const n = parts[0]!.subPixelCount.length;
  const out = emptyRadialAccumulators(n);
  for (const part of parts) {
    if (part.subPixelCount.length !== n) throw new RangeError(`every part must have ${n} bins; got ${part.subPixelCount.length}`);
    addInto(out.subPixelCount, part.subPixelCount);
    addInto(out.subPixelCountSquared, part.subPixelCountSquared);
    addInto(out.subPixelValueSum, part.subPixelValueSum);
    addInto(out.moments, part.moments);
  }
  return out;
}

function addInto(target: Float64Array, source: Float64Array): void {
  for (let k = 0; k < target.length; k++) target[k] += source[k]!;
}

/** accumulateRadialRows in the form of a row-band pass. */
export function accumulateRadialRowsPass(images: RowBandImages, params: { geometry: IntegrationFrame; binning: RadialBinning }, band: RowBand): RadialAccumulators {
  return accumulateRadialRows(images.raster, images.mask, params.geometry, params.binning, band.rowStart, band.rowEnd);
}

/**
 * The sums of rows [rowStart, rowEnd) of a radial integration: the unit of work
 * a band of rows contributes, to be merged with the other bands' sums.
 *
 * Splitting, exactly as described at the top of this file: each of the s x s
 * sub-pixels goes to the bin of its corrected radius. Computing that radius
 * (a square root) for every sub-pixel is the cost of the pass, and nearly
 * always unnecessary: with g the gradient of R at the pixel centre, d a
 * sub-pixel's offset, R(x0 + d) lies in [R0 + g.d, R0 + g.d + e] with
 * e = q |d|^2 / (2 (R0 - sqrt(q) |d|)) (R is a norm, so convex and above its
 * tangent plane, with Hessian at most q / R), so when that interval (widened
 * by a rounding margin far above float64 error) falls in one bin, the square
 * root would give that bin too. Only the sub-pixels whose interval touches a
 * bin edge (about e / w of them: 0.2 % at R = 100 px) and the pixels near the
 * centre take the square root. The bins are identical to splitting with a
 * square root for every sub-pixel (tested), since x -> (x - rMin) / w
 * rounded down is monotone in floating point.
 * @param geometry the frame (radii are computed from it; no table is read)
 * @param rowStart first row, integer in [0, height]
 * @param rowEnd one past the last row, integer in [rowStart, height]
 */
export function accumulateRadialRows(
  raster: Raster,
  mask: PixelMask | null,
  geometry: IntegrationFrame,
  binning: RadialBinning,
  rowStart: number,
  rowEnd: number,
): RadialAccumulators {
  const n = binning.binCount;
  const out = emptyRadialAccumulators(n);
  const { subPixelCount, subPixelCountSquared, subPixelValueSum, moments } = out;
  const { width, kxx, kxy, kyy } = geometry;
  const rMin = binning.rMinPx;
  const w = binning.binWidthPx;
  const s = binning.subdivision;
  const sector = binning.sector;
  const data = raster.data;
  const excluded = mask ? mask.excluded : null;
  const invW = 1 / w;
  const off = subPixelOffsets(s);
  const reach = Math.SQRT1_2 * geometry.maxRadialGradient + 1e-9;
  // Pixels whose centre radius lies outside [rLo, rHi) reach no bin (the same margins as
  // when a float32 table of radii decided the skip).
  const rLo = rMin - reach - 1e-3 - rMin * 2e-7;
  const rHi = rMin + n * w + reach + 1e-3 + (rMin + n * w) * 2e-7;
  // Bins one pixel's sub-pixels can reach, and how many bits a count of up to s^2 needs.
  const slots = Math.ceil(2 * reach * invW) + 2;
  const bits = Math.ceil(Math.log2(s * s + 1));
  const usePacking = slots * bits <= 31;
  const slotMask = (1 << bits) - 1;
  const counts = new Int32Array(slots);
  const t = geometry.transform;
  const cx = t.cx;
  const cy = t.cy;
  const q = t.q;
  // Linear screening of sub-pixel radii (see above): |d| <= dMax for every sub-pixel offset.
  const dMax = s > 1 ? Math.SQRT2 * -off[0]! : 0;
  const curvature = 0.5 * q * dMax * dMax;
  // For R0 >= linearFrom = 8 sqrt(q) dMax + 1, 1 / (R0 - sqrt(q) dMax) <= tailFactor / R0.
  const linearFrom = 8 * t.sqrtQ * dMax + 1;
  const tailFactor = linearFrom / (linearFrom - t.sqrtQ * dMax);
  const curvatureU = curvature * tailFactor;
  // Rounding margin, px: float64 errors of R and of g.d are below 1e-14 (q^2 R); this is 1e5 times more.
  const margin = 1e-9 * q * q * (geometry.maxRadiusPx + 2);
  const marginU = margin * invW;
  const sc: ScreenConstants = { kxx, rMin, invW, n, slots, bits };
  const subCyy = new Float64Array(s);
  const subBxy = new Float64Array(s);
  const gxOff = new Float64Array(s);

  for (let j = rowStart; j < rowEnd; j++) {
    const dy = j - cy;
    const rowXY = 2 * kxy * dy;
    const rowYY = kyy * dy * dy;
    const row = j * width;
    for (let b = 0; b < s; b++) {
      const yy = dy + off[b]!;
      subCyy[b] = kyy * yy * yy;
      subBxy[b] = 2 * kxy * yy;
    }
    for (let i = 0; i < width; i++) {
      const p = row + i;
      if (excluded !== null && excluded[p] !== 0) continue;
      const v = data[p]!;
      if (v - v !== 0) continue; // NaN or infinite
      const dx = i - cx;
      const r0 = Math.sqrt(dx * (kxx * dx + rowXY) + rowYY);
      if (r0 < rLo || r0 >= rHi) continue;
      if (sector !== null && !inSector(correctedAzimuthRad(t, i, j), sector)) continue;
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
          subPixelCount[kc] += 1;
          subPixelCountSquared[kc] += 1;
          subPixelValueSum[kc] += v;
        }
        continue;
      }
      // Sub-pixels, each to the bin of its corrected radius. Counts per bin (relative to
      // kBase) are packed `bits` bits a slot into one integer, so the inner loop writes no
      // memory; wide spans fall back to a small array.
      const kBase = Math.floor((r0 - reach - rMin) * invW);
      const inside = kBase >= 0 && kBase + slots <= n;
      let packed = 0;
      if (r0 >= linearFrom && usePacking) {
        // Linear screening in bin units: u = u0 + (g.d) / w, true value in [u, u + e / w].
        const inv = invW / r0;
        const gxu = (kxx * dx + kxy * dy) * inv;
        const gyu = (kxy * dx + kyy * dy) * inv;
        const upper = curvatureU * inv + marginU;
        if (s === 3) {
          // The default split, unrolled: offsets -1/3, 0, +1/3 on each axis. Each sub-pixel takes
          // its bin from the linear estimate when that is certain, else from exactIncrement.
          const ga = gxu * off[2]!, gb = gyu * off[2]!;
          const xm = dx + off[0]!, xp = dx + off[2]!;
          const c0 = subCyy[0]!, c1 = subCyy[1]!, c2 = subCyy[2]!;
          const b0 = subBxy[0]!, b1 = subBxy[1]!, b2 = subBxy[2]!;
          const um = u0 - gb, up = u0 + gb;
          let ul: number, lo: number, k: number;
          ul = um - ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xm, b0, c0, kBase, inside, sc);
          ul = um; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(dx, b0, c0, kBase, inside, sc);
          ul = um + ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xp, b0, c0, kBase, inside, sc);
          ul = u0 - ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xm, b1, c1, kBase, inside, sc);
          ul = u0; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(dx, b1, c1, kBase, inside, sc);
          ul = u0 + ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xp, b1, c1, kBase, inside, sc);
          ul = up - ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xm, b2, c2, kBase, inside, sc);
          ul = up; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(dx, b2, c2, kBase, inside, sc);
          ul = up + ga; lo = ul - marginU; k = lo | 0;
          packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(xp, b2, c2, kBase, inside, sc);
        } else {
          for (let a = 0; a < s; a++) gxOff[a] = gxu * off[a]!;
          for (let b = 0; b < s; b++) {
            const ub = u0 + gyu * off[b]!;
            for (let a = 0; a < s; a++) {
              const ul = ub + gxOff[a]!;
              const lo = ul - marginU;
              const k = lo | 0;
              packed += lo >= 0 && k === ((ul + upper) | 0) && (inside || k < n) ? 1 << (bits * (k - kBase)) : exactIncrement(dx + off[a]!, subBxy[b]!, subCyy[b]!, kBase, inside, sc);
            }
          }
        }
      } else {
        for (let b = 0; b < s; b++) {
          const cyy = subCyy[b]!;
          const bxy = subBxy[b]!;
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
      }
      if (usePacking) {
        for (let d = 0; packed !== 0; d++, packed >>>= bits) {
          const c = packed & slotMask;
          if (c === 0) continue;
          subPixelCount[kBase + d] += c;
          subPixelCountSquared[kBase + d] += c * c;
          subPixelValueSum[kBase + d] += c * v;
        }
      } else {
        for (let d = 0; d < slots; d++) {
          const c = counts[d]!;
          if (c === 0) continue;
          counts[d] = 0;
          subPixelCount[kBase + d] += c;
          subPixelCountSquared[kBase + d] += c * c;
          subPixelValueSum[kBase + d] += c * v;
        }
      }
    }
  }
  return out;
}

/** What exactIncrement needs that is the same for every pixel of a pass. */
interface ScreenConstants {
  kxx: number;
  rMin: number;
  invW: number;
  n: number;
  slots: number;
  bits: number;
}

/**
 * One sub-pixel's packed count increment 1 << (bits x slot) from its exact radius
 * sqrt(xs (kxx xs + bxy) + cyy), slot relative to kBase, or 0 when it falls
 * outside the bins: what the linear screening of accumulateRadialRows falls back
 * on when it cannot be sure of the bin (rarely).
 */
function exactIncrement(xs: number, bxy: number, cyy: number, kBase: number, inside: boolean, c: ScreenConstants): number {
  const u = (Math.sqrt(xs * (c.kxx * xs + bxy) + cyy) - c.rMin) * c.invW;
  if (!inside && (u < 0 || u >= c.n)) return 0;
  let d = (u | 0) - kBase;
  if (d < 0) d = 0;
  else if (d >= c.slots) d = c.slots - 1;
  return 1 << (c.bits * d);
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

/**
 * The profile from merged sums: mean, area, standard error and effective count per bin.
 * @param noise where the standard error comes from (default: the scatter of pixel values)
 */
export function radialProfileFromAccumulators(acc: RadialAccumulators, binning: RadialBinning, noise: ProfileNoise = { kind: 'scatter' }): RadialProfile {
  const n = binning.binCount;
  const rMin = binning.rMinPx;
  const w = binning.binWidthPx;
  const s = binning.subdivision;
  const share = 1 / (s * s);
  const radiusPx = new Float64Array(n);
  const mean = new Float64Array(n);
  const stdErr = new Float64Array(n);
  const effectiveCount = new Float64Array(n);
  const area = new Float64Array(n);
  const sum = new Float64Array(n);
  const { subPixelCount, subPixelCountSquared, subPixelValueSum, moments } = acc;
  for (let k = 0; k < n; k++) {
    radiusPx[k] = rMin + (k + 0.5) * w;
    const c = subPixelCount[k]!;
    const a = c * share;
    area[k] = a;
    sum[k] = subPixelValueSum[k]! * share;
    if (!(c > 0)) {
      mean[k] = Number.NaN;
      stdErr[k] = Number.NaN;
      effectiveCount[k] = 0;
      continue;
    }
    const m = subPixelValueSum[k]! / c;
    mean[k] = m;
    // (sum f)^2 / sum f^2 with f = count / s^2: the s^2 cancels.
    effectiveCount[k] = (c * c) / subPixelCountSquared[k]!;
    if (noise.kind === 'poisson') {
      const rn = noise.readNoiseValue ?? 0;
      stdErr[k] = Math.sqrt(Math.max(m, 0) / noise.countsPerValue + rn * rn) / Math.sqrt(a);
    } else {
      stdErr[k] = Math.sqrt(binScatterVariance(moments, k * MOMENTS) / a);
    }
  }
  return { rMinPx: rMin, binWidthPx: w, radiusPx, mean, sum, area, stdErr, effectiveCount, subdivision: s, stdErrSource: noise.kind };
}
