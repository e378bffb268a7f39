/**
 * From an image, a pattern frame and a mask to measured rings:
 *
 *  1. radial profile in the corrected frame (azimuthal-integration.ts);
 *  2. pixel noise model (profile-noise-model.ts): known counts per value, or
 *     estimated from the profile's scatter; its standard errors weight
 *     detection and fits (texture and grain sampling inflate the scatter of a
 *     ring's bins but not its counting noise);
 *  3. background by SNIP with LLS and the fourth-order filter (background-snip.ts).
 *     The clipping window is tied to the ring width: a first pass with a wide
 *     window (firstPassWindowPx, default 24 px, doubled while the median width
 *     found exceeds half of what the window can find) finds and fits the clear
 *     peaks, their median FWHM F sets the window m = snipWindowFwhm x F
 *     (default 4 F, at most the first pass's) of the second pass, so sharp
 *     rings are clipped and broad halos stay in the background. A peak fitted
 *     broader than half the window it was found with is taken as background
 *     (what is left of a halo), not as a ring;
 *  4. detection by significance (peak-detection.ts, default 5 sigma), except
 *     within 2 ring FWHMs of the ends of the profile's data;
 *  5. pseudo-Voigt fits on a local parabola over the SNIP background,
 *     overlapping peaks together (peak-fit.ts), then backgroundRounds (default
 *     2) rounds of a new background with the fitted rings taken out
 *     (peak-stripped-background.ts) and fits on it, which keeps Lorentzian tails
 *     and close neighbours out of the background; each fitted radius is
 *     corrected for the inward displacement of the profile's sampling
 *     (profile-radius-shift.ts). The parabola, not the line the fits also
 *     offer, takes up the curvature a halo leaves under a ring (on 36
 *     simulated patterns with halos and rings up to eta = 0.8, parabola and
 *     two rounds gave a 95th-percentile radius error of 0.044 px against
 *     0.097 px for the line without rounds);
 *  6. quality from the azimuthal texture in a band R +- bandHalfWidthFwhm x FWHM
 *     (default 1) around each ring (azimuthal-texture.ts, ring-quality.ts), with
 *     the profile and background averaged over each cell's pixels as the
 *     cell's expectation;
 *  7. the photon-counting bound for each ring when the counts scale is known or
 *     estimated (radius-precision-bound.ts).
 *
 * Every step is exported on its own. A profile without a significant peak
 * gives no rings and a reason, never a made-up ring.
 */

import type { Raster } from '../image/raster';
import { integrateRadialProfile } from './azimuthal-integration';
import { integrateAzimuthalTexture, type AzimuthalTexture } from './azimuthal-texture';
import { snipBackground } from './background-snip';
import { integrationFrame, validateIntegrationInputs, type AzimuthSector, type IntegrationFrame } from './integration-geometry';
import type { RingMeasurement } from './measured-ring-profile';
import type { PatternFrame } from './pattern-frame';
import { detectPeaks } from './peak-detection';
import { fitPeaks, type PeakFitResult } from './peak-fit';
import type { PixelMask } from './pixel-mask';
import { countingNoiseModel, estimateProfileNoiseModel, profileNoiseStdErr, type ProfileNoiseModel } from './profile-noise-model';
import type { RadialProfile } from './radial-profile';
import { peakStrippedBackground } from './peak-stripped-background';
import { profileRadiusShiftPx } from './profile-radius-shift';
import { radiusPrecisionBoundPx } from './radius-precision-bound';
import { ringQuality } from './ring-quality';
import type { RowBandRunner } from './row-bands';
import { medianOf } from './sample-median';

