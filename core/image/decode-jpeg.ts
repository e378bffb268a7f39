/**
 * JPEG files into Annula's one-channel float raster, through jpeg-js
 * (https://github.com/jpeg-js/jpeg-js) for the pixels.
 *
 * Reads 8-bit Huffman-coded JPEG, gray (1 component) or colour (3), baseline, extended
 * sequential or progressive (ITU-T T.81 (1992) | ISO/IEC 10918-1, frame types SOF0,
 * SOF1, SOF2). The marker segments are walked here first (T.81 Annex B): to refuse an
 * oversized, damaged or unsupported file before jpeg-js allocates, and to read the JFIF
 * density (JFIF 1.02, APP0), the Adobe APP14 colour transform flag and COM comments.
 *
 * Colour: a YCbCr JPEG (the usual kind) already stores one full-resolution luma channel,
 * Y = 0.299 R + 0.587 G + 0.114 B (JFIF, after ITU-R BT.601); that channel is taken as
 * stored, with no chroma upsampling or colour round trip. The components are YCbCr unless
 * an Adobe marker with transform 0 says RGB and no JFIF marker says otherwise (libjpeg's
 * rule); RGB components are reduced with the BT.709 weights like any RGB file.
 * JPEG is lossy: its values are not the camera's counts.
 */
import jpeg from 'jpeg-js';
import { ImageDecodeError } from './image-decode-error';
import type { ResolvedImageDecodeOptions } from './image-decode-options';
import { checkDeclaredSize } from './image-size-limit';
import { luminance, luminanceWarning } from './luminance';
import type { DecodedImage, ImageInfo } from './raster';
import { decodeLatin1, decodeUtf8 } from './text-decoding';

const ADVICE_DAMAGED = 'the file is damaged: copy it again or export it again';
const ADVICE_EXPORT = 'export the image as TIFF or PNG (lossless), or as baseline 8-bit JPEG';

/** Frame types jpeg-js does not decode (T.81 table B.1), by marker. */
const UNSUPPORTED_FRAMES: Record<number, string> = {
  0xc3: 'lossless',
  0xc5: 'hierarchical (differential sequential)',
  0xc6: 'hierarchical (differential progressive)',
  0xc7: 'hierarchical (differential lossless)',
  0xc9: 'arithmetic-coded sequential',
  0xca: 'arithmetic-coded progressive',
  0xcb: 'arithmetic-coded lossless',
  0xcd: 'arithmetic-coded hierarchical',
  0xce: 'arithmetic-coded hierarchical progressive',
  0xcf: 'arithmetic-coded hierarchical lossless',
};

const FRAME_NAMES: Record<number, string> = { 0xc0: 'baseline', 0xc1: 'extended', 0xc2: 'progressive' };

interface JpegHeader {
  width: number;
  height: number;
  components: number;
  frame: number;
  /** Adobe APP14 colour transform: 0 components are RGB (or CMYK), 1 YCbCr, 2 YCCK; absent without the marker. */
  adobeTransform?: number;
  /** File offset of that transform byte. */
  adobeTransformAt?: number;
  /** A JFIF APP0 marker is present (its components are YCbCr, whatever an Adobe marker says). */
  jfif: boolean;
  resolution?: ImageInfo['resolution'];
  text: Record<string, string>;
}

function isFrameMarker(m: number): boolean {
  return m >= 0xc0 && m <= 0xcf && m !== 0xc4 && m !== 0xc8 && m !== 0xcc;
}

