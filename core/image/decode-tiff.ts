/**
 * TIFF pages into Annula's one-channel float raster.
 *
 * Reads (TIFF Revision 6.0, Adobe 1992, with its usual extensions):
 * - samples of 8, 16, 32 bits unsigned or signed, 32 or 64-bit IEEE float (SampleFormat 1, 2, 3);
 * - BlackIsZero and WhiteIsZero gray, RGB, palette colour; alpha and other extra samples dropped;
 * - either byte order, classic TIFF and BigTIFF, strips or tiles, chunky or planar samples;
 * - no compression, LZW, deflate (8 and the older 32946), PackBits; predictors 2 and 3.
 * Refuses, with an ImageDecodeError naming the file: JPEG-in-TIFF, CCITT fax and the
 * other compressions, CMYK/YCbCr/Lab and raw sensor mosaics, 1 to 7-bit and 12-bit
 * packed samples, 16-bit floats, 64-bit integers.
 *
 * The declared size is checked against the pixel limit, and every strip or tile
 * against the file length, before the raster is allocated.
 */
import { ImageDecodeError } from './image-decode-error';
import type { ResolvedImageDecodeOptions } from './image-decode-options';
import { checkDeclaredSize } from './image-size-limit';
import { inflateSegment } from './inflate-segment';
import { luminance, luminanceWarning } from './luminance';
import { decodePackBits } from './packbits';
import type { DecodedImage, ImageInfo } from './raster';
import type { SegmentDecodeResult } from './segment-decode-result';
import { entryNumbers, entryText, openTiff, readTiffDirectory, type TiffContainer, type TiffEntry } from './tiff-directory';
import { decodeTiffLzw, isOldStyleLzw } from './tiff-lzw';
import {
  PLATFORM_LITTLE_ENDIAN,
  swapSampleBytes,
  undoFloatingPointPredictor,
  undoHorizontalDifferencing,
} from './tiff-predictor';

/** TIFF tags this reader uses (TIFF 6.0 section 8 and appendix A). */
const TAG = {
  imageWidth: 256,
  imageLength: 257,
  bitsPerSample: 258,
  compression: 259,
  photometric: 262,
  stripOffsets: 273,
  orientation: 274,
  samplesPerPixel: 277,
  rowsPerStrip: 278,
  stripByteCounts: 279,
  xResolution: 282,
  yResolution: 283,
  planarConfiguration: 284,
  resolutionUnit: 296,
  predictor: 317,
  colorMap: 320,
  tileWidth: 322,
  tileLength: 323,
  tileOffsets: 324,
  tileByteCounts: 325,
  sampleFormat: 339,
} as const;

/** Text tags kept in info.text, under their TIFF 6.0 names. */
const TEXT_TAGS: Array<[number, string]> = [
  [269, 'DocumentName'],
  [270, 'ImageDescription'],
  [271, 'Make'],
  [272, 'Model'],
  [285, 'PageName'],
  [305, 'Software'],
  [306, 'DateTime'],
  [315, 'Artist'],
  [316, 'HostComputer'],
  [33432, 'Copyright'],
];

/** Compressions this reader cannot undo, by code, named as the TIFF registry names them. */
const UNSUPPORTED_COMPRESSION: Record<number, string> = {
  2: 'CCITT modified Huffman run-length (fax)',
  3: 'CCITT Group 3 fax',
  4: 'CCITT Group 4 fax',
  6: 'old-style JPEG',
  7: 'JPEG',
  9: 'JBIG',
  10: 'JBIG',
  32809: 'ThunderScan',
  34661: 'JBIG',
  34676: 'SGI LogLuv',
  34712: 'JPEG 2000',
  34887: 'LERC',
  34892: 'lossy JPEG',
  34925: 'LZMA',
  50000: 'Zstandard',
  50001: 'WebP',
  50002: 'JPEG XL',
};

const PHOTOMETRIC_NAMES: Record<number, string> = {
  4: 'transparency mask',
  5: 'separated (CMYK)',
  6: 'YCbCr',
  8: 'CIE L*a*b*',
  9: 'ICC L*a*b*',
  10: 'ITU L*a*b*',
  32803: 'colour filter array (raw sensor mosaic)',
  32844: 'LogL',
  32845: 'LogLuv',
  34892: 'linear raw',
};

/** Most bytes one input byte can become: PackBits 128/2, deflate about 1032 (RFC 1951 limits), LZW 4096 per 9-bit code. */
const MAX_EXPANSION: Record<string, number> = { none: 1, packbits: 64, deflate: 1100, lzw: 4096 * (8 / 9) };

