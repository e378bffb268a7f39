/**
 * Saturated pixels: a pixel whose value reached the top of what the detector or
 * the file can store has lost its true value (and on many cameras the charge
 * spills into its neighbours), so it is excluded together with a margin.
 */
import type { Raster } from '../image/raster';
import type { PixelMask } from './pixel-mask';
import { dilateMask } from './mask-dilate';

export interface SaturatedMaskOptions {
  /**
   * Bits per sample as stored (ImageInfo.bitsPerSample). With sampleFormat 'uint'
   * (the default) the top of the range is 2^bits - 1; with 'int', 2^(bits-1) - 1.
   */
  bitsPerSample?: number;
  /** How samples were stored (ImageInfo.sampleFormat); 'float' has no top, so give saturationLevel. */
  sampleFormat?: 'uint' | 'int' | 'float';
  /** Values at or above this are saturated; overrides the level implied by bitsPerSample. */
  saturationLevel?: number;
  /** Margin around each saturated pixel, whole pixels (square), default 1. */
  dilatePx?: number;
}

export interface SaturatedMask {
  mask: PixelMask;
  /** The level used: pixels with value >= this were saturated. */
  saturationLevel: number;
  /** Saturated pixels before the margin was added. */
  saturatedCount: number;
}

/**
 * Marks pixels with value >= the saturation level, then grows the marks by
 * `dilatePx` (default 1 px).
 * @throws RangeError when neither a usable bitsPerSample nor saturationLevel is given,
 *   or when dilatePx is not a non-negative integer
 */
export function maskSaturated(raster: Raster, options: SaturatedMaskOptions): SaturatedMask {
  const level = saturationLevelOf(options);
  const { width, height, data } = raster;
  const excluded = new Uint8Array(width * height);
  let saturatedCount = 0;
  for (let p = 0; p < data.length; p++) {
    if (data[p]! >= level) {
      excluded[p] = 1;
      saturatedCount++;
    }
  }
  const dilatePx = options.dilatePx ?? 1;
  // Nothing saturated: the margin of nothing is nothing (dilateMask would scan the empty mask twice).
  const mask = saturatedCount === 0 && Number.isInteger(dilatePx) && dilatePx >= 0 ? { width, height, excluded } : dilateMask({ width, height, excluded }, dilatePx);
  return { mask, saturationLevel: level, saturatedCount };
}

function saturationLevelOf(options: SaturatedMaskOptions): number {
  if (options.saturationLevel !== undefined) {
    if (!Number.isFinite(options.saturationLevel)) {
      throw new RangeError(`saturationLevel must be a finite number; got ${options.saturationLevel}`);
    }
    return options.saturationLevel;
  }
  const format = options.sampleFormat ?? 'uint';
  const bits = options.bitsPerSample;
  if (format === 'float') {
    throw new RangeError('float samples have no top of range: give saturationLevel (the level at which the camera clips)');
  }
  if (bits === undefined || !Number.isInteger(bits) || bits < 1 || bits > 32) {
    throw new RangeError(`bitsPerSample must be an integer from 1 to 32 (or give saturationLevel); got ${bits}`);
  }
  // Top of the stored range of an unsigned / two's-complement integer sample.
  return format === 'int' ? 2 ** (bits - 1) - 1 : 2 ** bits - 1;
}
