/** Seeded points on ellipses and circles for the fit tests (shared with the reference tests). */
import { gaussian, mulberry32 } from '../../../support/seeded-random';

export interface EllipsePoints { x: number[]; y: number[] }

/**
 * n points on the ellipse (centre, semi-axes A >= B, major axis at angleDeg) at
 * parameters spread over [t0, t0 + spanRad), with normal noise of sigmaPx in x and y.
 */
export function ellipsePoints(seed: number, n: number, cx: number, cy: number, A: number, B: number, angleDeg: number, sigmaPx: number, spanRad = 2 * Math.PI, t0 = 0): EllipsePoints {
  const rand = mulberry32(seed);
  const t = (angleDeg * Math.PI) / 180;
  const x: number[] = [];
  const y: number[] = [];
  for (let k = 0; k < n; k++) {
    const s = t0 + (spanRad * (k + rand())) / n;
    const u = A * Math.cos(s);
    const v = B * Math.sin(s);
    x.push(cx + u * Math.cos(t) - v * Math.sin(t) + sigmaPx * gaussian(rand));
    y.push(cy + u * Math.sin(t) + v * Math.cos(t) + sigmaPx * gaussian(rand));
  }
  return { x, y };
}
