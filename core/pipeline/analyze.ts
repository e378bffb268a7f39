/**
 * One pattern, end to end:
 *   masks (saturated, hot pixels, beam stop, user polygons)
 *   -> geometry: centre and elliptical distortion (refineFrame: first estimate,
 *      ring points, concentric ellipse fit)
 *   -> radial profile in the corrected frame, background, pseudo-Voigt peak fits
 *      and ring quality (measureRings)
 *   -> d-spacings by the exact flat-detector geometry with uncertainties
 *   -> cubic lattices and phases (indexRings).
 *
 * Every stage is callable alone (buildPatternMask, refineFrame, measureRings,
 * ringDSpacings, indexRings); `analyzeInFrame` re-runs the stages after the
 * geometry, for a surface where the user moves the centre.
 *
 * An image with no rings gives status 'no-rings' with its profile and a
 * reason among the warnings, never a made-up answer.
 */
import { judgeIndexing } from '../indexing/indexing-conclusion';
import type { OpenCv } from '../image/opencv-handle';
import type { Raster } from '../image/raster';
import { electronWavelengthA } from '../physics';
import type { FrameSigma } from '../rings/concentric-ellipse-fit';
import { measureRings } from '../rings/measure-rings';
import type { PatternFrame } from '../rings/pattern-frame';
import type { PixelMask } from '../rings/pixel-mask';
import { refineFrame, type RefinedRing } from '../rings/refine-frame';
import type { RowBandRunner } from '../rings/row-bands';
import type { AnalysisResult, AnalyzedRing } from './analysis-result';
import type { AnalysisProgress, AnalysisSettings } from './analysis-settings';
import { buildPatternMask, type PatternMaskSummary } from './pattern-mask';
import { indexRingRadii, NOMINAL_CAMERA_WARNING } from './index-ring-radii';

/** Wall clock in ms: the platform's high-resolution clock where there is one (Node, browsers, workers), else Date. */
const clock = (globalThis as { performance?: { now(): number } }).performance;
const now = (): number => (clock ? clock.now() : Date.now());

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function checkSettings(settings: AnalysisSettings): void {
  const c = settings.camera;
  if (!(c.voltageV > 0)) throw new RangeError(`camera.voltageV must be a positive voltage in V; got ${c.voltageV}`);
  if (!(c.cameraLengthPx > 0)) throw new RangeError(`camera.cameraLengthPx must be positive (camera length over pixel pitch); got ${c.cameraLengthPx}`);
  if (!(c.cameraLengthSigmaPx >= 0)) throw new RangeError(`camera.cameraLengthSigmaPx must be >= 0; got ${c.cameraLengthSigmaPx}`);
}

/**
 * How the pipeline may run its pixel passes: not a setting (it changes no result,
 * only the time) and never part of the result.
 */
export interface AnalysisRuntime {
  /** Runs the pixel passes on bands of rows, e.g. a surface's worker pool (default: this thread). */
  rowBands?: RowBandRunner;
}

/** What the geometry stage hands to the later stages. */
export interface PatternGeometry {
  frame: PatternFrame;
  sigma: FrameSigma;
  rings: RefinedRing[];
  warnings: string[];
}

/**
 * Analyses `raster` with the camera and phases of `settings`.
 * @param cv the OpenCV handle loaded by the surface (Node or Web Worker build)
 * @param onProgress called at the start and end of each stage with a fraction in [0, 1]
 * @param runtime threads for the pixel passes (default: none, all on this thread)
 * @throws RangeError for malformed settings (never for data without rings)
 */
