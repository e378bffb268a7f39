/**
 * PNG files of the pattern image (fast-png's encoder: pure TypeScript, no
 * canvas), for the PDF and for a PNG export of its own.
 */
import { encode } from 'fast-png';
import type { Raster } from '../../../core/image/raster';
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import { renderPatternImage, type PatternImageOptions } from './pattern-image';
import type { RgbaCanvas } from './raster-canvas';

export interface PngOptions {
  /** Keep the alpha channel (default false: RGB, smaller; the image is opaque anyway). */
  alpha?: boolean;
  /** tEXt chunks, Latin-1 keys and values (e.g. { Description: ..., Software: 'Annula 0.1.0' }). */
  text?: Record<string, string>;
}

/** 8-bit PNG bytes of an RGBA canvas. */
export function encodeCanvasPng(canvas: RgbaCanvas, options: PngOptions = {}): Uint8Array {
  const n = canvas.width * canvas.height;
  if (canvas.data.length !== 4 * n) throw new RangeError(`canvas data must hold 4 x ${n} bytes; got ${canvas.data.length}`);
  let data: Uint8Array;
  if (options.alpha) {
    data = new Uint8Array(canvas.data.buffer, canvas.data.byteOffset, canvas.data.length);
  } else {
    data = new Uint8Array(3 * n);
    for (let k = 0; k < n; k++) {
      data[3 * k] = canvas.data[4 * k]!;
      data[3 * k + 1] = canvas.data[4 * k + 1]!;
      data[3 * k + 2] = canvas.data[4 * k + 2]!;
    }
  }
  return encode({ width: canvas.width, height: canvas.height, data, depth: 8, channels: options.alpha ? 4 : 3, ...(options.text ? { text: options.text } : {}) });
}

/**
 * The pattern image of an analysis as PNG bytes (renderPatternImage, then
 * encodeCanvasPng), its grey-scale description in a tEXt 'Description' chunk.
 */
export function encodePatternPng(raster: Raster, result: AnalysisResult, options: PatternImageOptions & PngOptions = {}): Uint8Array {
  const image = renderPatternImage(raster, result, options);
  const text = { Description: image.display.description, ...(options.text ?? {}) };
  return encodeCanvasPng(image, { ...(options.alpha !== undefined ? { alpha: options.alpha } : {}), text });
}
