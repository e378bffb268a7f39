/**
 * Test images with known rings: each ring a pseudo-Voigt in corrected radius
 * (written out here, not taken from core/), on a background that is a function
 * of corrected radius, optionally modulated in azimuth, averaged over an S x S
 * grid of points in each pixel (the pixel integral), then optionally given
 * seeded Poisson noise.
 */
import { correctedAzimuthRad, correctedRadiusPx, frameTransform, type PatternFrame } from '../../../../core/rings/pattern-frame';
import type { Raster } from '../../../../core/image/raster';

export interface AnalyticRing {
  radiusPx: number;
  fwhmPx: number;
  /** Lorentzian fraction of the area. */
  eta: number;
  /** Area of the radial profile, counts per pixel x px. */
  area: number;
  /** Optional azimuthal factor (mean 1 for the profile's area to hold). */
  azimuthFactor?: (azimuthRad: number) => number;
}

export interface AnalyticImageSpec {
  width: number;
  height: number;
  frame: PatternFrame;
  rings: AnalyticRing[];
  /** Background counts per pixel at corrected radius R. */
  background: (radiusPx: number) => number;
  /** Points per pixel side for the pixel integral (default 6). */
  supersample?: number;
}

/** Unit-area pseudo-Voigt at offset x (the Thompson-Cox-Hastings form). */
export function unitPseudoVoigt(x: number, fwhm: number, eta: number): number {
  const z2 = (4 * x * x) / (fwhm * fwhm);
  return (eta * 2) / (Math.PI * fwhm * (1 + z2)) + ((1 - eta) * 2 * Math.sqrt(Math.LN2 / Math.PI) * Math.exp(-Math.LN2 * z2)) / fwhm;
}

/** Expected counts per pixel (no noise). */
export function renderAnalyticImage(spec: AnalyticImageSpec): Raster {
  const s = spec.supersample ?? 6;
  const t = frameTransform(spec.frame);
  const data = new Float32Array(spec.width * spec.height);
  const anyAzimuth = spec.rings.some((r) => r.azimuthFactor);
  for (let j = 0; j < spec.height; j++) {
    for (let i = 0; i < spec.width; i++) {
      let acc = 0;
      for (let b = 0; b < s; b++) {
        const y = j + (b + 0.5) / s - 0.5;
        for (let a = 0; a < s; a++) {
          const x = i + (a + 0.5) / s - 0.5;
          const r = correctedRadiusPx(t, x, y);
          const phi = anyAzimuth ? correctedAzimuthRad(t, x, y) : 0;
          let v = spec.background(r);
          for (const ring of spec.rings) {
            const dr = r - ring.radiusPx;
            if (Math.abs(dr) > 40 * ring.fwhmPx) continue;
            const f = ring.azimuthFactor ? ring.azimuthFactor(phi) : 1;
            v += ring.area * f * unitPseudoVoigt(dr, ring.fwhmPx, ring.eta);
          }
          acc += v;
        }
      }
      data[j * spec.width + i] = acc / (s * s);
    }
  }
  return { width: spec.width, height: spec.height, data };
}

const LOG_FACTORIAL = (() => {
  const t = new Float64Array(256);
  for (let k = 1; k < 256; k++) t[k] = t[k - 1]! + Math.log(k);
  return t;
})();

function logFactorial(k: number): number {
  if (k < 256) return LOG_FACTORIAL[k]!;
  // Stirling series (Abramowitz and Stegun 6.1.41; from memory).
  const x = k + 1;
  return (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * x) - 1 / (360 * x ** 3) + 1 / (1260 * x ** 5);
}

/**
 * Poisson deviate of mean lambda: multiplication of uniforms (Knuth, TAOCP
 * vol. 2, 3.4.1) below 30, else the transformed rejection PTRS of W. Hormann,
 * Insurance: Mathematics and Economics 12 (1993) 39 (constants from memory).
 */
export function poissonDeviate(lambda: number, rand: () => number): number {
  if (!(lambda > 0)) return 0;
  if (lambda < 30) {
    const limit = Math.exp(-lambda);
    let k = 0;
    let p = rand();
    while (p > limit) {
      k++;
      p *= rand();
    }
    return k;
  }
  const slam = Math.sqrt(lambda);
  const loglam = Math.log(lambda);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invalpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const u = rand() - 0.5;
    const v = rand();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + lambda + 0.43);
    if (us >= 0.07 && v <= vr) return k;
    if (k < 0 || (us < 0.013 && v > us)) continue;
    if (Math.log(v) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -lambda + k * loglam - logFactorial(k)) return k;
  }
}

/** A copy of `raster` with each pixel replaced by a Poisson deviate of its value. */
export function withPoissonNoise(raster: Raster, rand: () => number): Raster {
  const data = new Float32Array(raster.data.length);
  for (let p = 0; p < data.length; p++) data[p] = poissonDeviate(raster.data[p]!, rand);
  return { width: raster.width, height: raster.height, data };
}
