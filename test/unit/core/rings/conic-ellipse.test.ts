import { describe, expect, it } from 'vitest';
import { conicFromEllipse, ellipseFromConic } from '../../../../core/rings/conic-ellipse';

describe('ellipseFromConic', () => {
  it('reads x^2/25 + y^2/9 = 1 as semi-axes 5 and 3 along x (hand-derived)', () => {
    const e = ellipseFromConic({ a: 1 / 25, b: 0, c: 1 / 9, d: 0, e: 0, f: -1 })!;
    expect(e.centerXPx).toBeCloseTo(0, 12);
    expect(e.semiMajorPx).toBeCloseTo(5, 12);
    expect(e.semiMinorPx).toBeCloseTo(3, 12);
    expect(e.angleDeg).toBeCloseTo(0, 10);
    expect(e.axisRatio).toBeCloseTo(5 / 3, 12);
    expect(e.radiusPx).toBeCloseTo(Math.sqrt(15), 12);
  });

  it('puts the major axis of x^2/9 + y^2/25 = 1 at 90 degrees', () => {
    expect(ellipseFromConic({ a: 1 / 9, b: 0, c: 1 / 25, d: 0, e: 0, f: -1 })!.angleDeg).toBeCloseTo(90, 10);
  });

  it('reads the rotated ellipse 2x^2 + 2xy + 2y^2 = 3 (eigen-axes at 45 and 135 degrees, hand-derived)', () => {
    // Quadratic form [[2, 1], [1, 2]]: eigenvalue 1 along (1, -1) (135 deg), 3 along (1, 1) (45 deg).
    // Semi-axes sqrt(3/1) (major, at 135 deg) and sqrt(3/3) = 1.
    const e = ellipseFromConic({ a: 2, b: 2, c: 2, d: 0, e: 0, f: -3 })!;
    expect(e.semiMajorPx).toBeCloseTo(Math.sqrt(3), 12);
    expect(e.semiMinorPx).toBeCloseTo(1, 12);
    expect(e.angleDeg).toBeCloseTo(135, 10);
  });

  it('gives the same ellipse for a conic multiplied by -7', () => {
    const c = conicFromEllipse(10, -4, 8, 5, 30);
    const e = ellipseFromConic({ a: -7 * c.a, b: -7 * c.b, c: -7 * c.c, d: -7 * c.d, e: -7 * c.e, f: -7 * c.f })!;
    expect(e.angleDeg).toBeCloseTo(30, 10);
    expect(e.centerXPx).toBeCloseTo(10, 10);
  });

  it('returns null for a hyperbola, an empty ellipse and a parabola', () => {
    expect(ellipseFromConic({ a: 1, b: 0, c: -1, d: 0, e: 0, f: -1 })).toBeNull();
    expect(ellipseFromConic({ a: 1, b: 0, c: 1, d: 0, e: 0, f: 1 })).toBeNull();
    expect(ellipseFromConic({ a: 1, b: 0, c: 0, d: 0, e: 1, f: 0 })).toBeNull();
  });
});

describe('conicFromEllipse', () => {
  it('round-trips centre, semi-axes and angle over the half-turn', () => {
    for (const angle of [0, 17, 45, 89.5, 90, 123, 179]) {
      const c = conicFromEllipse(512.25, 300.5, 410, 400, angle);
      const e = ellipseFromConic(c)!;
      expect(e.centerXPx).toBeCloseTo(512.25, 9);
      expect(e.centerYPx).toBeCloseTo(300.5, 9);
      expect(e.semiMajorPx).toBeCloseTo(410, 9);
      expect(e.semiMinorPx).toBeCloseTo(400, 9);
      expect(e.angleDeg).toBeCloseTo(angle, 8);
    }
  });
  it('puts points of the parametric ellipse on the conic', () => {
    const c = conicFromEllipse(3, 4, 7, 2, 60);
    const t = (60 * Math.PI) / 180;
    for (let k = 0; k < 12; k++) {
      const u = 7 * Math.cos(k), v = 2 * Math.sin(k);
      const x = 3 + u * Math.cos(t) - v * Math.sin(t);
      const y = 4 + u * Math.sin(t) + v * Math.cos(t);
      expect(c.a * x * x + c.b * x * y + c.c * y * y + c.d * x + c.e * y + c.f).toBeCloseTo(0, 10);
    }
  });
  it('refuses a zero semi-axis', () => {
    expect(() => conicFromEllipse(0, 0, 1, 0, 0)).toThrow(/semi-axes must be positive/);
  });
});