export interface MeasureRingsOptions {
  /** Inner limit of the profile, px (default 4: the centre's few pixels say nothing about rings). */
  rMinPx?: number;
  /** Outer limit, px (default: the farthest pixel). */
  rMaxPx?: number;
  /** Profile bin width, px (default 0.5). */
  binWidthPx?: number;
  /** Sub-pixels per pixel side (default 3). */
  subdivision?: number;
  /** Restrict the profile to an azimuthal sector (default: all azimuths). */
  sector?: AzimuthSector;
  /** The integration frame of this image size and frame, to reuse (integrationFrame or prepareIntegrationGeometry; default: made here). */
  geometry?: IntegrationFrame;
  /** Runs the pixel passes (profile, texture) on bands of rows, e.g. on a worker pool (default: this thread). */
  rowBands?: RowBandRunner;
  /** Counts per unit of pixel value, when known (default: estimated from the profile). */
  countsPerValue?: number;
  /** Read noise of a pixel in value units, with countsPerValue (default 0). */
  readNoiseValue?: number;
  /** Expected ring FWHM, px; skips the first pass (default: measured). */
  ringFwhmPx?: number;
  /** Detection threshold, standard deviations (default 5). */
  thresholdSigma?: number;
  /** SNIP half-window of the first pass, px (default 24; doubled while the rings found are broad for it). */
  firstPassWindowPx?: number;
  /** SNIP half-window of the second pass in ring FWHMs (default 4, with the fourth-order filter). */
  snipWindowFwhm?: number;
  /** Fit window half-width in FWHMs (default 3). */
  halfWindowFwhm?: number;
  /**
   * Background under the final fits: the SNIP background plus a local parabola
   * ('snip+parabola', default) or line ('snip+line'), or a local polynomial alone on the
   * profile itself ('parabola', 'line').
   */
  peakBackground?: 'snip+line' | 'snip+parabola' | 'line' | 'parabola';
  /** Rounds of fitting again on the background with the fitted rings taken out (0 to 10; default 2). */
  backgroundRounds?: number;
  /** Azimuth cells for the quality figures (default 90). */
  azimuthBinCount?: number;
  /** Half-width of the texture band in FWHMs (default 1). */
  bandHalfWidthFwhm?: number;
  /** Significance for continuity (default 3). */
  continuitySigma?: number;
}

/** A detection whose fit failed, with the reason. */
export interface RejectedPeak {
  radiusPx: number;
  significance: number;
  reason: string;
}

export interface RingMeasurementResult {
  profile: RadialProfile;
  /** Background per profile bin: SNIP, with the fitted rings taken out after the refinement rounds. */
  background: Float64Array;
  /** Standard errors used for detection and fits (from the noise model, or the profile's own). */
  fitStdErr: Float64Array;
  /** The pixel noise model used; null when none could be estimated. */
  noise: ProfileNoiseModel | null;
  /** The SNIP half-window of the final background, px. */
  backgroundWindowPx: number;
  rings: RingMeasurement[];
  rejected: RejectedPeak[];
  /** Texture cells of the rings (band i belongs to rings[i]); null without rings. */
  texture: AzimuthalTexture | null;
  warnings: string[];
  /** Why there are no rings, or null when there are. */
  reason: string | null;
}

/**
 * Measures the rings of `raster` in `frame`, honouring `mask`.
 * @example
 *   const result = measureRings(raster, mask, frame, { rMinPx: beamStopRadiusPx + 4 });
 *   if (result.rings.length === 0) console.log(result.reason);
 *   for (const ring of result.rings) console.log(ring.radiusPx, ring.radiusSigmaPx, ring.radiusBoundPx);
 * @throws RangeError for sizes that do not match or options out of range (never for data without rings)
 */
