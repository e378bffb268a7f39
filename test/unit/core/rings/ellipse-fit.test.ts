import { describe, expect, it } from 'vitest';
import { fitEllipseDirect } from '../../../../core/rings/ellipse-fit';
import { ellipsePoints } from './ring-geometry-points';

describe('fitEllipseDirect', () => {
  it('recovers an exact ellipse from 40 noise-free points (seed 11)', () => {
    const p = ellipsePoints(11, 40, 1020.5, 990.25, 612, 600, 33, 0);
    const fit = fitEllipseDirect(p.x, p.y);
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.ellipse.centerXPx).toBeCloseTo(1020.5, 7);
    expect(fit.ellipse.centerYPx).toBeCloseTo(990.25, 7);
    expect(fit.ellipse.semiMajorPx).toBeCloseTo(612, 7);
    expect(fit.ellipse.semiMinorPx).toBeCloseTo(600, 7);
    expect(fit.ellipse.angleDeg).toBeCloseTo(33, 5);
  });

  it('recovers an exact ellipse from 6 points on a 60-degree arc (seed 12)', () => {
    const p = ellipsePoints(12, 6, -300, 200, 900, 880, 150, 0, Math.PI / 3, 0.4);
    const fit = fitEllipseDirect(p.x, p.y);
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.ellipse.centerXPx).toBeCloseTo(-300, 4);
    expect(fit.ellipse.semiMajorPx).toBeCloseTo(900, 4);
    expect(fit.ellipse.angleDeg).toBeCloseTo(150, 3);
  });

  it('lands within the noise of the truth for 720 points with 0.3 px scatter (seed 13)', () => {
    const p = ellipsePoints(13, 720, 800, 700, 505, 495, 72, 0.3);
    const fit = fitEllipseDirect(p.x, p.y);
    if (!fit.ok) throw new Error(fit.reason);
    // Centre scatter about sigma * sqrt(2/n) = 0.016 px; allow 5 of those.
    expect(Math.abs(fit.ellipse.centerXPx - 800)).toBeLessThan(0.08);
    expect(Math.abs(fit.ellipse.centerYPx - 700)).toBeLessThan(0.08);
    expect(Math.abs(fit.ellipse.axisRatio - 505 / 495)).toBeLessThan(5e-4);
    expect(Math.abs(fit.ellipse.angleDeg - 72)).toBeLessThan(2);
  });

  it('reports too few points and collinear points as values', () => {
    expect(fitEllipseDirect([0, 1, 2, 3, 4], [0, 1, 2, 3, 4])).toMatchObject({ ok: false, reason: /at least 6 points/ });
    const line = fitEllipseDirect([0, 1, 2, 3, 4, 5, 6], [0, 2, 4, 6, 8, 10, 12]);
    expect(line.ok).toBe(false);
  });

  it('returns an ellipse even for points on a hyperbola (the method is ellipse-specific: Fitzgibbon et al. 1999)', () => {
    const xs = [0.5, 1, 2, 3, 4, -0.5, -1, -2, -3];
    const hyper = fitEllipseDirect(xs, xs.map((x) => 1 / x));
    if (!hyper.ok) throw new Error(hyper.reason);
    const { a, b, c } = hyper.conic;
    expect(4 * a * c - b * b).toBeGreaterThan(0);
  });

  it('refuses arrays of different length and non-finite points', () => {
    expect(() => fitEllipseDirect([1, 2, 3], [1, 2])).toThrow(/same length/);
    expect(() => fitEllipseDirect([1, 2, NaN, 4, 5, 6], [1, 2, 3, 4, 5, 6])).toThrow(/point 2 is not finite/);
  });
});
