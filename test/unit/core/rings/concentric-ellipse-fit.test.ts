import { describe, expect, it } from 'vitest';
import { fitConcentricEllipses, type RingPointList } from '../../../../core/rings/concentric-ellipse-fit';
import { frameTransform, pixelAtCorrectedPolar, type PatternFrame } from '../../../../core/rings/pattern-frame';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

/** Points at corrected radius R_k + noise along the corrected radius, over an azimuth range. */
function ringPoints(seed: number, frame: PatternFrame, radii: number[], perRing: number, sigmaPx: number, az0 = -Math.PI, azSpan = 2 * Math.PI): RingPointList[] {
  const rand = mulberry32(seed);
  const t = frameTransform(frame);
  return radii.map((r) => {
    const x = new Float64Array(perRing), y = new Float64Array(perRing);
    for (let i = 0; i < perRing; i++) {
      const az = az0 + (azSpan * (i + rand())) / perRing;
      const p = pixelAtCorrectedPolar(t, r + sigmaPx * gaussian(rand), az);
      x[i] = p.xPx; y[i] = p.yPx;
    }
    return { xPx: x, yPx: y, sigmaPx: new Float64Array(perRing).fill(sigmaPx) };
  });
}

const FRAME: PatternFrame = { centerXPx: 1031.3, centerYPx: 1010.7, axisRatio: 1.018, angleDeg: 64 };

