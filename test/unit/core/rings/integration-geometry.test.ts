import { describe, expect, it } from 'vitest';
import {
  inSector,
  prepareIntegrationGeometry,
  subPixelOffsets,
  validateIntegrationInputs,
  validateSubdivision,
} from '../../../../core/rings/integration-geometry';
import { correctedRadiusPx, frameTransform } from '../../../../core/rings/pattern-frame';

describe('prepareIntegrationGeometry', () => {
  it('gives each pixel the corrected radius of pattern-frame.ts (elliptical frame)', () => {
    const frame = { centerXPx: 40.3, centerYPx: 27.9, axisRatio: 1.03, angleDeg: 117 };
    const g = prepareIntegrationGeometry(80, 60, frame);
    const t = frameTransform(frame);
    for (const [i, j] of [[0, 0], [79, 59], [40, 28], [13, 51], [70, 5]] as const) {
      const r = correctedRadiusPx(t, i, j);
      expect(Math.abs(g.radiusPx[j * 80 + i]! - r)).toBeLessThan(1e-6 * Math.max(1, r));
    }
    expect(g.maxRadialGradient).toBeCloseTo(Math.sqrt(1.03), 12);
  });

  it('reports the smallest and largest pixel radius, the smallest above 0 with the centre outside the image', () => {
    const g = prepareIntegrationGeometry(50, 40, { centerXPx: -20, centerYPx: 10, axisRatio: 1, angleDeg: 0 });
    expect(g.minRadiusPx).toBeCloseTo(20, 6);
    expect(g.maxRadiusPx).toBeCloseTo(Math.hypot(69, 29), 4);
  });

  it('refuses a bad size or frame, naming it', () => {
    const frame = { centerXPx: 1, centerYPx: 1, axisRatio: 1, angleDeg: 0 };
    expect(() => prepareIntegrationGeometry(0, 10, frame)).toThrow(/width must be an integer >= 1; got 0/);
    expect(() => prepareIntegrationGeometry(10, 2.5, frame)).toThrow(/height/);
    expect(() => prepareIntegrationGeometry(10, 10, { ...frame, axisRatio: 0.9 })).toThrow(/axisRatio/);
  });
});

describe('subPixelOffsets / validateSubdivision', () => {
  it('are the centres of s equal parts of a pixel, symmetric about its centre', () => {
    expect(Array.from(subPixelOffsets(1))).toEqual([0]);
    expect(Array.from(subPixelOffsets(2))).toEqual([-0.25, 0.25]);
    const o = Array.from(subPixelOffsets(3));
    expect(o[0]).toBeCloseTo(-1 / 3, 15);
    expect(o[1]).toBeCloseTo(0, 15);
    expect(o[2]).toBeCloseTo(1 / 3, 15);
  });
  it('refuses a subdivision that is not an integer from 1 to 16', () => {
    expect(() => validateSubdivision(0)).toThrow(/subdivision must be an integer from 1/);
    expect(() => validateSubdivision(2.5)).toThrow(/got 2.5/);
    expect(() => validateSubdivision(17)).toThrow(/16/);
  });
});

describe('validateIntegrationInputs', () => {
  const g = prepareIntegrationGeometry(4, 3, { centerXPx: 1, centerYPx: 1, axisRatio: 1, angleDeg: 0 });
  it('refuses a raster of another size than the geometry, and a mask of another size than the raster', () => {
    expect(() => validateIntegrationInputs({ width: 3, height: 4, data: new Float32Array(12) }, null, g)).toThrow(/raster is 3 x 4 .* prepared for 4 x 3/);
    expect(() => validateIntegrationInputs({ width: 4, height: 3, data: new Float32Array(12) }, { width: 4, height: 2, excluded: new Uint8Array(8) }, g)).toThrow(/mask is 4 x 2/);
    expect(() => validateIntegrationInputs({ width: 4, height: 3, data: new Float32Array(11) }, null, g)).toThrow(/holds 11 samples/);
  });
});

describe('inSector', () => {
  it('keeps the azimuths from start through start + width, across the -pi/pi seam', () => {
    const s = { startRad: (3 * Math.PI) / 4, widthRad: Math.PI / 2 };
    expect(inSector(Math.PI * 0.9, s)).toBe(true);
    expect(inSector(-Math.PI * 0.9, s)).toBe(true);
    expect(inSector(0, s)).toBe(false);
    expect(inSector(-Math.PI / 2, s)).toBe(false);
    expect(inSector(1.234, { startRad: 0, widthRad: 2 * Math.PI })).toBe(true);
  });
});
