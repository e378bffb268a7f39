/**
 * Analytic ring images for the geometry tests, until (and besides) the project's
 * simulator: Gaussian rings at known corrected radii in a known PatternFrame,
 * integrated over each pixel by supersampling, on a smooth diffuse background,
 * with an optional dark beam stop on a stem, texture, spots, hot pixels, and
 * Poisson noise from the seeded generator.
 */
import type { Raster } from '../../../../core/image/raster';
import { correctedAzimuthRad, correctedRadiusPx, frameTransform, type PatternFrame } from '../../../../core/rings/pattern-frame';
import { mulberry32 } from '../../../support/seeded-random';

export interface TestRing {
  radiusPx: number;
  /** Gaussian standard deviation of the radial profile, px. */
  sigmaPx: number;
  /** Peak counts above the background. */
  peakCounts: number;
  /** Relative amplitude of a cos(2 (azimuth - textureAngle)) modulation (texture), 0-1. */
  texture?: number;
  textureAngleRad?: number;
}

export interface TestImageSpec {
  width: number;
  height: number;
  frame: PatternFrame;
  rings: TestRing[];
  /** Background counts: levelCounts + centralCounts exp(-R / decayPx). */
  background?: { levelCounts: number; centralCounts: number; decayPx: number };
  /** A dark disc on a stem running to the image edge in direction stemAngleDeg. */
  beamStop?: { xPx: number; yPx: number; radiusPx: number; stemAngleDeg: number; stemWidthPx: number; levelCounts: number };
  /** Bright Gaussian spots (sigma 1.2 px) on the rings: count per ring and peak counts. */
  spots?: { perRing: number; peakCounts: number };
  /** Isolated hot pixels: this many counts added at random places. */
  hotPixels?: { count: number; valueCounts: number };
  supersample?: number;
  seed: number;
  /** Poisson noise (default true). */
  noise?: boolean;
}

export interface TestImage {
  raster: Raster;
  hotPixelIndices: number[];
  spec: TestImageSpec;
}