describe('fitConcentricEllipses', () => {
  it('recovers centre, axis ratio, angle and radii from exact points', () => {
    const fit = fitConcentricEllipses(ringPoints(31, FRAME, [210, 350, 480, 700], 90, 1e-9), { start: { centerXPx: 1025, centerYPx: 1015, axisRatio: 1, angleDeg: 0 } });
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.frame.centerXPx).toBeCloseTo(1031.3, 6);
    expect(fit.frame.centerYPx).toBeCloseTo(1010.7, 6);
    expect(fit.frame.axisRatio).toBeCloseTo(1.018, 8);
    expect(fit.frame.angleDeg).toBeCloseTo(64, 5);
    fit.radiiPx.forEach((r, k) => expect(r).toBeCloseTo([210, 350, 480, 700][k]!, 6));
  });

  it('converges from the centroid start when the angle lies across 0/180 (angle 178)', () => {
    const frame = { ...FRAME, angleDeg: 178 };
    const fit = fitConcentricEllipses(ringPoints(32, frame, [300, 600], 120, 1e-9));
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.frame.angleDeg).toBeCloseTo(178, 5);
  });

  it('gives uncertainties that match the scatter over 200 seeded trials (seed 33)', () => {
    const cx: number[] = [], q: number[] = [], ang: number[] = [], r0: number[] = [];
    const pred = { cx: 0, q: 0, ang: 0, r0: 0 };
    const trials = 200;
    for (let t = 0; t < trials; t++) {
      const fit = fitConcentricEllipses(ringPoints(33000 + t, FRAME, [250, 500], 150, 0.4), { start: FRAME, rejectSigmas: Infinity });
      if (!fit.ok) throw new Error(fit.reason);
      cx.push(fit.frame.centerXPx); q.push(fit.frame.axisRatio); ang.push(fit.frame.angleDeg); r0.push(fit.radiiPx[0]!);
      pred.cx += fit.sigma.centerXPx / trials; pred.q += fit.sigma.axisRatio / trials;
      pred.ang += fit.sigma.angleDeg / trials; pred.r0 += fit.radiusSigmaPx[0]! / trials;
    }
    const sd = (v: number[]) => { const m = v.reduce((a, b) => a + b, 0) / v.length; return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1)); };
    // With 200 trials the sample SD is within about 10 % of the true one (2 sigma of its own spread).
    expect(Math.abs(sd(cx) / pred.cx - 1)).toBeLessThan(0.15);
    expect(Math.abs(sd(q) / pred.q - 1)).toBeLessThan(0.15);
    expect(Math.abs(sd(ang) / pred.ang - 1)).toBeLessThan(0.15);
    expect(Math.abs(sd(r0) / pred.r0 - 1)).toBeLessThan(0.15);
  });

  it('trims points from a neighbouring ring and from spots (seed 34)', () => {
    const rings = ringPoints(34, FRAME, [300, 420], 200, 0.3);
    const rand = mulberry32(340);
    const t = frameTransform(FRAME);
    // 15 % of the first ring's points replaced by points 9 px out (a neighbour) or random spots.
    for (let i = 0; i < 200; i += 7) {
      const az = rand() * 2 * Math.PI;
      const p = pixelAtCorrectedPolar(t, 300 + (i % 2 ? 9 : 3 + 10 * rand()), az);
      rings[0]!.xPx[i] = p.xPx; rings[0]!.yPx[i] = p.yPx;
    }
    const trimmed = fitConcentricEllipses(rings, { start: FRAME });
    const kept = fitConcentricEllipses(rings, { start: FRAME, rejectSigmas: Infinity });
    if (!trimmed.ok || !kept.ok) throw new Error('fit failed');
    expect(trimmed.keptCounts[0]).toBeLessThanOrEqual(200 - 29);
    expect(Math.abs(trimmed.radiiPx[0]! - 300)).toBeLessThan(0.1);
    expect(Math.abs(kept.radiiPx[0]! - 300)).toBeGreaterThan(0.8);
    expect(Math.hypot(trimmed.frame.centerXPx - 1031.3, trimmed.frame.centerYPx - 1010.7)).toBeLessThan(0.08);
  });

  it('fits concentric circles with fitDistortion false and reports q = 1 exactly', () => {
    const fit = fitConcentricEllipses(ringPoints(35, { ...FRAME, axisRatio: 1 }, [200, 400], 100, 0.2), { fitDistortion: false });
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.frame.axisRatio).toBe(1);
    expect(fit.sigma.axisRatio).toBe(0);
    expect(Math.abs(fit.frame.centerXPx - 1031.3)).toBeLessThan(0.1);
  });

  it('says the angle is undetermined for a round pattern', () => {
    const fit = fitConcentricEllipses(ringPoints(36, { ...FRAME, axisRatio: 1 }, [200, 400], 200, 0.3), { start: { ...FRAME, axisRatio: 1.0001 } });
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.frame.axisRatio - 1).toBeLessThan(4 * fit.sigma.axisRatio);
    expect(fit.sigma.angleDeg).toBe(Infinity);
  });

  it('recovers the frame from arcs only, the centre 300 px outside the image (seed 37)', () => {
    const frame: PatternFrame = { centerXPx: -300, centerYPx: 500, axisRatio: 1.01, angleDeg: 20 };
    const fit = fitConcentricEllipses(ringPoints(37, frame, [500, 700, 900], 150, 0.3, -Math.PI / 3, (2 * Math.PI) / 3), { start: { centerXPx: -280, centerYPx: 490, axisRatio: 1, angleDeg: 0 } });
    if (!fit.ok) throw new Error(fit.reason);
    expect(Math.abs(fit.frame.centerXPx + 300)).toBeLessThan(5 * fit.sigma.centerXPx);
    expect(Math.abs(fit.frame.axisRatio - 1.01)).toBeLessThan(5 * fit.sigma.axisRatio);
  });

  it('reports rings with too few points and too few points overall as values', () => {
    const one = { xPx: Float64Array.of(1, 2), yPx: Float64Array.of(1, 2), sigmaPx: Float64Array.of(1, 1) };
    expect(fitConcentricEllipses([one])).toMatchObject({ ok: false, reason: /ring 0 has 2 points/ });
    expect(fitConcentricEllipses([])).toMatchObject({ ok: false, reason: /no rings/ });
  });

  it('refuses a non-positive sigma and mismatched arrays', () => {
    const bad = { xPx: Float64Array.of(1, 2, 3), yPx: Float64Array.of(1, 2, 3), sigmaPx: Float64Array.of(1, 0, 1) };
    expect(() => fitConcentricEllipses([bad])).toThrow(/rings\[0\]\.sigmaPx\[1\] must be positive/);
    expect(() => fitConcentricEllipses([{ ...bad, yPx: Float64Array.of(1) }])).toThrow(/one length/);
  });
});
