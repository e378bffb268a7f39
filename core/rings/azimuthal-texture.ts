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
import { subPixelOffsets, validateIntegrationInputs, validateSubdivision, type IntegrationGeometry } from './integration-geometry';
import { correctedAzimuthRad } from './pattern-frame';
import type { PixelMask } from './pixel-mask';

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

/**
 * Azimuthal texture of `raster` in the bands given.
 * @throws RangeError for sizes that do not match, bands out of order or options out of range
 */
export function integrateAzimuthalTexture(
  raster: Raster,
  mask: PixelMask | null,
  geometry: IntegrationGeometry,
  options: AzimuthalTextureOptions,
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
  const sum = new Float64Array(nb * m);
  const area = new Float64Array(nb * m);
  const azimuthRad = new Float64Array(m);
  const dphi = (2 * Math.PI) / m;
  for (let k = 0; k < m; k++) azimuthRad[k] = -Math.PI + (k + 0.5) * dphi;
  const fullCellAreaPx = Float64Array.from(bands, (b) => (Math.PI * (b.outerRadiusPx ** 2 - b.innerRadiusPx ** 2)) / m);
  const references = (options.references ?? []).map((ref, i) => {
    if (!(ref.binWidthPx > 0) || !Number.isFinite(ref.rMinPx)) throw new RangeError(`references[${i}] needs a finite rMinPx and a positive binWidthPx`);
    return { rMinPx: ref.rMinPx, binWidthPx: ref.binWidthPx, values: bridgeGaps(ref.values) ?? new Float64Array(ref.values.length).fill(Number.NaN) };
  });
  const refSums = references.map(() => new Float64Array(nb * m));
  if (nb > 0) accumulateCells(raster, mask, geometry, bands, m, s, sum, area, references, refSums);
  const mean = new Float64Array(nb * m);
  for (let c = 0; c < mean.length; c++) mean[c] = area[c]! > 0 ? sum[c]! / area[c]! : Number.NaN;
  const referenceMeans = refSums.map((rs) => rs.map((v, c) => (area[c]! > 0 ? v / area[c]! : Number.NaN)));
  return { bands, azimuthBinCount: m, azimuthRad, mean, sum, area, fullCellAreaPx, referenceMeans };
}

function accumulateCells(
  raster: Raster,
  mask: PixelMask | null,
  g: IntegrationGeometry,
  bands: RadiusBand[],
  m: number,
  s: number,
  sum: Float64Array,
  area: Float64Array,
  references: { rMinPx: number; binWidthPx: number; values: Float64Array }[],
  refSums: Float64Array[],
): void {
  const { width, height, kxx, kxy, kyy, radiusPx } = g;
  const t = g.transform;
  const data = raster.data;
  const excluded = mask ? mask.excluded : null;
  const off = subPixelOffsets(s);
  const share = 1 / (s * s);
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

  for (let j = 0; j < height; j++) {
    const dy = j - t.cy;
    const row = j * width;
    for (let i = 0; i < width; i++) {
      const p = row + i;
      const r0 = radiusPx[p]!;
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
      const dx = i - t.cx;
      for (let q = first; q < last; q++) {
        const b = flat[q]!;
        const rIn = inner[b]!;
        const rOut = outer[b]!;
        let f: number;
        if (r0 - reach >= rIn && r0 + reach < rOut) f = 1;
        else if (r0 + reach < rIn || r0 - reach >= rOut) continue;
        else {
          let c = 0;
          for (let bb = 0; bb < s; bb++) {
            const yy = dy + off[bb]!;
            const cyy = kyy * yy * yy;
            const bxy = 2 * kxy * yy;
            for (let a = 0; a < s; a++) {
              const xs = dx + off[a]!;
              const r = Math.sqrt(xs * (kxx * xs + bxy) + cyy);
              if (r >= rIn && r < rOut) c++;
            }
          }
          if (c === 0) continue;
          f = c * share;
        }
        const cell = b * m + az;
        area[cell] += f;
        sum[cell] += f * v;
        for (let q2 = 0; q2 < references.length; q2++) refSums[q2]![cell] += f * sampleReference(references[q2]!, r0);
      }
    }
  }
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