export function measureRings(raster: Raster, mask: PixelMask | null, frame: PatternFrame, options: MeasureRingsOptions = {}): RingMeasurementResult {
  const geometry = options.geometry ?? integrationFrame(raster.width, raster.height, frame);
  if (options.geometry) {
    const f = options.geometry.frame;
    if (f.centerXPx !== frame.centerXPx || f.centerYPx !== frame.centerYPx || f.axisRatio !== frame.axisRatio || f.angleDeg !== frame.angleDeg) {
      throw new RangeError('options.geometry was prepared for another frame; prepare it for this frame or leave it out');
    }
  }
  validateIntegrationInputs(raster, mask, geometry);
  const w = options.binWidthPx ?? 0.5;
  const subdivision = options.subdivision ?? 3;
  const threshold = options.thresholdSigma ?? 5;
  const firstWindowPx = options.firstPassWindowPx ?? 24;
  const snipFwhm = options.snipWindowFwhm ?? 4;
  const halfWindowFwhm = options.halfWindowFwhm ?? 3;
  const bandFwhm = options.bandHalfWidthFwhm ?? 1;
  const refineRounds = options.backgroundRounds ?? 2;
  if (!Number.isInteger(refineRounds) || refineRounds < 0 || refineRounds > 10) throw new RangeError(`backgroundRounds must be an integer from 0 to 10; got ${refineRounds}`);
  positive('firstPassWindowPx', firstWindowPx);
  positive('snipWindowFwhm', snipFwhm);
  positive('bandHalfWidthFwhm', bandFwhm);
  if (options.ringFwhmPx !== undefined) positive('ringFwhmPx', options.ringFwhmPx);
  if (options.readNoiseValue !== undefined && options.countsPerValue === undefined) {
    throw new RangeError('readNoiseValue needs countsPerValue (the read noise is part of a known detector model); give both or neither');
  }
  const warnings: string[] = [];

  const profile = integrateRadialProfile(raster, mask, geometry, {
    rMinPx: options.rMinPx ?? Math.min(4, Math.max(0, geometry.maxRadiusPx - 1)),
    rMaxPx: options.rMaxPx,
    binWidthPx: w,
    subdivision,
    sector: options.sector,
  }, options.rowBands);
  const n = profile.mean.length;
  const binVarianceRatio = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const e = profile.effectiveCount![k]!;
    binVarianceRatio[k] = e > 0 ? profile.area[k]! / e : 1;
  }
  const emptyResult = (reason: string, background: Float64Array, fitStdErr: Float64Array, noise: ProfileNoiseModel | null, windowPx: number, rejected: RejectedPeak[] = []): RingMeasurementResult => ({
    profile,
    background,
    fitStdErr,
    noise,
    backgroundWindowPx: windowPx,
    rings: [],
    rejected,
    texture: null,
    warnings,
    reason,
  });
  let finite = 0;
  for (let k = 0; k < n; k++) if (Number.isFinite(profile.mean[k]!)) finite++;
  if (finite < 16) {
    return emptyResult(`the profile has only ${finite} bins with unmasked pixels; widen the radial range or check the mask`, new Float64Array(n).fill(Number.NaN), profile.stdErr, null, 0);
  }

  // 2. Noise model.
  const given = options.countsPerValue !== undefined ? countingNoiseModel(options.countsPerValue, options.readNoiseValue ?? 0) : null;
  const noise = given ?? estimateProfileNoiseModel(profile);
  if (noise === null) warnings.push('could not estimate the pixel noise from the profile; the fits are weighted by the scatter of each bin');
  const fitStdErr = noise ? profileNoiseStdErr(profile, noise) : profile.stdErr;

  // 3. Background, first pass, to find the ring width: a window of firstPassWindowPx, doubled
  // while the rings found fill more than half of the widths it can find (broad rings), up to an
  // eighth of the profile.
  let firstWindowBins = Math.max(1, Math.round(firstWindowPx / w));
  let fwhm = options.ringFwhmPx ?? Number.NaN;
  while (!(fwhm > 0)) {
    const bg1 = snipBackground(profile.mean, { windowBins: firstWindowBins, filterOrder: 4 });
    const net1 = subtract(profile.mean, bg1);
    blankEnds(net1, Math.ceil(firstWindowBins / 2));
    const maxFwhm1 = (firstWindowBins * w) / 2;
    const det1 = detectPeaks(profile.radiusPx, w, net1, fitStdErr, { thresholdSigma: threshold, maxFwhmPx: maxFwhm1 });
    const fits1 = fitPeaks(profile.radiusPx, profile.mean, fitStdErr, bg1, det1, { halfWindowFwhm, binVarianceRatio });
    const widths = fits1.filter((f) => f.status === 'ok' && f.fwhmPx <= maxFwhm1).map((f) => f.fwhmPx);
    if (widths.length > 0 && medianOf(widths) > 0.5 * maxFwhm1 && 2 * firstWindowBins <= n / 8) {
      firstWindowBins *= 2;
      continue;
    }
    if (widths.length === 0) {
      const reason = det1.length === 0
        ? `no peak stands ${threshold} standard deviations above the background`
        : `no peak narrower than ${maxFwhm1.toFixed(1)} px FWHM (half the background window) could be fitted; broader features are taken as background (halos)`;
      return emptyResult(reason, bg1, fitStdErr, noise, firstWindowBins * w);
    }
    fwhm = medianOf(widths);
  }
  const windowBins = Math.max(3, Math.min(firstWindowBins, Math.round((snipFwhm * fwhm) / w)));
  let background = snipBackground(profile.mean, { windowBins, filterOrder: 4 });
  const net = subtract(profile.mean, background);
  // The background is least sure next to the ends of the data (the beam stop's edge, the image's):
  // no detection within m/2 bins (2 ring FWHMs) of them.
  blankEnds(net, Math.ceil(windowBins / 2));

  // 4. Detection.
  const maxFwhm = Math.max((windowBins * w) / 2, 2 * w);
  const detections = detectPeaks(profile.radiusPx, w, net, fitStdErr, { thresholdSigma: threshold, maxFwhmPx: maxFwhm });
  if (detections.length === 0) {
    return emptyResult(`no peak stands ${threshold} standard deviations above the background`, background, fitStdErr, noise, windowBins * w);
  }

  // 5. Fits.
  const peakBackground = options.peakBackground ?? 'snip+parabola';
  const withSnip = peakBackground.startsWith('snip');
  const fitOptions = { halfWindowFwhm, binVarianceRatio, backgroundTerms: peakBackground.endsWith('parabola') ? (3 as const) : (2 as const) };
  let fits = fitPeaks(profile.radiusPx, profile.mean, fitStdErr, withSnip ? background : null, detections, fitOptions);
  // Refine the background with the fitted rings taken out, and fit again.
  for (let round = 0; round < (withSnip ? refineRounds : 0); round++) {
    const peaks = fits.filter((f) => f.status === 'ok' && f.fwhmPx <= maxFwhm).map((f) => ({ area: f.area, centerPx: f.radiusPx, fwhmPx: f.fwhmPx, eta: f.eta }));
    if (peaks.length === 0) break;
    background = peakStrippedBackground(profile.radiusPx, profile.mean, peaks, { windowBins, filterOrder: 4 });
    const starts = fits.map((f, i) => (f.status === 'ok' ? { radiusPx: f.radiusPx, fwhmPx: f.fwhmPx, height: f.height } : detections[i]!));
    fits = fitPeaks(profile.radiusPx, profile.mean, fitStdErr, background, starts, fitOptions);
  }
  const rejected: RejectedPeak[] = [];
  const good: PeakFitResult[] = [];
  fits.forEach((fit, i) => {
    const d = detections[i]!;
    if (fit.status === 'ok' && fit.fwhmPx <= maxFwhm) good.push(fit);
    else if (fit.status === 'ok') {
      const reason = `fitted FWHM ${fit.fwhmPx.toFixed(1)} px is broader than half the background window (${maxFwhm.toFixed(1)} px): taken as background`;
      rejected.push({ radiusPx: fit.radiusPx, significance: d.significance, reason });
    } else rejected.push({ radiusPx: d.radiusPx, significance: d.significance, reason: fit.reason ?? 'fit failed' });
  });
  if (good.length === 0) {
    return emptyResult(`${detections.length} peak(s) were detected but none could be fitted (${rejected[0]!.reason})`, background, fitStdErr, noise, windowBins * w, rejected);
  }
  if (rejected.length > 0) warnings.push(`${rejected.length} detected peak(s) could not be fitted; see rejected`);

  // 6. Quality from the texture of each ring's band.
  const bands = good.map((fit) => {
    const h = Math.max(bandFwhm * fit.fwhmPx, w, 1);
    return { innerRadiusPx: Math.max(0, fit.radiusPx - h), outerRadiusPx: fit.radiusPx + h };
  });
  const reference = (values: ArrayLike<number>) => ({ rMinPx: profile.rMinPx, binWidthPx: w, values });
  const texture = integrateAzimuthalTexture(raster, mask, geometry, {
    bands,
    azimuthBinCount: options.azimuthBinCount,
    subdivision,
    references: [reference(profile.mean), reference(background)],
  }, options.rowBands);
  const mCells = texture.azimuthBinCount;
  const rings: RingMeasurement[] = good.map((fit, i) => {
    const band = bands[i]!;
    const bandBackground = areaWeightedMean(profile, background, band.innerRadiusPx, band.outerRadiusPx);
    const cellRange = (a: Float64Array) => a.subarray(i * mCells, (i + 1) * mCells);
    const expectedTotal = cellRange(texture.referenceMeans[0]!);
    const cellBackground = cellRange(texture.referenceMeans[1]!);
    const cells = {
      azimuthRad: texture.azimuthRad,
      mean: cellRange(texture.mean),
      area: cellRange(texture.area),
      fullCellAreaPx: texture.fullCellAreaPx[i]!,
      background: cellBackground,
      expectedNet: expectedTotal.map((v, c) => v - cellBackground[c]!),
    };
    const quality = noise ? ringQuality(cells, noise, { continuitySigma: options.continuitySigma }) : null;
    const visible = profileVisibleFraction(profile, fit.radiusPx - fit.fwhmPx, fit.radiusPx + fit.fwhmPx);
    const ring: RingMeasurement = {
      radiusPx: fit.radiusPx + profileRadiusShiftPx(fit.radiusPx, subdivision, w),
      radiusSigmaPx: fit.radiusSigmaPx,
      fwhmPx: fit.fwhmPx,
      intensity: fit.area,
      snr: fit.snr,
      continuity: quality ? quality.continuity : Number.NaN,
      spottiness: quality ? quality.spottiness : Number.NaN,
      textureAmplitude: quality ? quality.textureAmplitude : Number.NaN,
      eta: fit.eta,
      radiusSigmaAbsolutePx: fit.radiusSigmaAbsolutePx,
      reducedChiSquare: fit.reducedChiSquare,
      textureAngleDeg: quality ? quality.textureAngleDeg : Number.NaN,
      visibleFraction: visible,
      radiusBoundPx: countingBound(fit, noise, bandBackground, visible, halfWindowFwhm, subdivision, w),
    };
    const notes = [fit.reason, quality ? quality.reason : 'no noise model for the quality figures'].filter((x): x is string => !!x);
    if (notes.length > 0) ring.note = notes.join('; ');
    return ring;
  });
  return { profile, background, fitStdErr, noise, backgroundWindowPx: windowBins * w, rings, rejected, texture, warnings, reason: null };
}