export function analyze(raster: Raster, settings: AnalysisSettings, onProgress: AnalysisProgress = () => {}, cv: OpenCv, runtime: AnalysisRuntime = {}): AnalysisResult {
  checkSettings(settings);
  const timingsMs: Record<string, number> = {};
  let t = now();
  onProgress('masks', 0);
  const masks = buildPatternMask(raster, cv, {
    image: settings.image,
    ...(settings.saturationLevel !== undefined ? { saturationLevel: settings.saturationLevel } : {}),
    ...(settings.detectBeamStop !== undefined ? { detectBeamStop: settings.detectBeamStop } : {}),
    ...(settings.maskPolygons ? { polygons: settings.maskPolygons } : {}),
    ...(runtime.rowBands ? { rowBands: runtime.rowBands } : {}),
  });
  onProgress('masks', 1);
  timingsMs.masks = now() - t;

  t = now();
  onProgress('geometry', 0);
  const refined = refineFrame(raster, masks.mask, {
    ...(settings.startFrame ? { start: settings.startFrame } : {}),
    fitDistortion: settings.fitDistortion ?? true,
    ...(runtime.rowBands ? { rowBands: runtime.rowBands } : {}),
  }, cv);
  onProgress('geometry', 1);
  timingsMs.geometry = now() - t;

  if (!refined.ok) {
    // No centre or no rings at all: report the profile around the best guess we have, if any.
    const frame = refined.frame;
    const warnings = [...refined.warnings, `no pattern geometry: ${refined.reason}`];
    if (frame) {
      const inFrame = analyzeInFrame(raster, masks.mask, { frame, sigma: { centerXPx: Number.NaN, centerYPx: Number.NaN, axisRatio: Number.NaN, angleDeg: Number.NaN }, rings: [], warnings }, settings, masks.summary, onProgress, runtime);
      return { ...inFrame, status: inFrame.rings.length === 0 ? 'no-rings' : 'no-geometry', timingsMs: { ...timingsMs, ...inFrame.timingsMs } };
    }
    return emptyResult(raster, settings, masks.summary, warnings, timingsMs);
  }
  const result = analyzeInFrame(raster, masks.mask, { frame: refined.frame, sigma: refined.sigma, rings: refined.rings, warnings: refined.warnings }, settings, masks.summary, onProgress, runtime);
  return { ...result, timingsMs: { ...timingsMs, ...result.timingsMs } };
}

function emptyResult(raster: Raster, settings: AnalysisSettings, masks: PatternMaskSummary, warnings: string[], timingsMs: Record<string, number>): AnalysisResult {
  const c = settings.camera;
  return {
    image: { width: raster.width, height: raster.height, bitsPerSample: settings.image.bitsPerSample },
    voltageV: c.voltageV,
    wavelengthA: electronWavelengthA(c.voltageV),
    camera: { cameraLengthPx: c.cameraLengthPx, cameraLengthSigmaPx: c.cameraLengthSigmaPx, source: c.source, calibrated: c.calibrated },
    center: { xPx: Number.NaN, yPx: Number.NaN, sigmaPx: Number.NaN, sigmaXPx: Number.NaN, sigmaYPx: Number.NaN },
    distortion: { axisRatio: 1, axisRatioSigma: Number.NaN, angleDeg: 0, angleSigmaDeg: null, perRing: [] },
    masks,
    rings: [],
    profile: { rMinPx: 0, binWidthPx: 0, radiusPx: [], mean: [], background: [] },
    candidates: [],
    ambiguities: [],
    secondPhase: [],
    conclusion: judgeIndexing([], null),
    status: 'no-geometry',
    warnings,
    notes: [],
    timingsMs,
  };
}

/**
 * The stages after the geometry: profile, peaks, d-spacings and indexing in a
 * given frame (for instance one the user placed by hand).
 */
