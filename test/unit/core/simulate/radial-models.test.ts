import { describe, expect, it } from 'vitest';
import { electronWavelengthA, reciprocalRadiusPerA, ringRadiusPx } from '../../../../core/physics';
import {
  amorphousCarbonHalos,
  amorphousHaloCounts,
  checkAmorphousHalo,
  checkDiffuseBackground,
  checkDirectBeam,
  diffuseBackgroundCounts,
  directBeamCounts,
} from '../../../../core/simulate';

const camera = { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: 50_000 };

describe('diffuseBackgroundCounts', () => {
  const spec = { levelCounts: 200, scaleRadiusPx: 80, exponent: 2.5, floorCounts: 7 };

  it('equals floor + level at the reference radius and falls monotonically from the centre', () => {
    expect(diffuseBackgroundCounts(spec, 600, 600)).toBeCloseTo(207, 12);
    let last = Infinity;
    for (let r = 0; r < 3000; r += 7) {
      const v = diffuseBackgroundCounts(spec, r, 600);
      expect(v).toBeLessThan(last);
      expect(v).toBeGreaterThan(7);
      last = v;
    }
  });

  it('falls as R^-exponent far outside the scale radius: B(2R) - floor = (B(R) - floor) / 2^2.5 to 0.1%', () => {
    const a = diffuseBackgroundCounts(spec, 8000, 600) - 7;
    const b = diffuseBackgroundCounts(spec, 16000, 600) - 7;
    expect(b / a).toBeCloseTo(2 ** -2.5, 3);
  });

  it('checkDiffuseBackground names the bad field', () => {
    expect(() => checkDiffuseBackground({ ...spec, scaleRadiusPx: 0 })).toThrow(/background.scaleRadiusPx must be > 0 px; got 0/);
    expect(() => checkDiffuseBackground({ ...spec, levelCounts: -1 })).toThrow(/background.levelCounts must be a finite number >= 0; got -1/);
  });
});

describe('amorphousHaloCounts', () => {
  const halo = { dA: 2.1, fwhmPerA: 0.12, peakCounts: 90 };

  it('peaks at ringRadiusPx(2.1 Å) and falls to half at q = 1/2.1 ± 0.06 1/Å', () => {
    const r0 = ringRadiusPx(2.1, camera);
    expect(amorphousHaloCounts(halo, r0, camera)).toBeCloseTo(90, 9);
    // Radii where q = 1/d ± FWHM/2: d = 1 / (1/2.1 ± 0.06).
    for (const q of [1 / 2.1 - 0.06, 1 / 2.1 + 0.06]) {
      const r = ringRadiusPx(1 / q, camera);
      expect(reciprocalRadiusPerA(r, camera)).toBeCloseTo(q, 12);
      expect(amorphousHaloCounts(halo, r, camera)).toBeCloseTo(45, 9);
    }
  });

  it('amorphousCarbonHalos(100) gives halos at 2.1 and 1.2 Å, the second at half height', () => {
    expect(amorphousCarbonHalos(100).map((h) => [h.dA, h.peakCounts])).toEqual([[2.1, 100], [1.2, 50]]);
  });

  it('checkAmorphousHalo names the bad field', () => {
    expect(() => checkAmorphousHalo({ ...halo, fwhmPerA: -0.1 }, 'halos[1].')).toThrow(/halos\[1\]\.fwhmPerA must be > 0 1\/Å; got -0.1/);
  });
});

describe('directBeamCounts', () => {
  it('is peakCounts at the centre and half of it at FWHM / 2', () => {
    const beam = { peakCounts: 1e6, fwhmPx: 8 };
    expect(directBeamCounts(beam, 0)).toBe(1e6);
    expect(directBeamCounts(beam, 4)).toBeCloseTo(5e5, 6);
    expect(() => checkDirectBeam({ peakCounts: 1, fwhmPx: 0 })).toThrow(/directBeam.fwhmPx must be > 0 px/);
  });
});