/** Walks the marker segments up to the first scan; checks frame, size and that the file ends with EOI. */
function scanMarkers(bytes: Uint8Array, options: ResolvedImageDecodeOptions): JpegHeader {
  const name = options.name;
  const text: Record<string, string> = {};
  let header: JpegHeader | undefined;
  let resolution: ImageInfo['resolution'];
  let adobeTransform: number | undefined;
  let adobeTransformAt: number | undefined;
  let jfif = false;
  let pos = 2;
  for (;;) {
    if (pos >= bytes.length) {
      throw new ImageDecodeError(name, 'truncated', `the JPEG ends at byte ${bytes.length}, before its image data`, ADVICE_DAMAGED);
    }
    if (bytes[pos] !== 0xff) {
      throw new ImageDecodeError(name, 'corrupt', `the JPEG has byte 0x${bytes[pos]!.toString(16)} at byte ${pos} where a marker must be`, ADVICE_DAMAGED);
    }
    while (bytes[pos] === 0xff) pos++;
    const marker = bytes[pos++];
    if (marker === undefined) continue;
    if (marker === 0xd9) {
      throw new ImageDecodeError(name, 'corrupt', 'the JPEG ends (EOI) before any image data', ADVICE_DAMAGED);
    }
    if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) continue;
    if (pos + 2 > bytes.length) {
      throw new ImageDecodeError(name, 'truncated', `the JPEG ends at byte ${bytes.length}, inside a marker segment`, ADVICE_DAMAGED);
    }
    const length = (bytes[pos]! << 8) | bytes[pos + 1]!;
    if (length < 2) throw new ImageDecodeError(name, 'corrupt', `the JPEG marker 0xFF${marker.toString(16).toUpperCase()} at byte ${pos - 2} declares ${length} bytes`, ADVICE_DAMAGED);
    if (pos + length > bytes.length) {
      throw new ImageDecodeError(name, 'truncated', `the JPEG ends at byte ${bytes.length}, inside its marker segment 0xFF${marker.toString(16).toUpperCase()} (bytes ${pos - 2} to ${pos + length})`, ADVICE_DAMAGED);
    }
    const seg = bytes.subarray(pos + 2, pos + length);
    if (isFrameMarker(marker)) {
      if (seg.length < 6) throw new ImageDecodeError(name, 'corrupt', 'the JPEG frame header is shorter than 6 bytes', ADVICE_DAMAGED);
      const precision = seg[0]!;
      const height = (seg[1]! << 8) | seg[2]!;
      const width = (seg[3]! << 8) | seg[4]!;
      const components = seg[5]!;
      if (height === 0 && width !== 0) {
        throw new ImageDecodeError(name, 'unsupported', 'the JPEG gives its height only after the image data (DNL marker)', ADVICE_EXPORT);
      }
      checkDeclaredSize(name, 'JPEG', width, height, options.maxPixels);
      const unsupported = UNSUPPORTED_FRAMES[marker];
      if (unsupported !== undefined) throw new ImageDecodeError(name, 'unsupported', `the JPEG is ${unsupported}`, ADVICE_EXPORT);
      if (precision !== 8) throw new ImageDecodeError(name, 'unsupported', `the JPEG has ${precision}-bit samples (8-bit are read)`, ADVICE_EXPORT);
      if (components !== 1 && components !== 3) {
        throw new ImageDecodeError(name, 'unsupported', `the JPEG has ${components} colour components${components === 4 ? ' (CMYK)' : ''} (1 gray or 3 colour are read)`, ADVICE_EXPORT);
      }
      header = { width, height, components, frame: marker, text, jfif: false };
    } else if (marker === 0xe0 && seg.length >= 12 && decodeLatin1(seg.subarray(0, 5)) === 'JFIF\0') {
      // JFIF 1.02 APP0: version (2), units (0 aspect only, 1 per inch, 2 per cm), Xdensity, Ydensity.
      jfif = true;
      const units = seg[7]!;
      const x = (seg[8]! << 8) | seg[9]!;
      const y = (seg[10]! << 8) | seg[11]!;
      if (x > 0 && y > 0) resolution = { xPerUnit: x, yPerUnit: y, unit: units === 1 ? 'inch' : units === 2 ? 'cm' : 'none' };
    } else if (marker === 0xee && seg.length >= 12 && decodeLatin1(seg.subarray(0, 5)) === 'Adobe') {
      // Adobe APP14 (Adobe Technical Note 5116): "Adobe", version (2), flags0 (2), flags1 (2), transform (1).
      adobeTransform = seg[11]!;
      adobeTransformAt = pos + 2 + 11;
    } else if (marker === 0xfe) {
      const comment = (decodeUtf8(seg) ?? decodeLatin1(seg)).replace(/\0+$/, '');
      text['Comment'] = 'Comment' in text ? `${text['Comment']}\n${comment}` : comment;
    } else if (marker === 0xda) {
      if (header === undefined) throw new ImageDecodeError(name, 'corrupt', 'the JPEG starts its image data before any frame header', ADVICE_DAMAGED);
      if (!hasEndMarker(bytes, pos + length)) {
        throw new ImageDecodeError(name, 'truncated', `the JPEG ends at byte ${bytes.length} without its end-of-image marker`, ADVICE_DAMAGED);
      }
      if (resolution !== undefined) header.resolution = resolution;
      if (adobeTransform !== undefined) {
        header.adobeTransform = adobeTransform;
        header.adobeTransformAt = adobeTransformAt!;
      }
      header.jfif = jfif;
      return header;
    }
    pos += length;
  }
}

