/**
 * The mask every measurement honours: saturated pixels (with a 1 px margin),
 * hot pixels, the beam stop (body and stem), and the user's polygons.
 */
import type { OpenCv } from '../image/opencv-handle';
import type { Raster } from '../image/raster';
import { maskBeamStop } from '../rings/mask-beam-stop';
import { combineMasks, countExcluded } from '../rings/mask-combine';
import { maskHotPixels } from '../rings/mask-hot-pixels';
import { maskPolygons, type MaskPolygon } from '../rings/mask-polygons';
import { maskSaturated } from '../rings/mask-saturated';
import type { PixelMask } from '../rings/pixel-mask';
import type { RowBandRunner } from '../rings/row-bands';
import type { AnalysisImageFormat } from './analysis-settings';

export interface PatternMaskSummary {
  saturationLevel: number;
  saturatedPixels: number;
  hotPixels: number;
  beamStopFound: boolean;
  /** Why no beam stop was marked, when none was. */
  beamStopNote: string | null;
  polygonCount: number;
  /** Fraction of the image excluded by the combined mask. */
  excludedFraction: number;
}

export interface PatternMask {
  mask: PixelMask;
  summary: PatternMaskSummary;
}

export interface PatternMaskOptions {
  image: AnalysisImageFormat;
  saturationLevel?: number;
  detectBeamStop?: boolean;
  polygons?: readonly MaskPolygon[];
  /** Runs the pixel passes on bands of rows, e.g. a surface's worker pool (default: this thread). */
  rowBands?: RowBandRunner;
}

/** Builds the combined mask. Data that show no stop or no hot pixel simply mark none. */
export function buildPatternMask(raster: Raster, cv: OpenCv, options: PatternMaskOptions): PatternMask {
  const saturated = maskSaturated(raster, {
    bitsPerSample: options.image.bitsPerSample,
    sampleFormat: options.image.sampleFormat,
    ...(options.saturationLevel !== undefined ? { saturationLevel: options.saturationLevel } : {}),
  });
  const hot = maskHotPixels(raster, saturated.mask, {}, options.rowBands);
  const parts = [saturated.mask, hot.mask];
  let beamStopFound = false;
  let beamStopNote: string | null = 'beam-stop detection was turned off';
  if (options.detectBeamStop ?? true) {
    const stop = maskBeamStop(raster, cv);
    beamStopFound = stop.found;
    beamStopNote = stop.found ? null : stop.reason ?? 'no beam stop found';
    if (stop.found) parts.push(stop.mask);
  }
  const polygons = options.polygons ?? [];
  if (polygons.length > 0) parts.push(maskPolygons(raster.width, raster.height, [...polygons]));
  const mask = combineMasks(...parts);
  return {
    mask,
    summary: {
      saturationLevel: saturated.saturationLevel,
      saturatedPixels: saturated.saturatedCount,
      hotPixels: hot.hotCount,
      beamStopFound,
      beamStopNote,
      polygonCount: polygons.length,
      excludedFraction: countExcluded(mask) / (raster.width * raster.height),
    },
  };
}
