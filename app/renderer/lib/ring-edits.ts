/**
 * Worker-side pieces of direct manipulation, built from core/rings stages only:
 *  - the profile's fit context (the exact radial pass with its standard errors, on the
 *    result's own bins and background) for the fitted-peak and residual curves and for a
 *    ring the user asks for at a radius;
 *  - a coarse profile for the centre drag: the image binned f x f once (f chosen so at
 *    most about half a million binned pixels remain: 3 for 2048 x 2048), then a radial pass
 *    without sub-pixel splitting; the exact pass runs on release.
 */
import type { Raster } from '../../../core/image';
import type { AnalysisResult, AnalyzedRing } from '../../../core/pipeline';
import {
  estimateProfileNoiseModel,
  fitPeaks,
  integrateRadialProfile,
  integrationFrame,
  profileNoiseStdErr,
  profileRadiusShiftPx,
  pseudoVoigt,
  type PatternFrame,
  type PixelMask,
} from '../../../core/rings';

/** measureRings' defaults (core/rings/measure-rings.ts), so the re-fits see the same profile. */
const SUBDIVISION = 3;
const HALF_WINDOW_FWHM = 3;

export interface FitContext {
  radiusPx: Float64Array;
  mean: Float64Array;
  stdErr: Float64Array;
  background: Float64Array;
  binVarianceRatio: Float64Array;
  binWidthPx: number;
}

export function frameOf(result: AnalysisResult): PatternFrame {
  return { centerXPx: result.center.xPx, centerYPx: result.center.yPx, axisRatio: result.distortion.axisRatio, angleDeg: result.distortion.angleDeg };
}

/** The exact radial pass on the result's bins, with the noise model's standard errors; null without a usable profile. */
export function fitContext(raster: Raster, mask: PixelMask, result: AnalysisResult): FitContext | null {
  const p = result.profile;
  if (!Number.isFinite(result.center.xPx) || p.radiusPx.length < 16 || !(p.binWidthPx > 0)) return null;
  const geometry = integrationFrame(raster.width, raster.height, frameOf(result));
  const profile = integrateRadialProfile(raster, mask, geometry, { rMinPx: p.rMinPx, binWidthPx: p.binWidthPx, subdivision: SUBDIVISION });
  const n = Math.min(profile.mean.length, p.background.length);
  if (n < 16) return null;
  const noise = estimateProfileNoiseModel(profile);
  const stdErr = noise ? profileNoiseStdErr(profile, noise) : profile.stdErr;
  const ratio = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const e = profile.effectiveCount?.[k] ?? 0;
    ratio[k] = e > 0 ? profile.area[k]! / e : 1;
  }
  return {
    radiusPx: profile.radiusPx.slice(0, n),
    mean: profile.mean.slice(0, n),
    stdErr: stdErr.slice(0, n),
    background: Float64Array.from(p.background.slice(0, n), (v) => (v === null ? Number.NaN : v)),
    binVarianceRatio: ratio,
    binWidthPx: p.binWidthPx,
  };
}

/** The fitted pseudo-Voigt peaks over the background (refitted on the result's background, from each ring's radius and width) and the residual, per profile bin. */
export function profileCurves(ctx: FitContext, rings: readonly AnalyzedRing[]): { fitted: number[]; residual: number[] } {
  const n = ctx.radiusPx.length;
  const peaks = new Float64Array(n);
  if (rings.length > 0) {
    const starts = rings.map((r) => ({ radiusPx: r.radiusPx, fwhmPx: r.fwhmPx > 0 ? r.fwhmPx : 2, height: heightAt(ctx, r.radiusPx) }));
    const fits = fitPeaks(ctx.radiusPx, ctx.mean, ctx.stdErr, ctx.background, starts, { halfWindowFwhm: HALF_WINDOW_FWHM, binVarianceRatio: ctx.binVarianceRatio });
    for (const f of fits) {
      if (f.status !== 'ok') continue;
      const peak = { area: f.area, centerPx: f.radiusPx, fwhmPx: f.fwhmPx, eta: f.eta };
      const lo = f.radiusPx - 12 * f.fwhmPx;
      const hi = f.radiusPx + 12 * f.fwhmPx;
      for (let k = 0; k < n; k++) {
        const r = ctx.radiusPx[k]!;
        if (r >= lo && r <= hi) peaks[k] = peaks[k]! + pseudoVoigt(peak, r);
      }
    }
  }
  const fitted: number[] = [];
  const residual: number[] = [];
  for (let k = 0; k < n; k++) {
    const bg = ctx.background[k]!;
    fitted.push(bg + peaks[k]!);
    residual.push(ctx.mean[k]! - bg - peaks[k]!);
  }
  return { fitted, residual };
}

function heightAt(ctx: FitContext, r: number): number {
  const k = Math.round((r - ctx.radiusPx[0]!) / ctx.binWidthPx);
  const v = ctx.mean[k]! - ctx.background[k]!;
  return Number.isFinite(v) && v > 0 ? v : 1e-6;
}

/**
 * A ring fitted where the user clicked (a pseudo-Voigt on the profile over its
 * background, as measureRings fits), or why there is none. Its d and hkl come from the
 * reindexing; the quality figures (continuity, spottiness, texture) are not measured.
 */
