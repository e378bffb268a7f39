import { describe, expect, it } from 'vitest';
import {
  braggAngleRad,
  cameraConstantAPx,
  cameraLengthPxFromCameraConstant,
  cameraLengthPxFromPhysical,
  cameraLengthPxFromReciprocalScale,
  dSpacingFromRadiusA,
  dSpacingSmallAngleA,
  electronWavelengthA,
  reciprocalRadiusPerA,
  reciprocalScalePerNmPerPx,
  ringRadiusPx,
  smallAngleRelativeErrorD,
  type CameraGeometry,
} from '../../../../core/physics';

const camera200: CameraGeometry = {
  wavelengthA: electronWavelengthA(200e3),
  cameraLengthPx: cameraLengthPxFromPhysical(1.0, 14e-6),
};

describe('ringRadiusPx / dSpacingFromRadiusA', () => {
  it('ringRadiusPx(d) follows R = L tan(2 asin(lambda/2d)) written out independently', () => {
    const d = 2.355;
    const theta = Math.asin(camera200.wavelengthA / (2 * d));
    expect(ringRadiusPx(d, camera200)).toBeCloseTo(camera200.cameraLengthPx * Math.tan(2 * theta), 9);
  });

  it('dSpacingFromRadiusA inverts ringRadiusPx to 1e-12 relative over 0.3 to 20 Å', () => {
    for (const d of [0.3, 0.5, 1, 1.442, 2.355, 5, 20]) {
      const r = ringRadiusPx(d, camera200);
      expect(Math.abs(dSpacingFromRadiusA(r, camera200) / d - 1)).toBeLessThan(1e-12);
    }
  });

  it('ringRadiusPx for Au 111 at 200 kV, L = 1 m, p = 14 µm is about 761 px (R = lambda L / d, hand calculation)', () => {
    // Hand calculation, small-angle: 0.025079 Å * 1 m / 2.355 Å = 10.649 mm = 760.7 px.
    expect(ringRadiusPx(2.355, camera200)).toBeGreaterThan(760.5);
    expect(ringRadiusPx(2.355, camera200)).toBeLessThan(761.0);
  });

  it('braggAngleRad throws when lambda exceeds 2d', () => {
    expect(() => braggAngleRad(0.01, 0.025)).toThrow(/no reflection/);
  });

  it('ringRadiusPx throws when the ring would scatter past 90 degrees', () => {
    expect(() => ringRadiusPx(0.017, { wavelengthA: 0.025, cameraLengthPx: 1000 })).toThrow(/90 degrees/);
  });

  it('dSpacingFromRadiusA rejects a non-positive radius and a bad camera', () => {
    expect(() => dSpacingFromRadiusA(0, camera200)).toThrow(/radiusPx/);
    expect(() => dSpacingFromRadiusA(100, { wavelengthA: 0.025, cameraLengthPx: -1 })).toThrow(/cameraLengthPx/);
    expect(() => dSpacingFromRadiusA(100, { wavelengthA: Number.NaN, cameraLengthPx: 1 })).toThrow(/wavelengthA/);
  });

  it('reciprocalRadiusPerA equals 1/d at the ring of spacing d', () => {
    const r = ringRadiusPx(1.23, camera200);
    expect(reciprocalRadiusPerA(r, camera200)).toBeCloseTo(1 / 1.23, 12);
    expect(reciprocalRadiusPerA(0, camera200)).toBe(0);
  });
});

describe('camera conversions', () => {
  it('cameraLengthPxFromPhysical(1 m, 14 µm) is 71428.57 px', () => {
    expect(cameraLengthPxFromPhysical(1, 14e-6)).toBeCloseTo(71428.5714, 3);
  });

  it('camera constant and reciprocal scale round-trip to the same L/p', () => {
    const k = cameraConstantAPx(camera200);
    expect(cameraLengthPxFromCameraConstant(k, camera200.wavelengthA)).toBeCloseTo(camera200.cameraLengthPx, 6);
    const s = reciprocalScalePerNmPerPx(camera200);
    expect(cameraLengthPxFromReciprocalScale(s, camera200.wavelengthA)).toBeCloseTo(camera200.cameraLengthPx, 6);
  });

  it('reciprocalScalePerNmPerPx is p / (lambda L): 14 µm / (2.5079 pm * 1 m) = 0.005582 /nm per px', () => {
    // Hand calculation: 14e-6 / (2.50793e-12 * 1) m^-1 = 5.5823e6 m^-1 = 5.5823e-3 nm^-1.
    expect(reciprocalScalePerNmPerPx(camera200)).toBeCloseTo(5.5823e-3, 6);
  });

  it('the reciprocal scale is the slope of 1/d against radius at the centre', () => {
    const s = reciprocalScalePerNmPerPx(camera200) / 10; // per Å per px
    const slope = reciprocalRadiusPerA(1, camera200);
    expect(slope / s - 1).toBeLessThan(1e-9);
  });

  it('rejects non-positive inputs with the parameter name', () => {
    expect(() => cameraLengthPxFromPhysical(0, 14e-6)).toThrow(/cameraLengthM/);
    expect(() => cameraLengthPxFromPhysical(1, -1)).toThrow(/pixelSizeM/);
    expect(() => cameraLengthPxFromReciprocalScale(0, 0.025)).toThrow(/reciprocal scale/);
  });
});

describe('smallAngleRelativeErrorD', () => {
  // Series check (hand derivation): d_small / d = 2 sin(t) / tan(2t) = 1 - 1.5 t^2 + O(t^4), t = lambda / 2d.
  for (const kv of [80, 300]) {
    it(`at ${kv} kV for d = 1 Å matches -1.5 (lambda/2d)^2 to within the t^4 term`, () => {
      const camera = { wavelengthA: electronWavelengthA(kv * 1e3), cameraLengthPx: 50_000 };
      const err = smallAngleRelativeErrorD(1, camera);
      const t = camera.wavelengthA / 2;
      expect(Math.abs(err - -1.5 * t * t)).toBeLessThan(2 * t ** 4);
      console.log(`small-angle d error at ${kv} kV, d = 1 Å: ${(err * 1e6).toFixed(1)} ppm`);
    });
  }

  it('is -654 ppm at 80 kV and -145 ppm at 300 kV for d = 1 Å (to 1 ppm)', () => {
    const e80 = smallAngleRelativeErrorD(1, { wavelengthA: electronWavelengthA(80e3), cameraLengthPx: 1e4 });
    const e300 = smallAngleRelativeErrorD(1, { wavelengthA: electronWavelengthA(300e3), cameraLengthPx: 1e4 });
    expect(e80 * 1e6).toBeCloseTo(-654, 0);
    expect(e300 * 1e6).toBeCloseTo(-145, 0);
  });

  it('dSpacingSmallAngleA agrees with the exact d to 1e-7 at very small angles', () => {
    const camera = { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: 1e5 };
    const d = 20;
    const r = ringRadiusPx(d, camera);
    expect(Math.abs(dSpacingSmallAngleA(r, camera) / d - 1)).toBeLessThan(1e-6);
  });
});
