import { describe, expect, it } from 'vitest';
import {
  azimuthTableValue,
  checkTexture,
  drawGrainSpots,
  grainSpotsFactor,
  grainSpotsNodeValues,
  normaliseAzimuthTableMean,
  randomStream,
  tabulateAzimuth,
  textureFactor,
  type TextureSpec,
} from '../../../../core/simulate';

/** Mean over a turn by the midpoint rule with n points. */
function turnMean(f: (phi: number) => number, n = 100_000): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += f(-Math.PI + ((i + 0.5) * 2 * Math.PI) / n);
  return s / n;
}

describe('textureFactor', () => {
  it("'cosine' texture of amplitude 0.4 at 30 degrees: mean 1, 1.4 at 30 and 210 degrees, 0.6 at 120 degrees", () => {
    const t: TextureSpec = { shape: 'cosine', amplitude: 0.4, azimuthDeg: 30 };
    const deg = Math.PI / 180;
    expect(turnMean((p) => textureFactor(t, p))).toBeCloseTo(1, 12);
    expect(textureFactor(t, 30 * deg)).toBeCloseTo(1.4, 12);
    expect(textureFactor(t, -150 * deg)).toBeCloseTo(1.4, 12);
    expect(textureFactor(t, 120 * deg)).toBeCloseTo(0.6, 12);
  });

  it("'arcs' texture has mean 1 and puts the fraction A into two opposite arcs", () => {
    const t: TextureSpec = { shape: 'arcs', amplitude: 0.7, azimuthDeg: 1000, arcFwhmDeg: 20 };
    expect(turnMean((p) => textureFactor(t, p))).toBeCloseTo(1, 9);
    // phi_0 = 1000 degrees = 280 = -80 degrees: maxima at -80 and 100 degrees, equal.
    const deg = Math.PI / 180;
    expect(textureFactor(t, -80 * deg)).toBeCloseTo(textureFactor(t, 100 * deg), 12);
    expect(textureFactor(t, 10 * deg)).toBeCloseTo(0.3, 6);
  });

  it('checkTexture names the bad field', () => {
    expect(() => checkTexture({ shape: 'cosine', amplitude: 1.5, azimuthDeg: 0 })).toThrow(/texture.amplitude must lie in \[0, 1\]; got 1.5/);
    expect(() => checkTexture({ shape: 'ring' as 'arcs', amplitude: 0.5, azimuthDeg: 0 })).toThrow(/texture.shape must be 'cosine' or 'arcs'/);
  });
});

describe('drawGrainSpots / grainSpotsFactor', () => {
  it('drawGrainSpots(40, null, seed 5) gives 40 spots whose weights sum to 40, the same again for the same seed', () => {
    const a = drawGrainSpots(40, null, randomStream(5));
    expect(a).toHaveLength(40);
    expect(a.reduce((s, x) => s + x.weight, 0)).toBeCloseTo(40, 10);
    for (const s of a) expect(s.azimuthDeg >= -180 && s.azimuthDeg < 180).toBe(true);
    expect(drawGrainSpots(40, null, randomStream(5))).toEqual(a);
    expect(drawGrainSpots(40, null, randomStream(6))).not.toEqual(a);
  });

  it('grainSpotsFactor has mean exactly 1 over a turn (spots of 1.5 px on a ring of 300 px, seed 9)', () => {
    const spots = drawGrainSpots(25, null, randomStream(9));
    const sigma = 1.5 / (300 * 2 * Math.sqrt(2 * Math.LN2));
    expect(turnMean((p) => grainSpotsFactor(spots, sigma, p), 400_000)).toBeCloseTo(1, 9);
    // Each spot's maximum is at its azimuth.
    const s0 = spots[0]!;
    const at = (s0.azimuthDeg * Math.PI) / 180;
    expect(grainSpotsFactor(spots, sigma, at)).toBeGreaterThan(grainSpotsFactor(spots, sigma, at + 2 * sigma));
  });

  it('grainSpotsNodeValues equals grainSpotsFactor at every node, spots near ±180 degrees included', () => {
    const spots = [{ azimuthDeg: 179.99, weight: 1.3 }, { azimuthDeg: -179.5, weight: 0.2 }, { azimuthDeg: 12, weight: 1.5 }];
    const sigma = 0.01;
    const n = 8192;
    const values = grainSpotsNodeValues(spots, sigma, n);
    for (let j = 0; j < n; j++) expect(values[j]!).toBeCloseTo(grainSpotsFactor(spots, sigma, -Math.PI + (2 * Math.PI * j) / n), 10);
  });

  it('with a texture, drawGrainSpots gives stronger spots where the texture is high (seed 3, 4000 grains)', () => {
    const t: TextureSpec = { shape: 'cosine', amplitude: 0.9, azimuthDeg: 0 };
    const spots = drawGrainSpots(4000, t, randomStream(3));
    const near = spots.filter((s) => Math.abs(Math.cos((s.azimuthDeg * Math.PI) / 180)) > 0.9);
    const far = spots.filter((s) => Math.abs(Math.sin((s.azimuthDeg * Math.PI) / 180)) > 0.9);
    const mean = (xs: typeof spots): number => xs.reduce((s, x) => s + x.weight, 0) / xs.length;
    expect(mean(near) / mean(far)).toBeGreaterThan(5);
  });
});

describe('tabulateAzimuth / azimuthTableValue', () => {
  it('interpolates periodically: the value at pi equals the value at -pi, and 3 turns away is the same angle', () => {
    const table = tabulateAzimuth(16, (p) => 2 + Math.sin(p));
    expect(azimuthTableValue(table, Math.PI)).toBeCloseTo(azimuthTableValue(table, -Math.PI), 14);
    expect(azimuthTableValue(table, 0.3 + 6 * Math.PI)).toBeCloseTo(azimuthTableValue(table, 0.3), 12);
    expect(azimuthTableValue(table, -Math.PI + (2 * Math.PI * 5) / 16)).toBeCloseTo(2 + Math.sin(-Math.PI + (2 * Math.PI * 5) / 16), 14);
  });

  it('after normaliseAzimuthTableMean the interpolant has mean exactly 1 over a turn', () => {
    const table = tabulateAzimuth(37, (p) => Math.exp(Math.cos(3 * p)));
    normaliseAzimuthTableMean(table);
    expect(turnMean((p) => azimuthTableValue(table, p), 37 * 2000)).toBeCloseTo(1, 12);
    expect(() => normaliseAzimuthTableMean(tabulateAzimuth(8, () => 0))).toThrow(/positive finite mean/);
  });
});