export function fitRingAt(ctx: FitContext, rPx: number, rings: readonly AnalyzedRing[]): { ok: true; ring: AnalyzedRing } | { ok: false; reason: string } {
  const first = ctx.radiusPx[0]!;
  const last = ctx.radiusPx[ctx.radiusPx.length - 1]!;
  const at = `R = ${rPx.toFixed(1)} px`;
  if (!(rPx > first && rPx < last)) return { ok: false, reason: `${at} is outside the profile (${first.toFixed(0)} to ${last.toFixed(0)} px); click on a peak inside it` };
  const widths = rings.map((r) => r.fwhmPx).filter((w) => w > 0).sort((a, b) => a - b);
  const fwhm = widths.length ? widths[Math.floor(widths.length / 2)]! : 3;
  const near = rings.find((r) => Math.abs(r.radiusPx - rPx) < Math.max(r.fwhmPx, 1));
  if (near) return { ok: false, reason: `a ring is already measured at R = ${near.radiusPx.toFixed(2)} px, within its width of ${at}; drop it first or click on another peak` };
  const [fit] = fitPeaks(ctx.radiusPx, ctx.mean, ctx.stdErr, ctx.background, [{ radiusPx: rPx, fwhmPx: fwhm, height: heightAt(ctx, rPx) }], { halfWindowFwhm: HALF_WINDOW_FWHM, binVarianceRatio: ctx.binVarianceRatio, backgroundTerms: 3 });
  if (!fit || fit.status !== 'ok') return { ok: false, reason: `no peak could be fitted at ${at} (${fit?.reason ?? 'fit failed'}); click on the top of a visible peak` };
  if (Math.abs(fit.radiusPx - rPx) > 2 * Math.max(fit.fwhmPx, fwhm)) {
    return { ok: false, reason: `the fit started at ${at} ran off to ${fit.radiusPx.toFixed(1)} px: there is no peak there; click on the top of a visible peak` };
  }
  const dup = rings.find((r) => Math.abs(r.radiusPx - fit.radiusPx) < Math.max(r.fwhmPx, 1));
  if (dup) return { ok: false, reason: `the peak near ${at} is the ring already measured at R = ${dup.radiusPx.toFixed(2)} px` };
  return {
    ok: true,
    ring: {
      radiusPx: fit.radiusPx + profileRadiusShiftPx(fit.radiusPx, SUBDIVISION, ctx.binWidthPx),
      radiusSigmaPx: fit.radiusSigmaPx,
      radiusBoundPx: null,
      dA: Number.NaN,
      dSigmaA: Number.NaN,
      fwhmPx: fit.fwhmPx,
      intensity: fit.area,
      snr: fit.snr,
      continuity: Number.NaN,
      spottiness: Number.NaN,
      textureAmplitude: Number.NaN,
      hkl: null,
      phase: null,
    },
  };
}

/** Binned pixels the coarse drag profile works on, at most (about 25 ms a pass in Chromium). */
const COARSE_PIXELS = 500_000;

export interface BinnedImage {
  raster: Raster;
  mask: PixelMask;
  factor: number;
}

/** The image and mask binned f x f (mean of the unmasked pixels; a binned pixel is excluded when all are), f from COARSE_PIXELS. */
export function binForDrag(raster: Raster, mask: PixelMask): BinnedImage {
  const f = Math.max(1, Math.ceil(Math.sqrt((raster.width * raster.height) / COARSE_PIXELS)));
  const w = Math.floor(raster.width / f);
  const h = Math.floor(raster.height / f);
  const data = new Float32Array(w * h);
  const excluded = new Uint8Array(w * h);
  const src = raster.data;
  const m = mask.excluded;
  const W = raster.width;
  for (let J = 0; J < h; J++) {
    for (let I = 0; I < w; I++) {
      let s = 0;
      let c = 0;
      for (let dy = 0; dy < f; dy++) {
        const row = (J * f + dy) * W + I * f;
        for (let dx = 0; dx < f; dx++) {
          if (!m[row + dx]) {
            s += src[row + dx]!;
            c++;
          }
        }
      }
      const k = J * w + I;
      if (c > 0) data[k] = s / c;
      else excluded[k] = 1;
    }
  }
  return { raster: { width: w, height: h, data }, mask: { width: w, height: h, excluded }, factor: f };
}

/**
 * The coarse profile for a centre at (x, y) in full-image pixels, on the binned image:
 * whole binned pixels (no splitting), bins of the full profile's width in full pixels
 * (at least half a binned pixel).
 */
export function coarseProfile(binned: BinnedImage, frame: PatternFrame, binWidthPx: number, rMinPx: number): { radiusPx: number[]; mean: number[] } {
  const f = binned.factor;
  // Binned pixel I covers full pixels fI to fI + f - 1: its centre is at x = fI + (f - 1) / 2.
  const c = (v: number): number => (v - (f - 1) / 2) / f;
  const geometry = integrationFrame(binned.raster.width, binned.raster.height, { ...frame, centerXPx: c(frame.centerXPx), centerYPx: c(frame.centerYPx) });
  const p = integrateRadialProfile(binned.raster, binned.mask, geometry, { rMinPx: rMinPx / f, binWidthPx: Math.max(binWidthPx / f, 0.5), subdivision: 1 });
  return { radiusPx: Array.from(p.radiusPx, (r) => f * r), mean: Array.from(p.mean) };
}
