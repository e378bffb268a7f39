import { decodeJpeg } from './decode-jpeg';
import { decodePng } from './decode-png';
import { decodeTiff } from './decode-tiff';
import type { ImageDecodeOptions, ResolvedImageDecodeOptions } from './image-decode-options';
import { DEFAULT_MAX_PIXELS } from './image-size-limit';
import type { DecodedImage } from './raster';
import { sniffImageFormat } from './sniff-image-format';

/**
 * Decodes a camera image (TIFF, PNG or JPEG, told apart by their first bytes) into one
 * channel of Float32 samples on the file's own scale (8-bit 0..255, 16-bit 0..65535,
 * signed and float values as stored), with what the file says about itself.
 *
 * RGB is reduced to luminance with the ITU-R BT.709 weights (a colour JPEG gives its
 * stored luma Y instead) and alpha is dropped, each with a note in info.warnings.
 * Nothing is rescaled or clipped.
 *
 * @param bytes the whole file; not modified
 * @param options.page TIFF page, 0-based (default 0); info.pageCount says how many there are
 * @param options.maxPixels refuse declared sizes above this many pixels (default 4e8), before allocating
 * @param options.name how messages name the file (default 'image')
 * @returns the raster (pixel (i, j) at data[j * width + i]) and its ImageInfo
 * @throws RangeError for a bad option (names it); ImageDecodeError for a file that cannot
 *   be read, whose `reason` says why and whose message names the file and what to do
 * @example
 *   const { raster, info } = decodeImage(bytes, { name: 'gold-film.tif' });
 */
export function decodeImage(bytes: Uint8Array, options: ImageDecodeOptions = {}): DecodedImage {
  if (!(bytes instanceof Uint8Array)) {
    throw new TypeError(`bytes must be a Uint8Array holding the file; got ${Object.prototype.toString.call(bytes)}`);
  }
  const resolved = resolveOptions(options);
  switch (sniffImageFormat(bytes, resolved.name)) {
    case 'tiff':
      return decodeTiff(bytes, resolved);
    case 'png':
      return decodePng(bytes, resolved);
    case 'jpeg':
      return decodeJpeg(bytes, resolved);
  }
}

function resolveOptions(options: ImageDecodeOptions): ResolvedImageDecodeOptions {
  const page = options.page ?? 0;
  const maxPixels = options.maxPixels ?? DEFAULT_MAX_PIXELS;
  const name = options.name ?? 'image';
  if (!Number.isInteger(page) || page < 0) {
    throw new RangeError(`page must be a whole number >= 0; got ${page}`);
  }
  if (!(maxPixels > 0) || !Number.isFinite(maxPixels)) {
    throw new RangeError(`maxPixels must be a positive, finite number of pixels; got ${maxPixels}`);
  }
  if (typeof name !== 'string' || name.length === 0) {
    throw new RangeError(`name must be a non-empty string; got ${JSON.stringify(name)}`);
  }
  return { page, maxPixels, name };
}