/** Entropy-coded data never hold 0xFF 0xD9 (T.81 B.1.1.5: 0xFF is stuffed as 0xFF 0x00), so any after the first scan is EOI. */
function hasEndMarker(bytes: Uint8Array, from: number): boolean {
  for (let i = bytes.indexOf(0xff, from); i >= 0 && i + 1 < bytes.length; i = bytes.indexOf(0xff, i + 1)) {
    if (bytes[i + 1] === 0xd9) return true;
  }
  return false;
}

/**
 * Decodes a JPEG file (only page 0 exists).
 * @throws ImageDecodeError for a file that cannot be read, with the reason and what to do
 */
export function decodeJpeg(bytes: Uint8Array, options: ResolvedImageDecodeOptions): DecodedImage {
  const name = options.name;
  if (options.page !== 0) {
    throw new ImageDecodeError(name, 'no-such-page', `page ${options.page} was asked for but a JPEG has only page 0`, 'leave out the page or choose page 0');
  }
  const header = scanMarkers(bytes, options);
  const { width, height, components } = header;
  const pixelCount = width * height;
  const rgbStored = components === 3 && header.adobeTransform === 0 && !header.jfif;
  // jpeg-js converts YCbCr to RGB whenever an Adobe marker's transform flag is set, even
  // when asked not to; it is given a copy with the flag cleared, so it returns the stored Y.
  let input = bytes;
  if (components === 3 && !rgbStored && header.adobeTransform !== undefined && header.adobeTransform !== 0) {
    input = bytes.slice();
    input[header.adobeTransformAt!] = 0;
  }
  let decoded: { width: number; height: number; data: Uint8Array };
  try {
    decoded = jpeg.decode(input, {
      useTArray: true,
      formatAsRGBA: false,
      // The stored components, not RGB: the first is Y for gray and YCbCr files.
      colorTransform: false,
      tolerantDecoding: false,
      // The size was checked above; these only keep jpeg-js's own, lower, defaults out of the way.
      maxResolutionInMP: Math.ceil(pixelCount / 1e6) + 1,
      maxMemoryUsageInMB: Math.ceil((pixelCount * 16) / 2 ** 20) + 64,
    });
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    throw new ImageDecodeError(name, 'corrupt', `the JPEG cannot be decoded: ${message}`, ADVICE_DAMAGED);
  }
  if (decoded.width !== width || decoded.height !== height || decoded.data.length < pixelCount * 3) {
    throw new ImageDecodeError(name, 'corrupt', `the JPEG decoded to ${decoded.width} x ${decoded.height} where its header says ${width} x ${height}`, ADVICE_DAMAGED);
  }
  const out = new Float32Array(pixelCount);
  const warnings = ['JPEG is lossy: pixel values carry compression error and are not the camera\'s counts; prefer TIFF or PNG'];
  const stored = decoded.data;
  if (!rgbStored) {
    for (let i = 0; i < pixelCount; i++) out[i] = stored[3 * i]!;
    if (components === 3) {
      warnings.push('colour JPEG: its stored luma Y = 0.299 R + 0.587 G + 0.114 B (JFIF, after ITU-R BT.601) taken as the one channel');
    }
  } else {
    let allEqual = true;
    for (let i = 0, s = 0; i < pixelCount; i++, s += 3) {
      const red = stored[s]!, green = stored[s + 1]!, blue = stored[s + 2]!;
      if (red !== green || green !== blue) allEqual = false;
      out[i] = luminance(red, green, blue);
    }
    warnings.push(luminanceWarning('RGB JPEG', allEqual));
  }
  const info: ImageInfo = {
    format: 'jpeg',
    bitsPerSample: 8,
    sampleFormat: 'uint',
    channels: components,
    page: 0,
    pageCount: 1,
    text: header.text,
    warnings,
    compression: FRAME_NAMES[header.frame]!,
  };
  if (header.resolution !== undefined) info.resolution = header.resolution;
  return { raster: { width, height, data: out }, info };
}
