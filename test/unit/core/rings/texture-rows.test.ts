/**
 * The texture pass as the unit of partitioned work (accumulateTextureRows):
 * visiting only the row spans that can reach a band gives exactly the cells of a
 * visit of every pixel (written out here as the reference, with the per-pixel
 * float32 radius table), and sums over bands of rows merge into the sums over the
 * whole image.
 */
import { describe, expect, it } from 'vitest';
import {
  accumulateTextureRows,
  integrateAzimuthalTexture,
  mergeTextureCellSums,
  type RadiusBand,
  type TextureCellPlan,
  type TextureCellSums,
} from '../../../../core/rings/azimuthal-texture';
import { bridgeGaps } from '../../../../core/rings/bridge-gaps';
import { integrationFrame, prepareIntegrationGeometry, subPixelOffsets } from '../../../../core/rings/integration-geometry';
import { correctedAzimuthRad, type PatternFrame } from '../../../../core/rings/pattern-frame';
import { splitRows } from '../../../../core/rings/row-bands';
import { mulberry32 } from '../../../support/seeded-random';

const W = 150;
const H = 140;

function image(seed: number) {
  const rand = mulberry32(seed);
  const data = Float32Array.from({ length: W * H }, () => Math.floor(50 + 500 * rand()));
  data[70 * W + 20] = Number.NaN;
  return { width: W, height: H, data };
}

/** Linear interpolation held at the ends (the reference's own copy of the rule). */
function sample(values: Float64Array, rMin: number, w: number, r: number): number {
  const u = (r - rMin) / w - 0.5;
  if (u <= 0) return values[0]!;
  if (u >= values.length - 1) return values[values.length - 1]!;
  const k = Math.floor(u);
  return (1 - (u - k)) * values[k]! + (u - k) * values[k + 1]!;
}

/** Every pixel visited, its centre radius from the float32 table, its sub-pixels tested at band edges. */
function referenceCells(img: ReturnType<typeof image>, mask: Uint8Array | null, frame: PatternFrame, bands: RadiusBand[], m: number, s: number, ref: Float64Array): TextureCellSums {
  const g = prepareIntegrationGeometry(W, H, frame);
  const t = g.transform;
  const count = new Float64Array(bands.length * m), values = new Float64Array(bands.length * m), refs = new Float64Array(bands.length * m);
  const reach = Math.SQRT1_2 * g.maxRadialGradient + 1e-3;
  const off = subPixelOffsets(s);
  for (let j = 0; j < H; j++) {
    for (let i = 0; i < W; i++) {
      const p = j * W + i;
      const v = img.data[p]!;
      if ((mask && mask[p]) || !Number.isFinite(v)) continue;
      const r0 = g.radiusPx[p]!;
      let az = Math.floor(((correctedAzimuthRad(t, i, j) + Math.PI) * m) / (2 * Math.PI));
      az = Math.min(m - 1, Math.max(0, az));
      bands.forEach((b, bi) => {
        // Bands are listed for integer radii floor(rIn - reach) .. floor(rOut + reach).
        const ri = Math.floor(r0);
        if (ri < Math.max(0, Math.floor(b.innerRadiusPx - reach)) || ri > Math.floor(b.outerRadiusPx + reach)) return;
        let c = 0;
        if (r0 - reach >= b.innerRadiusPx && r0 + reach < b.outerRadiusPx) c = s * s;
        else if (r0 + reach < b.innerRadiusPx || r0 - reach >= b.outerRadiusPx) return;
        else {
          for (const oy of off) for (const ox of off) {
            const xs = i - t.cx + ox, yy = j - t.cy + oy;
            const r = Math.sqrt(xs * (g.kxx * xs + 2 * g.kxy * yy) + g.kyy * yy * yy);
            if (r >= b.innerRadiusPx && r < b.outerRadiusPx) c++;
          }
          if (c === 0) return;
        }
        const cell = bi * m + az;
        count[cell] += c;
        values[cell] += c * v;
        refs[cell] += c * sample(ref, 0, 0.5, r0);
      });
    }
  }
  return { subPixelCount: count, subPixelValueSum: values, referenceSums: [refs] };
}

