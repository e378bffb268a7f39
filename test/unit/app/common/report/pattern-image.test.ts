/**
 * renderPatternImage and encodePatternPng on hand-made patterns whose geometry is
 * known exactly: the ellipse of each ring is checked against the frame formula
 * R^2 = u^2 / q + q v^2 (README, "Units and conventions"), the grey scale against
 * its stated mapping, the PNG by decoding it again.
 */
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { encodePatternPng, PALETTE, renderPatternImage, type PatternImage, type ReportPredictedPhase, type Rgb } from '../../../../../app/common/report';
import { syntheticRaster, syntheticResult, type SyntheticFrame } from './synthetic-analysis';

const pixel = (img: PatternImage, x: number, y: number): Rgb => {
  const o = 4 * (Math.round(y) * img.width + Math.round(x));
  return [img.data[o]!, img.data[o + 1]!, img.data[o + 2]!];
};
const distance = (a: Rgb, b: Rgb): number => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
/** Smallest colour distance to `c` among the 3 x 3 pixels round (x, y). */
const nearest = (img: PatternImage, x: number, y: number, c: Rgb): number => {
  let best = Infinity;
  for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) best = Math.min(best, distance(pixel(img, x + dx, y + dy), c));
  return best;
};
/** Point of the ellipse of corrected radius R in direction theta (radians from +x toward +y). */
const onEllipse = (f: SyntheticFrame, R: number, theta: number): { x: number; y: number } => {
  const a = (f.angleDeg * Math.PI) / 180;
  const rho = R / Math.sqrt(Math.cos(theta - a) ** 2 / f.q + f.q * Math.sin(theta - a) ** 2);
  return { x: f.cx + rho * Math.cos(theta), y: f.cy + rho * Math.sin(theta) };
};

const W = 1200;
const H = 900;
const frame: SyntheticFrame = { cx: 600.3, cy: 450.7, q: 1.2, angleDeg: 30 };
const raster = syntheticRaster(W, H, frame, [200, 300]);
const result = syntheticResult(W, H, frame, [
  { radiusPx: 200, hkl: [1, 1, 1] },
  { radiusPx: 300, hkl: null },
]);

