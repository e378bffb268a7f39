import { describe, expect, it } from 'vitest';
import { estimatePixelNoise } from '../../../../core/rings/detector-noise-model';
import { frameTransform, correctedRadiusPx } from '../../../../core/rings/pattern-frame';
import { emptyMask } from '../../../../core/rings/pixel-mask';
import { sampleRingPoints } from '../../../../core/rings/ring-points';
import { makeRingImage } from './ring-test-image';

const FRAME = { centerXPx: 250.35, centerYPx: 240.8, axisRatio: 1.02, angleDeg: 125 };
const RINGS = [{ radiusPx: 90, sigmaPx: 1.5, peakCounts: 400 }, { radiusPx: 180, sigmaPx: 2.5, peakCounts: 300 }];

describe('sampleRingPoints', () => {
  it('puts noise-free points on the true ellipses to 0.01 px (a symmetric ring, a sloping background)', () => {
    const img = makeRingImage({ width: 500, height: 500, frame: FRAME, rings: RINGS, background: { levelCounts: 20, centralCounts: 600, decayPx: 100 }, seed: 81, noise: false });
    const sets = sampleRingPoints(img.raster, undefined, FRAME, RINGS.map((r) => ({ radiusPx: r.radiusPx + 0.7, sigmaPx: r.sigmaPx, halfWindowPx: 4 * r.sigmaPx })));
    const t = frameTransform(FRAME);
    sets.forEach((s, k) => {
      expect(s.xPx.length).toBeGreaterThan(0.95 * s.wedgeCount);
      let worst = 0;
      for (let i = 0; i < s.xPx.length; i++) worst = Math.max(worst, Math.abs(correctedRadiusPx(t, s.xPx[i]!, s.yPx[i]!) - RINGS[k]!.radiusPx));
      expect(worst).toBeLessThan(0.01);
      expect(Math.abs(s.widthPx - Math.sqrt(RINGS[k]!.sigmaPx ** 2 + 1 / 12))).toBeLessThan(0.1);
    });
  });

  it('gives point sigmas that match the scatter of Poisson-noisy points (seed 82)', () => {
    const img = makeRingImage({ width: 500, height: 500, frame: FRAME, rings: RINGS, background: { levelCounts: 20, centralCounts: 600, decayPx: 100 }, seed: 82 });
    const noise = estimatePixelNoise(img.raster);
    const t = frameTransform(FRAME);
    for (const withModel of [true, false]) {
      const sets = sampleRingPoints(img.raster, undefined, FRAME, RINGS.map((r) => ({ radiusPx: r.radiusPx, sigmaPx: r.sigmaPx, halfWindowPx: 4 * r.sigmaPx })), withModel ? { noise } : {});
      for (const [k, s] of sets.entries()) {
        let z2 = 0;
        for (let i = 0; i < s.xPx.length; i++) z2 += ((correctedRadiusPx(t, s.xPx[i]!, s.yPx[i]!) - RINGS[k]!.radiusPx) / s.sigmaPx[i]!) ** 2;
        const rmsZ = Math.sqrt(z2 / s.xPx.length);
        expect(rmsZ).toBeGreaterThan(0.8);
        expect(rmsZ).toBeLessThan(1.25);
      }
    }
  });

  it('skips wedges under the mask and outside the image', () => {
    const img = makeRingImage({ width: 500, height: 500, frame: FRAME, rings: RINGS, seed: 83, noise: false });
    const mask = emptyMask(500, 500);
    for (let j = 0; j < 500; j++) for (let i = 250; i < 500; i++) mask.excluded[j * 500 + i] = 1;
    const [s] = sampleRingPoints(img.raster, mask, FRAME, [{ radiusPx: 90, sigmaPx: 1.5, halfWindowPx: 6 }]);
    expect(s!.xPx.every((x) => x < 250)).toBe(true);
    expect(s!.coveredWedges / s!.wedgeCount).toBeGreaterThan(0.45);
    expect(s!.coveredWedges / s!.wedgeCount).toBeLessThan(0.55);
    const outside = sampleRingPoints(img.raster, undefined, { ...FRAME, centerXPx: -400 }, [{ radiusPx: 90, sigmaPx: 1.5, halfWindowPx: 6 }]);
    expect(outside[0]!.xPx.length).toBe(0);
  });

  it('refuses a window narrower than the ring and a bad stride', () => {
    const r = { width: 10, height: 10, data: new Float32Array(100) };
    expect(() => sampleRingPoints(r, undefined, FRAME, [{ radiusPx: 5, sigmaPx: 2, halfWindowPx: 1 }])).toThrow(/rings\[0\] needs radiusPx > halfWindowPx > sigmaPx > 0/);
    expect(() => sampleRingPoints(r, undefined, FRAME, [], { pixelStride: 0 })).toThrow(/pixelStride must be a positive integer/);
  });
});