const ADVICE_DAMAGED = 'the file is damaged: copy it again from the instrument or re-export it';
const ADVICE_EXPORT = 'export the image again as an uncompressed, LZW or deflate TIFF of 8, 16 or 32-bit gray samples';

type Colour = 'gray' | 'rgb' | 'palette';

interface PageLayout {
  width: number;
  height: number;
  samplesPerPixel: number;
  bitsPerSample: number;
  sampleFormat: 1 | 2 | 3;
  colour: Colour;
  whiteIsZero: boolean;
  compression: 'none' | 'lzw' | 'deflate' | 'packbits';
  predictor: 1 | 2 | 3;
  planar: boolean;
  tiled: boolean;
  segmentWidth: number;
  segmentHeight: number;
  across: number;
  down: number;
  offsets: number[];
  byteCounts: number[];
  colorMap?: number[];
}

function fail(name: string, reason: 'unsupported' | 'corrupt' | 'truncated', problem: string, advice?: string): never {
  throw new ImageDecodeError(name, reason, problem, advice ?? (reason === 'unsupported' ? ADVICE_EXPORT : ADVICE_DAMAGED));
}

function single(tiff: TiffContainer, entries: Map<number, TiffEntry>, tag: number): number | undefined {
  const entry = entries.get(tag);
  if (entry === undefined || entry.count === 0) return undefined;
  return entryNumbers(tiff, entry)[0];
}

/** All values of a per-sample tag, which must agree (this reader keeps one format for all samples). */
function uniform(tiff: TiffContainer, entries: Map<number, TiffEntry>, tag: number, fallback: number, what: string): number {
  const entry = entries.get(tag);
  if (entry === undefined || entry.count === 0) return fallback;
  const values = entryNumbers(tiff, entry);
  if (values.some((v) => v !== values[0])) {
    fail(tiff.name, 'unsupported', `the TIFF mixes samples of different ${what} (${values.join(', ')})`);
  }
  return values[0]!;
}

