/**
 * Intensity along rings against azimuth: an integration over (radius band x
 * azimuth bin) cells in the corrected frame, for ring quality (continuity,
 * spottiness, texture).
 *
 * Radially each pixel is split into s x s sub-pixels exactly as in the radial
 * profile (azimuthal-integration.ts), so a band's edges cut pixels by area; a
 * pixel goes whole to the azimuth bin of its centre's corrected azimuth (an
 * azimuth bin is many pixels wide along any ring worth measuring: 4 degrees at
 * R = 100 px is 7 px of arc). Bands may overlap; a pixel counts in each band it
 * reaches. Masked pixels and non-finite values are skipped.
 *
 * Azimuth bin m covers [-pi + m dphi, -pi + (m + 1) dphi), dphi = 2 pi / M, of
 * the corrected azimuth (from +x toward +y).
 */

import type { Raster } from '../image/raster';
import { bridgeGaps } from './bridge-gaps';
import { integrationFrameOf, subPixelOffsets, validateIntegrationInputs, validateSubdivision, type IntegrationFrame } from './integration-geometry';
import { correctedAzimuthRad } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import { runRowBands, type RowBand, type RowBandImages, type RowBandRunner } from './row-bands';

export interface RadiusBand {
  /** Inner edge, px (>= 0). */
  innerRadiusPx: number;
  /** Outer edge, px (> innerRadiusPx). */
  outerRadiusPx: number;
}

/** A function of corrected radius sampled on equal bins (e.g. a radial profile or its background). */
export interface RadialReference {
  rMinPx: number;
  binWidthPx: number;
  /** Value at each bin centre rMinPx + (k + 1/2) w; non-finite entries are skipped over. */
  values: ArrayLike<number>;
}

export interface AzimuthalTextureOptions {
  /** The bands, one per ring (not mutated). */
  bands: readonly RadiusBand[];
  /**
   * Radial functions to average over each cell's pixels exactly as the pixel values
   * are averaged (each evaluated at the pixel's centre radius, linearly between bins).
   * With the profile and its background these say what a uniform ring would give
   * each cell, whatever radii its pixels happen to sample.
   */
  references?: readonly RadialReference[];
  /** Azimuth bins over the full circle, integer 4..3600 (default 90: 4 degrees). */
  azimuthBinCount?: number;
  /** Sub-pixels per pixel side for the band edges, integer 1..16 (default 3). */
  subdivision?: number;
}

export interface AzimuthalTexture {
  bands: RadiusBand[];
  azimuthBinCount: number;
  /** Azimuth bin centres, radians. */
  azimuthRad: Float64Array;
  /** Cells band-major: [band * azimuthBinCount + m]. Mean pixel value, NaN where nothing falls. */
  mean: Float64Array;
  /** Sum of pixel values times the fraction of each pixel in the cell. */
  sum: Float64Array;
  /** Unmasked area of each cell, px (fractional at band edges). */
  area: Float64Array;
  /** Area of a whole cell of each band, pi (rOut^2 - rIn^2) / M, px: what an unmasked, fully imaged cell holds. */
  fullCellAreaPx: Float64Array;
  /** Per reference, its mean over each cell's pixels (same layout as mean); NaN where the cell is empty. */
  referenceMeans: Float64Array[];
}

/** What one texture integration needs besides the pixels: plain data, the same for every band of rows. */
export interface TextureCellPlan {
  geometry: IntegrationFrame;
  bands: RadiusBand[];
  azimuthBinCount: number;
  subdivision: number;
  /** The references with their gaps bridged (bridgeGaps). */
  references: { rMinPx: number; binWidthPx: number; values: Float64Array }[];
}

/**
 * Partial sums of a texture integration over some rows: sums over disjoint sets
 * of rows add up, cell by cell, to the sums over their union. Sub-pixel counts
 * are integers (exact), so are the value sums of an integer-valued image; the
 * reference sums merge to rounding.
 */
export interface TextureCellSums {
  /** Sub-pixels in each cell (band-major): area = count / s^2. */
  subPixelCount: Float64Array;
  /** Sum over sub-pixels of the pixel value. */
  subPixelValueSum: Float64Array;
  /** Per reference, the sum over sub-pixels of the reference at the pixel's centre radius. */
  referenceSums: Float64Array[];
}

/**
 * Azimuthal texture of `raster` in the bands given.
 * @param runner runs the pixel pass on bands of rows (e.g. a worker pool); default this thread, in one band
 * @throws RangeError for sizes that do not match, bands out of order or options out of range
 */