describe('renderPatternImage', () => {
  it('draws each fitted ring as its ellipse in the analysis frame, indexed amber and unexplained raspberry', () => {
    const img = renderPatternImage(raster, result, { openSectorDeg: 0 });
    expect([img.width, img.height, img.binning]).toEqual([W, H, 1]);
    const a = (frame.angleDeg * Math.PI) / 180;
    // Major axis: R sqrt(q) from the centre; minor axis: R / sqrt(q).
    for (const theta of [a, a + Math.PI, a + Math.PI / 2, a - Math.PI / 2, a + 1]) {
      const p = onEllipse(frame, 200, theta);
      expect(nearest(img, p.x, p.y, PALETTE.fittedRing.onImage)).toBeLessThan(40);
      const q = onEllipse(frame, 300, theta);
      expect(nearest(img, q.x, q.y, PALETTE.unexplainedRing.onImage)).toBeLessThan(40);
    }
    // A circle of radius R would lie 200 (sqrt(1.2) - 1) = 19 px inside the ellipse along the major axis: nothing drawn there.
    const circle = { x: frame.cx + 200 * Math.cos(a), y: frame.cy + 200 * Math.sin(a) };
    expect(nearest(img, circle.x, circle.y, PALETTE.fittedRing.onImage)).toBeGreaterThan(100);
  });

  it('leaves an open sector free of fitted arcs, so the data show there', () => {
    const round: SyntheticFrame = { cx: 600.3, cy: 450.7, q: 1, angleDeg: 0 };
    const img = renderPatternImage(syntheticRaster(W, H, round, [200]), syntheticResult(W, H, round, [{ radiusPx: 200, hkl: [1, 1, 1] }]));
    expect(img.openSector).not.toBeNull();
    expect(img.openSector!.widthDeg).toBeCloseTo(90, 9);
    const open = (img.openSector!.angleDeg * Math.PI) / 180;
    const inside = onEllipse(round, 200, open);
    const across = onEllipse(round, 200, open + Math.PI);
    expect(nearest(img, inside.x, inside.y, PALETTE.fittedRing.onImage)).toBeGreaterThan(100);
    expect(nearest(img, across.x, across.y, PALETTE.fittedRing.onImage)).toBeLessThan(40);
    // The open sector looks where the view is longest: along the long side of a 1200 x 900 image.
    expect(Math.abs(Math.cos(open))).toBeGreaterThan(0.7);
  });

  it('marks the centre with a cross whose arms leave the centre pixel itself free', () => {
    const img = renderPatternImage(raster, result);
    const arm = Math.max(8, W / 45);
    for (const [dx, dy] of [[1, 0], [-1, 0], [0, 1], [0, -1]]) {
      expect(nearest(img, frame.cx + dx! * arm * 0.7, frame.cy + dy! * arm * 0.7, PALETTE.centre.onImage)).toBeLessThan(40);
    }
    const c = pixel(img, frame.cx, frame.cy);
    expect(c[0]).toBe(c[2]); // grey: neither cross nor tint
  });

  it('tints masked pixels blue in proportion to their share of each block', () => {
    const excluded = new Uint8Array(W * H);
    for (let j = 100; j < 141; j++) for (let i = 100; i < 141; i++) excluded[j * W + i] = 1;
    const img = renderPatternImage(raster, result, { mask: { width: W, height: H, excluded } });
    const m = pixel(img, 120, 120);
    const free = pixel(img, 160, 120);
    expect(free[0]).toBe(free[2]);
    // 55 % of (70, 110, 255) over grey g: blue exceeds red by 0.55 x 185.
    expect(m[2] - m[0]).toBeGreaterThan(95);
    // Block averaging by 2: block column 70 (pixels 140 and 141) straddles the mask edge, half masked.
    const half = renderPatternImage(raster, result, { mask: { width: W, height: H, excluded }, maxLongSidePx: 600 });
    const halfPixel = pixel(half, 70, 60);
    const fullPixel = pixel(half, 60, 60);
    expect(half.binning).toBe(2);
    expect(fullPixel[2] - fullPixel[0]).toBeGreaterThan(95);
    // 0.55 x 0.5 of the tint: about half the full block's blue excess.
    expect(halfPixel[2] - halfPixel[0]).toBeGreaterThan(0.4 * (fullPixel[2] - fullPixel[0]));
    expect(halfPixel[2] - halfPixel[0]).toBeLessThan(0.6 * (fullPixel[2] - fullPixel[0]));
  });

  it('block-averages to fit maxLongSidePx and maps the block means by the stated logarithmic scale', () => {
    const w = 2400;
    const h = 600;
    const data = new Float32Array(w * h);
    // Columns 2I and 2I + 1 hold 100 + 10 I and its neighbour's mean: every 2 x 2 block averages to 100 + 10 I + 2.5.
    for (let j = 0; j < h; j++) for (let i = 0; i < w; i++) data[j * w + i] = 100 + 10 * Math.floor(i / 2) + (i % 2) * 5;
    const noCentre = { ...syntheticResult(w, h, frame, []), center: { xPx: Number.NaN, yPx: Number.NaN, sigmaPx: Number.NaN, sigmaXPx: Number.NaN, sigmaYPx: Number.NaN } };
    for (const polarity of ['bright-on-dark', 'dark-on-light'] as const) {
      const img = renderPatternImage({ width: w, height: h, data }, noCentre, { maxLongSidePx: 1200, polarity });
      expect([img.width, img.height, img.binning]).toEqual([1200, 300, 2]);
      const { loValue: lo, hiValue: hi, decades } = img.display;
      // The 1st and 99.8th percentiles of 1200 evenly spaced column means.
      expect(Math.abs(lo - (102.5 + 10 * 0.01 * 1199))).toBeLessThan(10 * 7);
      expect(Math.abs(hi - (102.5 + 10 * 0.998 * 1199))).toBeLessThan(10 * 7);
      for (const I of [0, 5, 30, 100, 600, 1199]) {
        const v = 100 + 10 * I + 2.5;
        const x = Math.min(1, Math.max(0, (v - lo) / (hi - lo)));
        const t = Math.log1p(10 ** decades * x) / Math.log1p(10 ** decades);
        const expected = 255 * (polarity === 'bright-on-dark' ? t : 1 - t);
        expect(Math.abs(pixel(img, I, 150)[0] - expected)).toBeLessThanOrEqual(1);
      }
      expect(img.notes.join(' ')).toMatch(/no pattern centre/);
      expect(img.display.description).toMatch(/1st to the 99\.8th percentile.*block-averaged 2 x 2/);
    }
  });

  it('labels rings with their hkl (#n when unexplained) and predicted rings only where no fitted ring lies', () => {
    const predicted: ReportPredictedPhase = {
      phaseId: 'Au',
      description: 'Au, test',
      scale: 1,
      fitted: false,
      rings: [
        { radiusPx: 200.5, dA: 2.35, hkls: [[1, 1, 1]], label: '111', relativeIntensity: 100 },
        { radiusPx: 250, dA: 2.04, hkls: [[2, 0, 0]], label: '200', relativeIntensity: 50 },
      ],
    };
    const img = renderPatternImage(raster, result, { predicted });
    expect(img.labels.map((l) => `${l.kind}:${l.text}`).sort()).toEqual(['fitted:111', 'predicted:200', 'unexplained:#2']);
    for (const l of img.labels) {
      expect(l.x).toBeGreaterThanOrEqual(0);
      expect(l.y).toBeGreaterThanOrEqual(0);
      expect(l.x + l.width).toBeLessThanOrEqual(img.width);
      expect(l.y + l.height).toBeLessThanOrEqual(img.height);
    }
    const [a, b, c] = img.labels;
    const apart = (p: typeof a, q: typeof a): boolean => p!.x + p!.width <= q!.x || q!.x + q!.width <= p!.x || p!.y + p!.height <= q!.y || q!.y + q!.height <= p!.y;
    expect(apart(a, b) && apart(a, c) && apart(b, c)).toBe(true);
    // The predicted ring is drawn dashed in cyan somewhere round its ellipse.
    let cyan = 0;
    for (let k = 0; k < 360; k++) {
      const p = onEllipse(frame, 250, (k * Math.PI) / 180);
      if (nearest(img, p.x, p.y, PALETTE.predictedRing.onImage) < 40) cyan++;
    }
    expect(cyan).toBeGreaterThan(40); // a dashed half ring
    expect(cyan).toBeLessThan(200);
  });

  it('rejects a mask or a raster of the wrong size, and malformed options', () => {
    expect(() => renderPatternImage(raster, result, { mask: { width: 10, height: 10, excluded: new Uint8Array(100) } })).toThrow(RangeError);
    expect(() => renderPatternImage({ width: 10, height: 10, data: new Float32Array(100) }, result)).toThrow(/analysis was of a 1200 x 900 image/);
    expect(() => renderPatternImage(raster, result, { clipPercentiles: [50, 10] })).toThrow(/clipPercentiles/);
    expect(() => renderPatternImage(raster, result, { maxLongSidePx: 3.5 })).toThrow(/maxLongSidePx/);
  });
});

describe('encodePatternPng', () => {
  it('writes an RGB PNG holding the rendered pixels and the grey-scale description', () => {
    const options = { maxLongSidePx: 400 };
    const img = renderPatternImage(raster, result, options);
    const png = decode(encodePatternPng(raster, result, { ...options, text: { Software: 'Annula test' } }));
    expect([png.width, png.height, png.channels, png.depth]).toEqual([img.width, img.height, 3, 8]);
    for (let k = 0; k < img.width * img.height; k += 997) {
      expect([png.data[3 * k], png.data[3 * k + 1], png.data[3 * k + 2]]).toEqual([img.data[4 * k], img.data[4 * k + 1], img.data[4 * k + 2]]);
    }
    expect(png.text.Description).toBe(img.display.description);
    expect(png.text.Software).toBe('Annula test');
  });
});