function readLayout(tiff: TiffContainer, entries: Map<number, TiffEntry>, options: ResolvedImageDecodeOptions, warnings: string[]): PageLayout {
  const name = tiff.name;
  const width = single(tiff, entries, TAG.imageWidth);
  const height = single(tiff, entries, TAG.imageLength);
  if (width === undefined || height === undefined) {
    fail(name, 'corrupt', `the TIFF page has no ${width === undefined ? 'ImageWidth' : 'ImageLength'} tag`);
  }
  checkDeclaredSize(name, 'TIFF', width, height, options.maxPixels);

  const compressionCode = single(tiff, entries, TAG.compression) ?? 1;
  let compression: PageLayout['compression'];
  if (compressionCode === 1) compression = 'none';
  else if (compressionCode === 5) compression = 'lzw';
  else if (compressionCode === 8 || compressionCode === 32946) compression = 'deflate';
  else if (compressionCode === 32773) compression = 'packbits';
  else fail(name, 'unsupported', `the TIFF is compressed with ${UNSUPPORTED_COMPRESSION[compressionCode] ?? `compression code ${compressionCode}`}`);


  const samplesPerPixel = single(tiff, entries, TAG.samplesPerPixel) ?? 1;
  if (samplesPerPixel < 1) fail(name, 'corrupt', `the TIFF declares ${samplesPerPixel} samples per pixel`);
  const bitsPerSample = uniform(tiff, entries, TAG.bitsPerSample, 1, 'sizes');
  const formatCode = uniform(tiff, entries, TAG.sampleFormat, 1, 'formats');
  if (formatCode !== 1 && formatCode !== 2 && formatCode !== 3) {
    fail(name, 'unsupported', `the TIFF's SampleFormat ${formatCode} (${formatCode === 4 ? 'undefined' : 'complex'} data) is not a kind of pixel Annula reads`);
  }
  const sampleFormat = formatCode as 1 | 2 | 3;
  if (sampleFormat === 3 && bitsPerSample !== 32 && bitsPerSample !== 64) {
    fail(name, 'unsupported', `the TIFF holds ${bitsPerSample}-bit floating-point samples (32 and 64-bit are read)`);
  }
  if (sampleFormat !== 3 && bitsPerSample !== 8 && bitsPerSample !== 16 && bitsPerSample !== 32) {
    fail(name, 'unsupported', `the TIFF holds ${bitsPerSample}-bit ${sampleFormat === 2 ? 'signed' : 'unsigned'} integer samples (8, 16 and 32-bit are read)`);
  }

  let photometric = single(tiff, entries, TAG.photometric);
  if (photometric === undefined) {
    photometric = samplesPerPixel >= 3 ? 2 : 1;
    warnings.push(`the TIFF has no PhotometricInterpretation tag: read as ${photometric === 2 ? 'RGB' : 'gray (black is zero)'}`);
  }
  let colour: Colour;
  let whiteIsZero = false;
  if (photometric === 0 || photometric === 1) {
    colour = 'gray';
    if (photometric === 0) {
      if (sampleFormat !== 1) fail(name, 'unsupported', 'the TIFF stores signed or float samples as WhiteIsZero, which has no defined inverse');
      whiteIsZero = true;
      warnings.push('the TIFF stores gray as WhiteIsZero: inverted, so larger values are brighter');
    }
  } else if (photometric === 2) {
    colour = 'rgb';
    if (samplesPerPixel < 3) fail(name, 'corrupt', `the TIFF declares RGB with ${samplesPerPixel} samples per pixel`);
  } else if (photometric === 3) {
    colour = 'palette';
    if (sampleFormat !== 1 || (bitsPerSample !== 8 && bitsPerSample !== 16)) {
      fail(name, 'unsupported', `the TIFF is a palette image with ${bitsPerSample}-bit indices (8 and 16-bit are read)`);
    }
  } else {
    fail(name, 'unsupported', `the TIFF's colour model is ${PHOTOMETRIC_NAMES[photometric] ?? `PhotometricInterpretation ${photometric}`}`, 'export the image as gray or RGB');
  }
  const colourSamples = colour === 'rgb' ? 3 : 1;
  if (samplesPerPixel > colourSamples) {
    warnings.push(`${samplesPerPixel - colourSamples} extra sample(s) per pixel (alpha or other) dropped`);
  }

  let predictor = (single(tiff, entries, TAG.predictor) ?? 1) as number;
  if (predictor !== 1 && predictor !== 2 && predictor !== 3) fail(name, 'unsupported', `the TIFF uses predictor ${predictor} (1, 2 and 3 are read)`);
  if (predictor !== 1 && (compression === 'none' || compression === 'packbits')) {
    warnings.push(`predictor ${predictor} ignored: it has no meaning with ${compression === 'none' ? 'uncompressed data' : 'PackBits'} (as libtiff reads it)`);
    predictor = 1;
  }
  if (predictor === 3 && sampleFormat !== 3) fail(name, 'corrupt', 'the TIFF applies the floating-point predictor to integer samples');

  const planarCode = single(tiff, entries, TAG.planarConfiguration) ?? 1;
  if (planarCode !== 1 && planarCode !== 2) fail(name, 'corrupt', `the TIFF declares PlanarConfiguration ${planarCode}`);
  const planar = planarCode === 2 && samplesPerPixel > 1;

  const tiled = entries.has(TAG.tileWidth) || entries.has(TAG.tileOffsets);
  let segmentWidth: number;
  let segmentHeight: number;
  if (tiled) {
    segmentWidth = single(tiff, entries, TAG.tileWidth) ?? 0;
    segmentHeight = single(tiff, entries, TAG.tileLength) ?? 0;
    if (segmentWidth < 1 || segmentHeight < 1) fail(name, 'corrupt', `the TIFF declares ${segmentWidth} x ${segmentHeight} tiles`);
  } else {
    segmentWidth = width;
    segmentHeight = Math.min(single(tiff, entries, TAG.rowsPerStrip) ?? height, height);
    if (segmentHeight < 1) fail(name, 'corrupt', 'the TIFF declares 0 rows per strip');
  }
  const across = Math.ceil(width / segmentWidth);
  const down = Math.ceil(height / segmentHeight);
  const planes = planar ? samplesPerPixel : 1;
  const segmentCount = across * down * planes;
  const kind = tiled ? 'tile' : 'strip';

  const offsetsEntry = entries.get(tiled ? TAG.tileOffsets : TAG.stripOffsets);
  if (offsetsEntry === undefined) fail(name, 'corrupt', `the TIFF page has no ${tiled ? 'TileOffsets' : 'StripOffsets'} tag`);
  const offsets = entryNumbers(tiff, offsetsEntry);
  if (offsets.length < segmentCount) fail(name, 'corrupt', `the TIFF lists ${offsets.length} ${kind} offsets where its size needs ${segmentCount}`);
  const bytesPerSample = bitsPerSample / 8;
  const segmentSamples = planar ? 1 : samplesPerPixel;
  const countsEntry = entries.get(tiled ? TAG.tileByteCounts : TAG.stripByteCounts);
  let byteCounts: number[];
  if (countsEntry !== undefined) {
    byteCounts = entryNumbers(tiff, countsEntry);
  } else if (compression === 'none') {
    byteCounts = offsets.map((_, i) => segmentRows(i % (across * down), across, segmentHeight, height, tiled) * segmentWidth * segmentSamples * bytesPerSample);
    warnings.push(`the TIFF has no ${kind} byte counts: taken from the image size`);
  } else {
    fail(name, 'corrupt', `the compressed TIFF has no ${tiled ? 'TileByteCounts' : 'StripByteCounts'} tag`);
  }
  if (byteCounts.length < segmentCount) fail(name, 'corrupt', `the TIFF lists ${byteCounts.length} ${kind} byte counts where its size needs ${segmentCount}`);

  let colorMap: number[] | undefined;
  if (colour === 'palette') {
    const entry = entries.get(TAG.colorMap);
    const needed = 3 * 2 ** bitsPerSample;
    if (entry === undefined || entry.count < needed) {
      fail(name, 'corrupt', `the palette TIFF's ColorMap holds ${entry?.count ?? 0} values where ${needed} are needed`);
    }
    colorMap = entryNumbers(tiff, entry);
  }

  return {
    width, height, samplesPerPixel, bitsPerSample, sampleFormat, colour, whiteIsZero, compression,
    predictor: predictor as 1 | 2 | 3, planar, tiled, segmentWidth, segmentHeight, across, down, offsets, byteCounts, colorMap,
  };
}

