import type { Phase } from '../crystal/phase';
import type { MaskPolygon } from '../rings/mask-polygons';
import type { PatternFrame } from '../rings/pattern-frame';

/**
 * The camera for one analysis. L/p is the camera length over the pixel pitch
 * (exact flat-detector geometry); its uncertainty is 0 for a nominal camera
 * (then d carries the error of the nominal value, and the result says so) and
 * the calibration's for a calibrated one.
 */
export interface AnalysisCamera {
  voltageV: number;
  cameraLengthPx: number;
  /** Standard uncertainty of cameraLengthPx, px; 0 when unknown (nominal). */
  cameraLengthSigmaPx: number;
  /** Where the camera description came from, for the record ("nominal: L = 1 m, p = 14 µm"). */
  source: string;
  /** True when a calibration on a standard stands behind cameraLengthPx. */
  calibrated: boolean;
}

/** What the image file said about its samples (core/image ImageInfo), for the saturation level. */
export interface AnalysisImageFormat {
  bitsPerSample: number;
  sampleFormat: 'uint' | 'int' | 'float';
}

export interface AnalysisSettings {
  camera: AnalysisCamera;
  image: AnalysisImageFormat;
  /** Phases to match the rings against (library and user phases). */
  phases: readonly Phase[];
  /** Regions the user excluded (beam-stop parts, a grid bar...). */
  maskPolygons?: readonly MaskPolygon[];
  /** Start from this frame (e.g. a centre the user placed) instead of the automatic estimate. */
  startFrame?: PatternFrame;
  /** Fit the elliptical distortion (default true). */
  fitDistortion?: boolean;
  /** Pixel values at or above this are saturated (default: the top of the stored range). */
  saturationLevel?: number;
  /** Look for a beam stop (default true). */
  detectBeamStop?: boolean;
  /** Relative standard uncertainty of the camera scale for phase matching (default: from cameraLengthSigmaPx). */
  calibrationRelativeSigma?: number;
}

/** Stages reported to onProgress, in order. */
export type AnalysisStage = 'masks' | 'geometry' | 'profile' | 'd-spacings' | 'indexing';

export type AnalysisProgress = (stage: AnalysisStage, fraction: number) => void;