/** Sets the first and last `bins` finite entries of `values` to NaN. */
function blankEnds(values: Float64Array, bins: number): void {
  let first = 0;
  while (first < values.length && !Number.isFinite(values[first]!)) first++;
  let last = values.length - 1;
  while (last >= 0 && !Number.isFinite(values[last]!)) last--;
  for (let k = 0; k < bins; k++) {
    if (first + k < values.length) values[first + k] = Number.NaN;
    if (last - k >= 0) values[last - k] = Number.NaN;
  }
}

function positive(name: string, v: number): void {
  if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`${name} must be positive and finite; got ${v}`);
}

function subtract(a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  const out = new Float64Array(a.length);
  for (let k = 0; k < out.length; k++) out[k] = a[k]! - b[k]!;
  return out;
}

/** Background averaged over the profile bins in [lo, hi], weighted by their unmasked area. */
function areaWeightedMean(profile: RadialProfile, background: Float64Array, lo: number, hi: number): number {
  let s = 0;
  let a = 0;
  for (let k = 0; k < background.length; k++) {
    const r = profile.radiusPx[k]!;
    if (r < lo || r > hi || !Number.isFinite(background[k]!)) continue;
    s += background[k]! * profile.area[k]!;
    a += profile.area[k]!;
  }
  return a > 0 ? s / a : Number.NaN;
}