/** Rows of image data in segment `index` of one plane: full tiles always; the last strip may be short. */
function segmentRows(index: number, across: number, segmentHeight: number, height: number, tiled: boolean): number {
  if (tiled) return segmentHeight;
  const row = Math.floor(index / across) * segmentHeight;
  return Math.min(segmentHeight, height - row);
}

type SampleView = Float32Array | Float64Array | Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array;

function makeView(buf: Uint8Array, bits: number, format: 1 | 2 | 3, count: number): SampleView {
  const b = buf.buffer;
  const o = buf.byteOffset;
  if (format === 3) return bits === 32 ? new Float32Array(b, o, count) : new Float64Array(b, o, count);
  if (bits === 8) return format === 2 ? new Int8Array(b, o, count) : new Uint8Array(b, o, count);
  if (bits === 16) return format === 2 ? new Int16Array(b, o, count) : new Uint16Array(b, o, count);
  return format === 2 ? new Int32Array(b, o, count) : new Uint32Array(b, o, count);
}

function decompress(layout: PageLayout, src: Uint8Array, out: Uint8Array<ArrayBuffer>): SegmentDecodeResult {
  switch (layout.compression) {
    case 'none': {
      const n = Math.min(src.length, out.length);
      out.set(src.subarray(0, n));
      return { bytesWritten: n };
    }
    case 'lzw':
      return decodeTiffLzw(src, out);
    case 'deflate':
      return inflateSegment(src, out);
    case 'packbits':
      return decodePackBits(src, out);
  }
}

/**
 * Decodes page `options.page` of a TIFF file.
 * @throws ImageDecodeError for a file that cannot be read, with the reason and what to do
 */
