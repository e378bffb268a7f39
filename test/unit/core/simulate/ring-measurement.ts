/**
 * Test helpers: the azimuthal-mean profile of an image in the corrected frame and a
 * least-squares ring position, written here independently of the simulator's own
 * tables, so tests can compare a simulated image with its truth.
 */
import { levenbergMarquardt } from '../../../../core/fitting';
import type { Raster } from '../../../../core/image';
import { correctedRadiusPx, frameTransform, type PatternFrame } from '../../../../core/rings/pattern-frame';

export interface Profile {
  /** Mean corrected radius of the pixel centres in each bin, px. */
  radiusPx: number[];
  /** Mean pixel value in each bin. */
  mean: number[];
}

/**
 * Bins pixel centres by corrected radius into bins of `binPx` from rMinPx to rMaxPx and
 * averages their values (pixels where `keep` is false are left out).
 */
export function azimuthalProfile(raster: Raster, frame: PatternFrame, rMinPx: number, rMaxPx: number, binPx: number, keep?: (x: number, y: number) => boolean): Profile {
  const t = frameTransform(frame);
  const n = Math.ceil((rMaxPx - rMinPx) / binPx);
  const sum = new Float64Array(n);
  const sumR = new Float64Array(n);
  const count = new Float64Array(n);
  for (let y = 0; y < raster.height; y++) {
    for (let x = 0; x < raster.width; x++) {
      const r = correctedRadiusPx(t, x, y);
      if (r < rMinPx || r >= rMaxPx) continue;
      if (keep && !keep(x, y)) continue;
      const b = Math.floor((r - rMinPx) / binPx);
      sum[b] += raster.data[y * raster.width + x]!;
      sumR[b] += r;
      count[b]++;
    }
  }
  const radiusPx: number[] = [];
  const mean: number[] = [];
  for (let b = 0; b < n; b++) {
    if (count[b]! === 0) continue;
    radiusPx.push(sumR[b]! / count[b]!);
    mean.push(sum[b]! / count[b]!);
  }
  return { radiusPx, mean };
}

/** Pseudo-Voigt of unit height (Thompson-Cox-Hastings mixing by area, written out here). */
function pvUnitHeight(x: number, fwhm: number, eta: number): number {
  const z2 = (4 * x * x) / (fwhm * fwhm);
  const lorentz = (2 / (Math.PI * fwhm)) / (1 + z2);
  const gauss = ((2 / fwhm) * Math.sqrt(Math.LN2 / Math.PI)) * Math.exp(-Math.LN2 * z2);
  const peak = (eta * 2) / (Math.PI * fwhm) + (1 - eta) * (2 / fwhm) * Math.sqrt(Math.LN2 / Math.PI);
  return (eta * lorentz + (1 - eta) * gauss) / peak;
}

/**
 * Least-squares centre of the ring near `guessPx` in a profile: height * pV(r - c; w, eta)
 * + a + b (r - guess) over |r - guess| <= windowPx, eta fixed, numerical Jacobian.
 */
export function fitRingCentre(profile: Profile, guessPx: number, fwhmPx: number, eta: number, windowPx: number): { centrePx: number; fwhmPx: number; heightCounts: number } {
  const xs: number[] = [];
  const ys: number[] = [];
  profile.radiusPx.forEach((r, i) => {
    if (Math.abs(r - guessPx) <= windowPx) {
      xs.push(r);
      ys.push(profile.mean[i]!);
    }
  });
  const edge = Math.min(...ys);
  const peak = Math.max(...ys);
  const model = (p: ArrayLike<number>, r: number): number => p[1]! * pvUnitHeight(r - p[0]!, p[2]!, eta) + p[3]! + p[4]! * (r - guessPx);
  const fit = levenbergMarquardt(
    {
      observationCount: xs.length,
      parameterCount: 5,
      evaluate(p, res, jac) {
        for (let i = 0; i < xs.length; i++) res[i] = ys[i]! - model(p, xs[i]!);
        if (!jac) return;
        const q = Float64Array.from(p);
        for (let k = 0; k < 5; k++) {
          const h = 1e-6 * Math.max(1, Math.abs(p[k]!));
          q[k] = p[k]! + h;
          for (let i = 0; i < xs.length; i++) jac[i * 5 + k] = -(model(q, xs[i]!) - model(p, xs[i]!)) / h;
          q[k] = p[k]!;
        }
      },
    },
    [guessPx, peak - edge, fwhmPx, edge, 0],
    { maxIterations: 200 },
  );
  return { centrePx: fit.parameters[0]!, fwhmPx: fit.parameters[2]!, heightCounts: fit.parameters[1]! };
}