/** Unmasked, in-image share of the annulus [lo, hi]: sum of bin areas over sum of 2 pi r w. */
function profileVisibleFraction(profile: RadialProfile, lo: number, hi: number): number {
  let a = 0;
  let full = 0;
  for (let k = 0; k < profile.area.length; k++) {
    const r = profile.radiusPx[k]!;
    if (r < lo || r > hi) continue;
    a += profile.area[k]!;
    full += 2 * Math.PI * r * profile.binWidthPx;
  }
  return full > 0 ? Math.min(1, a / full) : 0;
}

/**
 * Cramer-Rao bound for a fitted ring from the noise model: counts per value
 * c = 1/a, and the variance offset b as read noise when positive (as a camera
 * pedestal, lowering the background counts, when negative); the ring's width
 * with the sampling kernels taken out. NaN without a counting slope.
 */
function countingBound(
  fit: PeakFitResult,
  noise: ProfileNoiseModel | null,
  backgroundValue: number,
  visible: number,
  halfWindowFwhm: number,
  subdivision: number,
  binWidthPx: number,
): number {
  if (!noise || !(noise.varianceSlope > 0) || !(visible > 0) || !Number.isFinite(backgroundValue)) return Number.NaN;
  // The fitted FWHM includes the sampling kernels (pixel 1/12, split (1 - 1/s^2)/12, bin w^2/12
  // in variance); the ring's own width, as for Gaussians, is sqrt(F^2 - 8 ln 2 V).
  const kernelVariance = (1 + (1 - 1 / (subdivision * subdivision)) + binWidthPx * binWidthPx) / 12;
  const fwhm = Math.sqrt(Math.max(fit.fwhmPx ** 2 - 8 * Math.LN2 * kernelVariance, 0.25 * fit.fwhmPx ** 2));
  const c = 1 / noise.varianceSlope;
  const b = noise.varianceOffset;
  const ringCounts = fit.area * 2 * Math.PI * fit.radiusPx * visible * c;
  if (!(ringCounts > 0)) return Number.NaN;
  return radiusPrecisionBoundPx(
    {
      radiusPx: fit.radiusPx,
      fwhmPx: fwhm,
      eta: Math.min(1, Math.max(0, fit.eta)),
      ringCounts,
      backgroundCountsPerPx: Math.max(0, c * backgroundValue + (b < 0 ? c * c * b : 0)),
      visibleFraction: visible,
      readNoiseVarianceCounts2: b > 0 ? c * c * b : 0,
    },
    { halfWindowFwhm },
  );
}