export function decodeTiff(bytes: Uint8Array, options: ResolvedImageDecodeOptions): DecodedImage {
  const name = options.name;
  const tiff = openTiff(bytes, name);
  const pageCount = tiff.directoryOffsets.length;
  if (options.page >= pageCount) {
    throw new ImageDecodeError(name, 'no-such-page', `page ${options.page} was asked for but the TIFF has ${pageCount} page(s), numbered from 0`, `choose a page from 0 to ${pageCount - 1}`);
  }
  const entries = readTiffDirectory(tiff, options.page);
  const warnings: string[] = [];
  const layout = readLayout(tiff, entries, options, warnings);
  const { width, height, bitsPerSample, sampleFormat, colour, planar, tiled, segmentWidth, segmentHeight, across, down } = layout;
  const bytesPerSample = bitsPerSample / 8;
  const segmentSamples = planar ? 1 : layout.samplesPerPixel;
  const rowBytes = segmentWidth * segmentSamples * bytesPerSample;
  const usedPlanes = planar ? (colour === 'rgb' ? 3 : 1) : 1;
  const perPlane = across * down;
  const kind = tiled ? 'tile' : 'strip';

  // Every segment the pixels need must lie inside the file, and together they must be
  // able to hold the declared image, before the raster is allocated.
  let storedBytes = 0;
  let neededBytes = 0;
  for (let p = 0; p < usedPlanes; p++) {
    for (let k = 0; k < perPlane; k++) {
      const i = p * perPlane + k;
      const offset = layout.offsets[i]!;
      const count = layout.byteCounts[i]!;
      const needed = segmentRows(k, across, segmentHeight, height, tiled) * rowBytes;
      if (count > 0 && offset + count > bytes.length) {
        fail(name, 'truncated', `the TIFF ends at byte ${bytes.length}, before the end of ${kind} ${i} (bytes ${offset} to ${offset + count})`);
      }
      if (layout.compression === 'none' && count > 0 && count < needed) {
        fail(name, 'truncated', `${kind} ${i} of the TIFF holds ${count} bytes where its pixels need ${needed}`);
      }
      storedBytes += count;
      neededBytes += needed;
    }
  }
  if (storedBytes * MAX_EXPANSION[layout.compression]! < neededBytes) {
    fail(name, 'truncated', `the TIFF's ${layout.compression} data (${storedBytes} bytes) cannot hold the ${neededBytes} bytes its ${width} x ${height} pixels need`);
  }

  const pixelCount = width * height;
  const out = new Float32Array(pixelCount);
  // Planar RGB: the red and green planes are kept (as doubles, exact for every sample type)
  // until the blue plane arrives, so each pixel gets the same luminance as chunky RGB.
  const planesSeen = colour === 'rgb' && planar ? [new Float64Array(pixelCount), new Float64Array(pixelCount)] : [];
  const scratch = new Uint8Array(segmentHeight * rowBytes);
  const rowScratch = layout.predictor === 3 ? new Uint8Array(rowBytes) : scratch;
  const swap = bytesPerSample > 1 && tiff.littleEndian !== PLATFORM_LITTLE_ENDIAN;
  const maxValue = 2 ** bitsPerSample - 1;
  const map = layout.colorMap;
  const mapSize = 2 ** bitsPerSample;
  let allEqual = true;
  let emptySegments = 0;

  for (let p = 0; p < usedPlanes; p++) {
    for (let k = 0; k < perPlane; k++) {
      const i = p * perPlane + k;
      const rows = segmentRows(k, across, segmentHeight, height, tiled);
      const needed = rows * rowBytes;
      const buf = scratch.subarray(0, needed);
      const count = layout.byteCounts[i]!;
      if (count === 0) {
        buf.fill(0);
        emptySegments++;
      } else {
        const offset = layout.offsets[i]!;
        const src = bytes.subarray(offset, offset + count);
        if (layout.compression === 'lzw' && isOldStyleLzw(src)) {
          fail(name, 'unsupported', `${kind} ${i} of the TIFF uses the pre-1991 old-style LZW`);
        }
        const result = decompress(layout, src, buf);
        if (result.problem !== undefined) fail(name, 'corrupt', `${kind} ${i} of the TIFF: ${result.problem}`);
        if (result.bytesWritten < needed) {
          fail(name, 'truncated', `${kind} ${i} of the TIFF decodes to ${result.bytesWritten} bytes where its pixels need ${needed}`);
        }
      }
      if (layout.predictor === 3) {
        undoFloatingPointPredictor(buf, bytesPerSample, segmentWidth * segmentSamples, rows, segmentSamples, rowScratch);
      } else {
        if (swap) swapSampleBytes(buf, bytesPerSample);
        if (layout.predictor === 2) undoHorizontalDifferencing(buf, bytesPerSample, segmentWidth * segmentSamples, rows, segmentSamples);
      }
      const v = makeView(buf, bitsPerSample, sampleFormat, needed / bytesPerSample);

      const x0 = (k % across) * segmentWidth;
      const y0 = Math.floor(k / across) * segmentHeight;
      const cols = Math.min(segmentWidth, width - x0);
      const lastRow = Math.min(rows, height - y0);
      for (let r = 0; r < lastRow; r++) {
        const dst = (y0 + r) * width + x0;
        const at = r * segmentWidth * segmentSamples;
        if (colour === 'rgb' && !planar) {
          for (let c = 0, s = at; c < cols; c++, s += segmentSamples) {
            const red = v[s]!, green = v[s + 1]!, blue = v[s + 2]!;
            if (red !== green || green !== blue) allEqual = false;
            out[dst + c] = luminance(red, green, blue);
          }
        } else if (colour === 'rgb') {
          if (p < 2) {
            const plane = planesSeen[p]!;
            for (let c = 0; c < cols; c++) plane[dst + c] = v[at + c]!;
          } else {
            const reds = planesSeen[0]!, greens = planesSeen[1]!;
            for (let c = 0; c < cols; c++) {
              const red = reds[dst + c]!, green = greens[dst + c]!, blue = v[at + c]!;
              if (red !== green || green !== blue) allEqual = false;
              out[dst + c] = luminance(red, green, blue);
            }
          }
        } else if (colour === 'palette') {
          for (let c = 0, s = at; c < cols; c++, s += segmentSamples) {
            const index = v[s]!;
            const red = map![index]!, green = map![mapSize + index]!, blue = map![2 * mapSize + index]!;
            if (red !== green || green !== blue) allEqual = false;
            out[dst + c] = luminance(red, green, blue);
          }
        } else if (layout.whiteIsZero) {
          for (let c = 0, s = at; c < cols; c++, s += segmentSamples) out[dst + c] = maxValue - v[s]!;
        } else if (segmentSamples === 1) {
          // One typed-array copy per row (each sample converted to float32 as an assignment would).
          out.set(v.subarray(at, at + cols), dst);
        } else {
          for (let c = 0, s = at; c < cols; c++, s += segmentSamples) out[dst + c] = v[s]!;
        }
      }
    }
  }

  if (emptySegments > 0) warnings.push(`${emptySegments} ${kind}(s) stored no data (byte count 0) and were read as zeros`);
  if (colour === 'rgb') warnings.push(luminanceWarning('RGB', allEqual));
  if (colour === 'palette') warnings.push(`palette image: indices mapped through the ColorMap (0 to 65535); ${luminanceWarning('its colours', allEqual)}`);
  if (sampleFormat === 3) {
    let nonFinite = 0;
    for (let i = 0; i < pixelCount; i++) if (!Number.isFinite(out[i]!)) nonFinite++;
    if (nonFinite > 0) warnings.push(`${nonFinite} pixel(s) are NaN or infinite (or beyond the Float32 range)`);
  }
  const orientation = single(tiff, entries, TAG.orientation);
  if (orientation !== undefined && orientation !== 1) {
    warnings.push(`the TIFF's Orientation tag is ${orientation}; the pixels are given in stored order, row 0 first, not turned`);
  }

  const info: ImageInfo = {
    format: 'tiff',
    bitsPerSample,
    sampleFormat: sampleFormat === 1 ? 'uint' : sampleFormat === 2 ? 'int' : 'float',
    channels: layout.samplesPerPixel,
    page: options.page,
    pageCount,
    text: readText(tiff, entries),
    warnings,
    compression: layout.compression + (layout.predictor === 1 ? '' : `+predictor-${layout.predictor}`),
    byteOrder: tiff.littleEndian ? 'little' : 'big',
    layout: tiled ? 'tiles' : 'strips',
  };
  if (colour === 'palette') info.palette = true;
  const resolution = readResolution(tiff, entries, warnings);
  if (resolution !== undefined) info.resolution = resolution;
  return { raster: { width, height, data: out }, info };
}

