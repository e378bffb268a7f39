import { describe, expect, it } from 'vitest';
import { integrateAzimuthalTexture } from '../../../../core/rings/azimuthal-texture';
import { prepareIntegrationGeometry } from '../../../../core/rings/integration-geometry';
import { correctedAzimuthRad, frameTransform } from '../../../../core/rings/pattern-frame';

const frame = { centerXPx: 64.3, centerYPx: 61.8, axisRatio: 1.02, angleDeg: 20 };
const g = prepareIntegrationGeometry(130, 124, frame);
const constant = (v: number) => ({ width: 130, height: 124, data: new Float32Array(130 * 124).fill(v) });

describe('integrateAzimuthalTexture', () => {
  it('splits each band into cells of equal area whose areas add up to the annulus, pi (r2^2 - r1^2)', () => {
    const bands = [{ innerRadiusPx: 20.3, outerRadiusPx: 24.1 }, { innerRadiusPx: 40, outerRadiusPx: 47.5 }];
    const t = integrateAzimuthalTexture(constant(3), null, g, { bands, azimuthBinCount: 36, subdivision: 4 });
    bands.forEach((b, i) => {
      const cells = t.area.subarray(i * 36, (i + 1) * 36);
      const total = cells.reduce((a, c) => a + c, 0);
      expect(Math.abs(total / (Math.PI * (b.outerRadiusPx ** 2 - b.innerRadiusPx ** 2)) - 1)).toBeLessThan(0.005);
      // Pixels go whole to an azimuth bin: cells of 14 px (band 0) and 57 px (band 1) vary by a pixel or so.
      cells.forEach((c) => expect(Math.abs(c / t.fullCellAreaPx[i]! - 1)).toBeLessThan(i === 0 ? 0.15 : 0.1));
      t.mean.subarray(i * 36, (i + 1) * 36).forEach((m) => expect(m).toBeCloseTo(3, 5));
    });
  });

  it('puts a pixel in the azimuth bin of its corrected azimuth, from -pi, +y (image down) at +pi/2', () => {
    const tr = frameTransform(frame);
    const img = constant(0);
    for (let j = 0; j < 124; j++) for (let i = 0; i < 130; i++) img.data[j * 130 + i] = correctedAzimuthRad(tr, i, j);
    const t = integrateAzimuthalTexture(img, null, g, { bands: [{ innerRadiusPx: 30, outerRadiusPx: 40 }], azimuthBinCount: 24 });
    for (let m = 0; m < 24; m++) expect(Math.abs(t.mean[m]! - t.azimuthRad[m]!)).toBeLessThan(Math.PI / 24);
    // Straight below the centre (larger y) is azimuth +pi/2 for a round frame.
    const round = prepareIntegrationGeometry(130, 124, { centerXPx: 64, centerYPx: 60, axisRatio: 1, angleDeg: 0 });
    const below = constant(0);
    for (let j = 95; j < 101; j++) below.data[j * 130 + 64] = 1000;
    const tb = integrateAzimuthalTexture(below, null, round, { bands: [{ innerRadiusPx: 34, outerRadiusPx: 42 }], azimuthBinCount: 4 });
    // Bin 2 covers [0, pi/2), bin 3 [pi/2, pi): the bright pixels sit at exactly +pi/2.
    expect(tb.mean[3]!).toBeGreaterThan(0);
    expect(tb.mean[0]).toBe(0);
    expect(tb.mean[1]).toBe(0);
  });

  it('honours the mask: cells behind it have no area and a NaN mean', () => {
    const mask = { width: 130, height: 124, excluded: new Uint8Array(130 * 124) };
    for (let j = 0; j < 62; j++) for (let i = 0; i < 130; i++) mask.excluded[j * 130 + i] = 1; // upper half: azimuths < 0
    const t = integrateAzimuthalTexture(constant(2), mask, g, { bands: [{ innerRadiusPx: 30, outerRadiusPx: 36 }], azimuthBinCount: 8 });
    expect(t.area[1]).toBe(0);
    expect(Number.isNaN(t.mean[1]!)).toBe(true);
    expect(t.mean[6]).toBeCloseTo(2, 6);
  });

  it('counts a pixel in each of two overlapping bands', () => {
    const t = integrateAzimuthalTexture(constant(1), null, g, { bands: [{ innerRadiusPx: 30, outerRadiusPx: 36 }, { innerRadiusPx: 33, outerRadiusPx: 39 }], azimuthBinCount: 4 });
    const a = t.area.subarray(0, 4).reduce((x, y) => x + y, 0);
    const b = t.area.subarray(4, 8).reduce((x, y) => x + y, 0);
    expect(Math.abs(a / (Math.PI * (36 ** 2 - 30 ** 2)) - 1)).toBeLessThan(0.01);
    expect(Math.abs(b / (Math.PI * (39 ** 2 - 33 ** 2)) - 1)).toBeLessThan(0.01);
  });

  it('refuses bands out of order and a bad bin count', () => {
    expect(() => integrateAzimuthalTexture(constant(1), null, g, { bands: [{ innerRadiusPx: 5, outerRadiusPx: 5 }] })).toThrow(/bands\[0\] must have 0 <= innerRadiusPx < outerRadiusPx/);
    expect(() => integrateAzimuthalTexture(constant(1), null, g, { bands: [], azimuthBinCount: 3 })).toThrow(/azimuthBinCount/);
    expect(integrateAzimuthalTexture(constant(1), null, g, { bands: [] }).mean.length).toBe(0);
  });
});