export function integrateAzimuthalTexture(
  raster: Raster,
  mask: PixelMask | null,
  geometry: IntegrationFrame,
  options: AzimuthalTextureOptions,
  runner?: RowBandRunner,
): AzimuthalTexture {
  validateIntegrationInputs(raster, mask, geometry);
  const bands = options.bands.map((b) => ({ innerRadiusPx: b.innerRadiusPx, outerRadiusPx: b.outerRadiusPx }));
  const m = options.azimuthBinCount ?? 90;
  const s = options.subdivision ?? 3;
  if (!Number.isInteger(m) || m < 4 || m > 3600) throw new RangeError(`azimuthBinCount must be an integer from 4 to 3600; got ${m}`);
  validateSubdivision(s);
  bands.forEach((b, i) => {
    if (!(b.innerRadiusPx >= 0) || !Number.isFinite(b.innerRadiusPx) || !(b.outerRadiusPx > b.innerRadiusPx) || !Number.isFinite(b.outerRadiusPx)) {
      throw new RangeError(`bands[${i}] must have 0 <= innerRadiusPx < outerRadiusPx, both finite; got ${b.innerRadiusPx}..${b.outerRadiusPx}`);
    }
  });
  const nb = bands.length;
  const azimuthRad = new Float64Array(m);
  const dphi = (2 * Math.PI) / m;
  for (let k = 0; k < m; k++) azimuthRad[k] = -Math.PI + (k + 0.5) * dphi;
  const fullCellAreaPx = Float64Array.from(bands, (b) => (Math.PI * (b.outerRadiusPx ** 2 - b.innerRadiusPx ** 2)) / m);
  const references = (options.references ?? []).map((ref, i) => {
    if (!(ref.binWidthPx > 0) || !Number.isFinite(ref.rMinPx)) throw new RangeError(`references[${i}] needs a finite rMinPx and a positive binWidthPx`);
    return { rMinPx: ref.rMinPx, binWidthPx: ref.binWidthPx, values: bridgeGaps(ref.values) ?? new Float64Array(ref.values.length).fill(Number.NaN) };
  });
  const plan: TextureCellPlan = { geometry: integrationFrameOf(geometry), bands, azimuthBinCount: m, subdivision: s, references };
  const sums = nb > 0
    ? mergeTextureCellSums(runRowBands(runner, 'azimuthalTexture', { raster, mask }, plan, raster.height, accumulateTextureRowsPass))
    : emptyTextureCellSums(0, references.length);
  const share = 1 / (s * s);
  const count = sums.subPixelCount;
  const area = count.map((c) => c * share);
  const sum = sums.subPixelValueSum.map((v) => v * share);
  const mean = new Float64Array(nb * m);
  for (let c = 0; c < mean.length; c++) mean[c] = count[c]! > 0 ? sums.subPixelValueSum[c]! / count[c]! : Number.NaN;
  const referenceMeans = sums.referenceSums.map((rs) => rs.map((v, c) => (count[c]! > 0 ? v / count[c]! : Number.NaN)));
  return { bands, azimuthBinCount: m, azimuthRad, mean, sum, area, fullCellAreaPx, referenceMeans };
}

/** Empty sums for `cellCount` cells and `referenceCount` references. */
export function emptyTextureCellSums(cellCount: number, referenceCount: number): TextureCellSums {
  return {
    subPixelCount: new Float64Array(cellCount),
    subPixelValueSum: new Float64Array(cellCount),
    referenceSums: Array.from({ length: referenceCount }, () => new Float64Array(cellCount)),
  };
}

/**
 * Adds up partial sums of one plan (the parts are not mutated unless there is only one, returned as it is).
 * @throws RangeError when the parts differ in size or none is given
 */
export function mergeTextureCellSums(parts: readonly TextureCellSums[]): TextureCellSums {
  if (parts.length === 0) throw new RangeError('mergeTextureCellSums needs at least one part; got none');
  if (parts.length === 1) return parts[0]!;
  const n = parts[0]!.subPixelCount.length;
  const r = parts[0]!.referenceSums.length;
  const out = emptyTextureCellSums(n, r);
  for (const part of parts) {
    if (part.subPixelCount.length !== n || part.referenceSums.length !== r) throw new RangeError(`every part must have ${n} cells and ${r} references`);
    for (let c = 0; c < n; c++) {
      out.subPixelCount[c] += part.subPixelCount[c]!;
      out.subPixelValueSum[c] += part.subPixelValueSum[c]!;
    }
    for (let q = 0; q < r; q++) {
      const target = out.referenceSums[q]!;
      const source = part.referenceSums[q]!;
      for (let c = 0; c < n; c++) target[c] += source[c]!;
    }
  }
  return out;
}