function readText(tiff: TiffContainer, entries: Map<number, TiffEntry>): Record<string, string> {
  const text: Record<string, string> = {};
  for (const [tag, key] of TEXT_TAGS) {
    const entry = entries.get(tag);
    if (entry !== undefined && entry.type === 2) {
      const value = entryText(tiff, entry);
      if (value.length > 0) text[key] = value;
    }
  }
  return text;
}

/** XResolution, YResolution, ResolutionUnit (TIFF 6.0: unit 1 none, 2 inch (the default), 3 centimetre). */
function readResolution(tiff: TiffContainer, entries: Map<number, TiffEntry>, warnings: string[]): ImageInfo['resolution'] {
  const x = single(tiff, entries, TAG.xResolution);
  if (x === undefined) return undefined;
  const y = single(tiff, entries, TAG.yResolution) ?? x;
  if (!Number.isFinite(x) || !Number.isFinite(y) || x <= 0 || y <= 0) {
    warnings.push(`the TIFF's resolution (${x} x ${y}) is not a positive number and was left out`);
    return undefined;
  }
  const unitCode = single(tiff, entries, TAG.resolutionUnit) ?? 2;
  const unit = unitCode === 3 ? 'cm' : unitCode === 1 ? 'none' : 'inch';
  return { xPerUnit: x, yPerUnit: y, unit };
}