export function makeRingImage(spec: TestImageSpec): TestImage {
  const { width, height, frame, rings } = spec;
  const t = frameTransform(frame);
  const ss = spec.supersample ?? 3;
  const bg = spec.background ?? { levelCounts: 20, centralCounts: 200, decayPx: 400 };
  const rand = mulberry32(spec.seed);
  // Spots: positions in corrected polar coordinates on each ring.
  const spots: Array<{ x: number; y: number; a: number }> = [];
  if (spec.spots) {
    for (const r of rings) {
      for (let k = 0; k < spec.spots.perRing; k++) {
        const az = rand() * 2 * Math.PI;
        const th = az - t.angleRad;
        const u = r.radiusPx * Math.cos(th) * t.sqrtQ, v = (r.radiusPx * Math.sin(th)) / t.sqrtQ;
        spots.push({ x: t.cx + u * t.cos - v * t.sin, y: t.cy + u * t.sin + v * t.cos, a: spec.spots.peakCounts * (0.5 + rand()) });
      }
    }
  }
  const ringAt = (x: number, y: number, R: number): number => {
    let s = 0;
    for (const r of rings) {
      const z = (R - r.radiusPx) / r.sigmaPx;
      if (z * z > 50) continue;
      let amp = r.peakCounts;
      if (r.texture) amp *= 1 + r.texture * Math.cos(2 * (correctedAzimuthRad(t, x, y) - (r.textureAngleRad ?? 0)));
      s += amp * Math.exp(-0.5 * z * z);
    }
    return s;
  };
  const maxSigma = Math.max(1, ...rings.map((r) => r.sigmaPx));
  const stop = spec.beamStop;
  const stopDir = stop ? [Math.cos((stop.stemAngleDeg * Math.PI) / 180), Math.sin((stop.stemAngleDeg * Math.PI) / 180)] : [0, 0];
  const inStop = (x: number, y: number): boolean => {
    if (!stop) return false;
    const dx = x - stop.xPx, dy = y - stop.yPx;
    if (dx * dx + dy * dy <= stop.radiusPx * stop.radiusPx) return true;
    const along = dx * stopDir[0]! + dy * stopDir[1]!;
    const across = -dx * stopDir[1]! + dy * stopDir[0]!;
    return along >= 0 && Math.abs(across) <= stop.stemWidthPx / 2;
  };
  const data = new Float32Array(width * height);
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const R = correctedRadiusPx(t, i, j);
      let nearRing = false;
      for (const r of rings) if (Math.abs(R - r.radiusPx) < 7 * maxSigma + 2) { nearRing = true; break; }
      const nearStop = stop !== undefined && (inStop(i - 1, j - 1) !== inStop(i + 1, j + 1) || inStop(i - 1, j + 1) !== inStop(i + 1, j - 1) || inStop(i, j) !== inStop(i + 1, j) || inStop(i, j) !== inStop(i, j + 1) || inStop(i, j) !== inStop(i - 1, j) || inStop(i, j) !== inStop(i, j - 1));
      const n = nearRing || nearStop ? ss : 1;
      let sum = 0;
      for (let a = 0; a < n; a++) {
        for (let b = 0; b < n; b++) {
          const x = i + (a + 0.5) / n - 0.5;
          const y = j + (b + 0.5) / n - 0.5;
          if (stop && inStop(x, y)) { sum += stop.levelCounts; continue; }
          const Rs = n === 1 ? R : correctedRadiusPx(t, x, y);
          sum += bg.levelCounts + bg.centralCounts * Math.exp(-Rs / bg.decayPx) + (nearRing ? ringAt(x, y, Rs) : 0);
        }
      }
      data[j * width + i] = sum / (n * n);
    }
  }
  for (const s of spots) {
    const i0 = Math.max(0, Math.floor(s.x - 5)), i1 = Math.min(width - 1, Math.ceil(s.x + 5));
    const j0 = Math.max(0, Math.floor(s.y - 5)), j1 = Math.min(height - 1, Math.ceil(s.y + 5));
    for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) {
      if (inStop(i, j)) continue;
      data[j * width + i] = data[j * width + i]! + s.a * Math.exp(-((i - s.x) ** 2 + (j - s.y) ** 2) / (2 * 1.2 * 1.2));
    }
  }
  if (spec.noise ?? true) for (let p = 0; p < data.length; p++) data[p] = poisson(rand, data[p]!);
  const hotPixelIndices: number[] = [];
  if (spec.hotPixels) {
    for (let k = 0; k < spec.hotPixels.count; k++) {
      const p = Math.floor(rand() * width * height);
      data[p] = data[p]! + spec.hotPixels.valueCounts;
      hotPixelIndices.push(p);
    }
  }
  return { raster: { width, height, data }, hotPixelIndices, spec };
}

/**
 * Poisson deviate of mean lambda: multiplication of uniforms (Knuth, TAOCP vol. 2,
 * 3.4.1) below 30, the transformed rejection PTRS of W. Hormann, Insurance Math.
 * Econom. 12 (1993) 39-45 above (constants from the paper, from memory).
 */
export function poisson(rand: () => number, lambda: number): number {
  if (!(lambda > 0)) return 0;
  if (lambda < 30) {
    const L = Math.exp(-lambda);
    let k = 0, p = 1;
    for (;;) { p *= rand(); if (p <= L) return k; k++; }
  }
  const slam = Math.sqrt(lambda), loglam = Math.log(lambda);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invalpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const U = rand() - 0.5;
    const V = rand();
    const us = 0.5 - Math.abs(U);
    const k = Math.floor(((2 * a) / us + b) * U + lambda + 0.43);
    if (us >= 0.07 && V <= vr) return k;
    if (k < 0 || (us < 0.013 && V > us)) continue;
    if (Math.log(V) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -lambda + k * loglam - logFactorial(k)) return k;
  }
}

function logFactorial(k: number): number {
  if (k < 2) return 0;
  // Stirling series for ln k! (Abramowitz & Stegun 6.1.41), exact to double precision for k >= 10.
  if (k < 10) { let s = 0; for (let i = 2; i <= k; i++) s += Math.log(i); return s; }
  const x = k + 1;
  return (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * x) - 1 / (360 * x ** 3) + 1 / (1260 * x ** 5);
}