const FRAMES: PatternFrame[] = [
  { centerXPx: 74.3, centerYPx: 71.8, axisRatio: 1.02, angleDeg: 20 },
  { centerXPx: 75, centerYPx: 70, axisRatio: 1, angleDeg: 0 },
  { centerXPx: -40.6, centerYPx: 66.1, axisRatio: 1.08, angleDeg: 100 },
];
const BANDS: RadiusBand[] = [
  { innerRadiusPx: 8.2, outerRadiusPx: 11.9 },
  { innerRadiusPx: 30.3, outerRadiusPx: 34.1 },
  { innerRadiusPx: 33, outerRadiusPx: 37.5 }, // overlaps the previous band
  { innerRadiusPx: 70, outerRadiusPx: 71 },
  { innerRadiusPx: 120.4, outerRadiusPx: 128.9 },
];

describe('accumulateTextureRows', () => {
  const img = image(601);
  const rand = mulberry32(602);
  const mask = Uint8Array.from({ length: W * H }, () => (rand() < 0.05 ? 1 : 0));
  const profile = Float64Array.from({ length: 400 }, (_, k) => 100 + 30 * Math.sin(k / 7));

  it('gives exactly the cells of a visit of every pixel (3 frames x s 1, 3, 4; overlapping bands; seeds 601-602)', () => {
    for (const frame of FRAMES) {
      for (const s of [1, 3, 4]) {
        const plan: TextureCellPlan = {
          geometry: integrationFrame(W, H, frame),
          bands: BANDS,
          azimuthBinCount: 36,
          subdivision: s,
          references: [{ rMinPx: 0, binWidthPx: 0.5, values: bridgeGaps(profile)! }],
        };
        const got = accumulateTextureRows(img, { width: W, height: H, excluded: mask }, plan, 0, H);
        const want = referenceCells(img, mask, frame, BANDS, 36, s, profile);
        expect(Array.from(got.subPixelCount)).toEqual(Array.from(want.subPixelCount));
        expect(Array.from(got.subPixelValueSum)).toEqual(Array.from(want.subPixelValueSum));
        // The reference sums: the same products added in the same order.
        expect(Array.from(got.referenceSums[0]!)).toEqual(Array.from(want.referenceSums[0]!));
      }
    }
  });

  it('sums over bands of rows merge into the sums over the whole image (counts and integer value sums exactly, references to 1e-13)', () => {
    const plan: TextureCellPlan = {
      geometry: integrationFrame(W, H, FRAMES[0]!),
      bands: BANDS,
      azimuthBinCount: 24,
      subdivision: 3,
      references: [{ rMinPx: 0, binWidthPx: 0.5, values: bridgeGaps(profile)! }],
    };
    const m = { width: W, height: H, excluded: mask };
    const whole = accumulateTextureRows(img, m, plan, 0, H);
    for (const bandCount of [2, 5]) {
      const merged = mergeTextureCellSums(splitRows(H, bandCount).map((b) => accumulateTextureRows(img, m, plan, b.rowStart, b.rowEnd)));
      expect(Array.from(merged.subPixelCount)).toEqual(Array.from(whole.subPixelCount));
      expect(Array.from(merged.subPixelValueSum)).toEqual(Array.from(whole.subPixelValueSum));
      merged.referenceSums[0]!.forEach((v, c) => expect(Math.abs(v - whole.referenceSums[0]![c]!)).toBeLessThanOrEqual(1e-13 * Math.abs(whole.referenceSums[0]![c]!)));
    }
  });

  it('makes the same texture from the light frame as from the per-pixel table', () => {
    const options = { bands: BANDS, azimuthBinCount: 30, references: [{ rMinPx: 0, binWidthPx: 0.5, values: profile }] };
    const a = integrateAzimuthalTexture(img, null, prepareIntegrationGeometry(W, H, FRAMES[2]!), options);
    const b = integrateAzimuthalTexture(img, null, integrationFrame(W, H, FRAMES[2]!), options);
    expect(Array.from(b.mean)).toEqual(Array.from(a.mean));
    expect(Array.from(b.area)).toEqual(Array.from(a.area));
    expect(Array.from(b.referenceMeans[0]!)).toEqual(Array.from(a.referenceMeans[0]!));
  });
});