/** accumulateTextureRows in the form of a row-band pass. */
export function accumulateTextureRowsPass(images: RowBandImages, plan: TextureCellPlan, band: RowBand): TextureCellSums {
  return accumulateTextureRows(images.raster, images.mask, plan, band.rowStart, band.rowEnd);
}

/**
 * The texture sums of rows [rowStart, rowEnd): the unit of work of one band of
 * rows. Each row visits only the pixels whose centre radius can reach a band
 * (the spans where R lies within a band widened by the sub-pixel reach and a
 * pixel, solved from the row's quadratic in x), in increasing x, and treats them
 * exactly as a visit of every pixel would: a pixel's centre radius is the
 * float32 value of the per-pixel table (prepareIntegrationGeometry), which
 * decides the bands it may reach, the full-pixel shortcut and the reference
 * value, and the sub-pixels at band edges are tested with exact radii.
 */
export function accumulateTextureRows(raster: Raster, mask: PixelMask | null, plan: TextureCellPlan, rowStart: number, rowEnd: number): TextureCellSums {
  const { geometry: g, bands, azimuthBinCount: m, subdivision: s, references } = plan;
  const nb = bands.length;
  const out = emptyTextureCellSums(nb * m, references.length);
  if (nb === 0) return out;
  const count = out.subPixelCount;
  const valueSum = out.subPixelValueSum;
  const refSums = out.referenceSums;
  const { width, kxx, kxy, kyy } = g;
  const t = g.transform;
  const data = raster.data;
  const excluded = mask ? mask.excluded : null;
  const off = subPixelOffsets(s);
  const full = s * s;
  const reach = Math.SQRT1_2 * g.maxRadialGradient + 1e-3;
  const mPerRad = m / (2 * Math.PI);

  // Bands a pixel of centre radius in [r, r + 1) can reach, by integer r (compressed rows).
  const rTop = Math.ceil(Math.max(...bands.map((b) => b.outerRadiusPx)) + reach) + 1;
  const lists: number[][] = Array.from({ length: rTop + 1 }, () => []);
  bands.forEach((b, i) => {
    const lo = Math.max(0, Math.floor(b.innerRadiusPx - reach));
    const hi = Math.min(rTop, Math.floor(b.outerRadiusPx + reach));
    for (let r = lo; r <= hi; r++) lists[r]!.push(i);
  });
  const start = new Int32Array(rTop + 2);
  for (let r = 0; r <= rTop; r++) start[r + 1] = start[r]! + lists[r]!.length;
  const flat = Int32Array.from(lists.flat());
  const inner = Float64Array.from(bands, (b) => b.innerRadiusPx);
  const outer = Float64Array.from(bands, (b) => b.outerRadiusPx);
  // Radii a pixel centre must have to reach band b at all (with room for float32 rounding).
  const spanIn = Float64Array.from(bands, (b) => Math.max(0, Math.floor(b.innerRadiusPx - reach) - 1));
  const spanOut = Float64Array.from(bands, (b) => Math.floor(b.outerRadiusPx + reach) + 2);
  const spans = new Int32Array(4 * nb);
  const order = new Int32Array(2 * nb);
  const refCount = references.length;

  for (let j = rowStart; j < rowEnd; j++) {
    const dy = j - t.cy;
    const bxy = 2 * kxy * dy;
    const cyy = kyy * dy * dy;
    const row = j * width;
    const spanCount = rowSpans(width, t.cx, kxx, bxy, cyy, spanIn, spanOut, spans, order);
    let iDone = -1;
    for (let k = 0; k < spanCount; k++) {
      const o = order[k]!;
      const iFrom = Math.max(spans[2 * o]!, iDone + 1);
      const iTo = spans[2 * o + 1]!;
      if (iTo > iDone) iDone = iTo;
      for (let i = iFrom; i <= iTo; i++) {
        const p = row + i;
        const dx = i - t.cx;
        // The table's value: the same expression, rounded to float32.
        const r0 = Math.fround(Math.sqrt(dx * (kxx * dx + bxy) + cyy));
        if (r0 >= rTop) continue;
        const ri = r0 | 0;
        const first = start[ri]!;
        const last = start[ri + 1]!;
        if (first === last) continue;
        if (excluded !== null && excluded[p] !== 0) continue;
        const v = data[p]!;
        if (v - v !== 0) continue; // NaN or infinite
        let az = Math.floor((correctedAzimuthRad(t, i, j) + Math.PI) * mPerRad);
        if (az >= m) az = m - 1;
        else if (az < 0) az = 0;
        for (let q = first; q < last; q++) {
          const b = flat[q]!;
          const rIn = inner[b]!;
          const rOut = outer[b]!;
          let c: number;
          if (r0 - reach >= rIn && r0 + reach < rOut) c = full;
          else if (r0 + reach < rIn || r0 - reach >= rOut) continue;
          else {
            c = 0;
            for (let bb = 0; bb < s; bb++) {
              const yy = dy + off[bb]!;
              const syy = kyy * yy * yy;
              const sxy = 2 * kxy * yy;
              for (let a = 0; a < s; a++) {
                const xs = dx + off[a]!;
                const r = Math.sqrt(xs * (kxx * xs + sxy) + syy);
                if (r >= rIn && r < rOut) c++;
              }
            }
            if (c === 0) continue;
          }
          const cell = b * m + az;
          count[cell] += c;
          valueSum[cell] += c * v;
          for (let q2 = 0; q2 < refCount; q2++) refSums[q2]![cell] += c * sampleReference(references[q2]!, r0);
        }
      }
    }
  }
  return out;
}