export function analyzeInFrame(
  raster: Raster,
  mask: PixelMask,
  geometry: PatternGeometry,
  settings: AnalysisSettings,
  maskSummary: PatternMaskSummary,
  onProgress: AnalysisProgress = () => {},
  runtime: AnalysisRuntime = {},
): AnalysisResult {
  checkSettings(settings);
  const timingsMs: Record<string, number> = {};
  const camera = settings.camera;
  const warnings = [...geometry.warnings];
  if (maskSummary.saturatedPixels > 0) warnings.push(`${maskSummary.saturatedPixels} saturated pixels were excluded`);
  if (!camera.calibrated) warnings.push(NOMINAL_CAMERA_WARNING);

  let t = now();
  onProgress('profile', 0);
  const measured = measureRings(raster, mask, geometry.frame, runtime.rowBands ? { rowBands: runtime.rowBands } : {});
  onProgress('profile', 1);
  timingsMs.profile = now() - t;
  warnings.push(...measured.warnings);
  if (measured.reason) warnings.push(`no rings: ${measured.reason}`);

  t = now();
  onProgress('d-spacings', 0);
  onProgress('indexing', 0);
  const { dSpacings: ds, indexing, assignment } = indexRingRadii(measured.rings, camera, settings.phases, settings.calibrationRelativeSigma);
  onProgress('d-spacings', 1);
  onProgress('indexing', 1);
  timingsMs.indexing = now() - t;

  const analyzedRings: AnalyzedRing[] = measured.rings.map((r, i) => ({
    radiusPx: r.radiusPx,
    radiusSigmaPx: r.radiusSigmaPx,
    radiusBoundPx: finiteOrNull(r.radiusBoundPx ?? Number.NaN),
    dA: ds[i]!.dA,
    dSigmaA: ds[i]!.dSigmaA,
    fwhmPx: r.fwhmPx,
    intensity: r.intensity,
    snr: r.snr,
    continuity: r.continuity,
    spottiness: r.spottiness,
    textureAmplitude: r.textureAmplitude,
    hkl: assignment[i]?.hkl ?? null,
    phase: assignment[i]?.phase ?? null,
  }));

  const s = geometry.sigma;
  return {
    image: { width: raster.width, height: raster.height, bitsPerSample: settings.image.bitsPerSample },
    voltageV: camera.voltageV,
    wavelengthA: electronWavelengthA(camera.voltageV),
    camera: { cameraLengthPx: camera.cameraLengthPx, cameraLengthSigmaPx: camera.cameraLengthSigmaPx, source: camera.source, calibrated: camera.calibrated },
    center: {
      xPx: geometry.frame.centerXPx,
      yPx: geometry.frame.centerYPx,
      sigmaPx: Math.sqrt((s.centerXPx ** 2 + s.centerYPx ** 2) / 2),
      sigmaXPx: s.centerXPx,
      sigmaYPx: s.centerYPx,
    },
    distortion: {
      axisRatio: geometry.frame.axisRatio,
      axisRatioSigma: s.axisRatio,
      angleDeg: geometry.frame.angleDeg,
      angleSigmaDeg: finiteOrNull(s.angleDeg),
      perRing: geometry.rings.flatMap((r) =>
        r.ellipse
          ? [{
              radiusPx: r.ellipse.radiusPx,
              axisRatio: r.ellipse.axisRatio,
              // Uncertainties from the ring's own geometric fit (single-ring concentric model); null when it failed.
              axisRatioSigma: r.ownFrame ? r.ownFrame.sigma.axisRatio : null,
              angleDeg: r.ellipse.angleDeg,
              angleSigmaDeg: r.ownFrame ? finiteOrNull(r.ownFrame.sigma.angleDeg) : null,
              centerXPx: r.ellipse.centerXPx,
              centerYPx: r.ellipse.centerYPx,
            }]
          : [],
      ),
    },
    masks: maskSummary,
    rings: analyzedRings,
    profile: {
      rMinPx: measured.profile.rMinPx,
      binWidthPx: measured.profile.binWidthPx,
      radiusPx: Array.from(measured.profile.radiusPx),
      mean: Array.from(measured.profile.mean),
      background: Array.from(measured.background),
    },
    candidates: indexing.candidates,
    ambiguities: indexing.ambiguities,
    secondPhase: indexing.secondPhase,
    conclusion: indexing.conclusion,
    status: analyzedRings.length === 0 ? 'no-rings' : 'ok',
    warnings,
    notes: indexing.notes,
    timingsMs,
  };
}
