import { describe, expect, it } from 'vitest';
import { loadOpenCv } from '../../../../app/node/load-opencv';
import { maskBeamStop } from '../../../../core/rings/mask-beam-stop';
import { refineFrame } from '../../../../core/rings/refine-frame';
import { makeRingImage } from './ring-test-image';

const cv = loadOpenCv();
const RINGS = [{ radiusPx: 140, sigmaPx: 2, peakCounts: 300 }, { radiusPx: 230, sigmaPx: 2.5, peakCounts: 200 }, { radiusPx: 330, sigmaPx: 3, peakCounts: 150 }, { radiusPx: 420, sigmaPx: 3, peakCounts: 60 }];

describe('refineFrame', () => {
  it('recovers centre, axis ratio and angle behind a beam stop over the centre, within 4 sigma (seed 91)', () => {
    const frame = { centerXPx: 500.4, centerYPx: 498.2, axisRatio: 1.02, angleDeg: 10 };
    const img = makeRingImage({ width: 1000, height: 1000, frame, rings: RINGS, background: { levelCounts: 20, centralCounts: 800, decayPx: 150 }, beamStop: { xPx: 502, yPx: 495, radiusPx: 45, stemAngleDeg: -30, stemWidthPx: 16, levelCounts: 3 }, seed: 91 });
    const stop = maskBeamStop(img.raster, cv);
    const r = refineFrame(img.raster, stop.mask, {}, cv);
    if (!r.ok) throw new Error(r.reason);
    expect(r.converged).toBe(true);
    expect(r.rings).toHaveLength(4);
    expect(Math.abs(r.frame.centerXPx - 500.4)).toBeLessThan(4 * r.sigma.centerXPx);
    expect(Math.abs(r.frame.centerYPx - 498.2)).toBeLessThan(4 * r.sigma.centerYPx);
    expect(Math.abs(r.frame.axisRatio - 1.02)).toBeLessThan(4 * r.sigma.axisRatio);
    expect(Math.abs(r.frame.angleDeg - 10)).toBeLessThan(4 * r.sigma.angleDeg);
    expect(r.sigma.centerXPx).toBeLessThan(0.01);
    r.rings.forEach((g, k) => {
      expect(Math.abs(g.radiusPx - RINGS[k]!.radiusPx)).toBeLessThan(4 * g.radiusSigmaPx + 0.003);
      // Each ring's own direct ellipse agrees with the common model.
      expect(Math.abs(g.ellipse!.axisRatio - 1.02)).toBeLessThan(0.002);
      expect(Math.abs(g.ownFrame!.frame.centerXPx - 500.4)).toBeLessThan(5 * g.ownFrame!.sigma.centerXPx);
    });
    // Noise-model weights make the reduced chi-square about 1.
    expect(r.reducedChiSquare).toBeGreaterThan(0.7);
    expect(r.reducedChiSquare).toBeLessThan(1.5);
  });

  it('refines a centre 150 px outside the image from arcs and says so (seed 92)', () => {
    const frame = { centerXPx: -150.7, centerYPx: 300.2, axisRatio: 1.01, angleDeg: 70 };
    const img = makeRingImage({ width: 640, height: 640, frame, rings: [{ radiusPx: 300, sigmaPx: 3, peakCounts: 200 }, { radiusPx: 450, sigmaPx: 3, peakCounts: 150 }, { radiusPx: 600, sigmaPx: 3, peakCounts: 150 }], background: { levelCounts: 20, centralCounts: 800, decayPx: 300 }, seed: 92 });
    const r = refineFrame(img.raster, undefined, {}, cv);
    if (!r.ok) throw new Error(r.reason);
    expect(Math.abs(r.frame.centerXPx + 150.7)).toBeLessThan(4 * r.sigma.centerXPx);
    expect(Math.abs(r.frame.centerYPx - 300.2)).toBeLessThan(4 * r.sigma.centerYPx);
    expect(Math.abs(r.frame.axisRatio - 1.01)).toBeLessThan(4 * r.sigma.axisRatio);
    expect(r.sigma.centerXPx).toBeLessThan(0.2);
    expect(r.warnings.join(' ')).toMatch(/centre lies outside the image/);
  });

  it('starts from a given frame without OpenCV (the user dragged the centre 3 px off)', () => {
    const frame = { centerXPx: 300.4, centerYPx: 310.2, axisRatio: 1, angleDeg: 0 };
    const img = makeRingImage({ width: 600, height: 600, frame, rings: RINGS.slice(0, 2), seed: 93 });
    const r = refineFrame(img.raster, undefined, { start: { ...frame, centerXPx: 303.4 }, fitDistortion: false });
    if (!r.ok) throw new Error(r.reason);
    expect(r.firstEstimate).toBeNull();
    expect(r.frame.axisRatio).toBe(1);
    expect(Math.abs(r.frame.centerXPx - 300.4)).toBeLessThan(4 * r.sigma.centerXPx);
  });

  it('comes back with a reason for an image without rings (seed 94)', () => {
    const img = makeRingImage({ width: 400, height: 400, frame: { centerXPx: 200, centerYPx: 200, axisRatio: 1, angleDeg: 0 }, rings: [], background: { levelCounts: 100, centralCounts: 0, decayPx: 1 }, seed: 94 });
    const r = refineFrame(img.raster, undefined, {}, cv);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/no centre stands out/);
    const fromStart = refineFrame(img.raster, undefined, { start: { centerXPx: 200, centerYPx: 200, axisRatio: 1, angleDeg: 0 } });
    expect(fromStart).toMatchObject({ ok: false, reason: /no ring stands/ });
  });

  it('refuses to run without a start and without OpenCV', () => {
    const r = { width: 10, height: 10, data: new Float32Array(100) };
    expect(() => refineFrame(r, undefined, {})).toThrow(/needs an OpenCV handle/);
  });
});