/**
 * The pixel spans of one row whose centre radius may lie in [spanIn[b], spanOut[b]]
 * for some band b: up to two per band (the annulus cut by the row), as inclusive
 * [first, last] pairs in `spans`, widened by a pixel; `order` receives the span
 * indices sorted by first pixel. Returns the number of spans.
 */
function rowSpans(
  width: number,
  cx: number,
  kxx: number,
  bxy: number,
  cyy: number,
  spanIn: Float64Array,
  spanOut: Float64Array,
  spans: Int32Array,
  order: Int32Array,
): number {
  let count = 0;
  // R^2 = kxx dx^2 + bxy dx + cyy = r^2 at dx = (-bxy -+ sqrt(bxy^2 - 4 kxx (cyy - r^2))) / (2 kxx).
  const vertex = -bxy / (2 * kxx);
  const add = (lo: number, hi: number) => {
    const first = Math.max(0, Math.floor(cx + lo) - 1);
    const last = Math.min(width - 1, Math.ceil(cx + hi) + 1);
    if (first > last) return;
    spans[2 * count] = first;
    spans[2 * count + 1] = last;
    count++;
  };
  for (let b = 0; b < spanIn.length; b++) {
    const outer = spanOut[b]!;
    const discOuter = bxy * bxy - 4 * kxx * (cyy - outer * outer);
    if (!(discOuter >= 0)) continue;
    const hOuter = Math.sqrt(discOuter) / (2 * kxx);
    const inn = spanIn[b]!;
    const discInner = bxy * bxy - 4 * kxx * (cyy - inn * inn);
    if (inn > 0 && discInner > 0) {
      const hInner = Math.sqrt(discInner) / (2 * kxx);
      add(vertex - hOuter, vertex - hInner);
      add(vertex + hInner, vertex + hOuter);
    } else {
      add(vertex - hOuter, vertex + hOuter);
    }
  }
  for (let k = 0; k < count; k++) order[k] = k;
  // Insertion sort by first pixel (a few dozen spans at most).
  for (let k = 1; k < count; k++) {
    const o = order[k]!;
    const key = spans[2 * o]!;
    let q = k - 1;
    while (q >= 0 && spans[2 * order[q]!]! > key) {
      order[q + 1] = order[q]!;
      q--;
    }
    order[q + 1] = o;
  }
  return count;
}

/** Linear interpolation of a reference at radius r, held constant beyond its ends. */
function sampleReference(ref: { rMinPx: number; binWidthPx: number; values: Float64Array }, r: number): number {
  const n = ref.values.length;
  if (n === 0) return Number.NaN;
  const u = (r - ref.rMinPx) / ref.binWidthPx - 0.5;
  if (u <= 0) return ref.values[0]!;
  if (u >= n - 1) return ref.values[n - 1]!;
  const k = Math.floor(u);
  const t = u - k;
  return (1 - t) * ref.values[k]! + t * ref.values[k + 1]!;
}
