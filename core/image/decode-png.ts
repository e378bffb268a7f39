/**
 * PNG files into Annula's one-channel float raster, through fast-png
 * (https://github.com/image-js/fast-png) for the pixels.
 *
 * Reads every PNG colour type and bit depth (Portable Network Graphics (PNG)
 * Specification, 2nd ed., W3C 2003 = ISO/IEC 15948:2004, section 11.2.2 IHDR): gray 1 to 16 bits, gray+alpha, RGB and RGBA 8 and
 * 16 bits, palette 1 to 8 bits; interlaced or not. Alpha is dropped, colour reduced to
 * luminance (see luminance.ts). The chunk list is walked here first: to refuse an
 * oversized or damaged file before fast-png allocates, and to read the pHYs chunk and
 * the tEXt, zTXt and iTXt text chunks (fast-png reads tEXt only).
 */
import { decode as decodePngPixels } from 'fast-png';
import { ImageDecodeError } from './image-decode-error';
import type { ResolvedImageDecodeOptions } from './image-decode-options';
import { checkDeclaredSize } from './image-size-limit';
import { inflateSegment } from './inflate-segment';
import { luminance, luminanceWarning } from './luminance';
import type { DecodedImage, ImageInfo } from './raster';
import { decodeLatin1, decodeUtf8 } from './text-decoding';

const ADVICE_DAMAGED = 'the file is damaged: copy it again or export it again';

/** Allowed bit depths per colour type (PNG specification, table 11.1). */
const DEPTHS: Record<number, number[]> = { 0: [1, 2, 4, 8, 16], 2: [8, 16], 3: [1, 2, 4, 8], 4: [8, 16], 6: [8, 16] };
/** Channels per colour type: gray, RGB, palette index, gray+alpha, RGBA. */
const CHANNELS: Record<number, number> = { 0: 1, 2: 3, 3: 1, 4: 2, 6: 4 };

/** Longest text kept from one compressed text chunk; more is cut with a warning. */
const MAX_TEXT_BYTES = 1 << 20;

interface PngHeader {
  width: number;
  height: number;
  depth: number;
  colourType: number;
  interlaced: boolean;
}

function chunkType(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(bytes[at]!, bytes[at + 1]!, bytes[at + 2]!, bytes[at + 3]!);
}

/** Walks the chunks: header, text, pHYs; checks structure and size before any pixel is decoded. */
function scanChunks(bytes: Uint8Array, options: ResolvedImageDecodeOptions, text: Record<string, string>, warnings: string[]) {
  const name = options.name;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let header: PngHeader | undefined;
  let resolution: ImageInfo['resolution'];
  let sawData = false;
  let pos = 8;
  for (;;) {
    if (pos + 8 > bytes.length) {
      throw new ImageDecodeError(name, 'truncated', `the PNG ends at byte ${bytes.length} without its IEND chunk`, ADVICE_DAMAGED);
    }
    const length = view.getUint32(pos, false);
    const type = chunkType(bytes, pos + 4);
    if (length > 0x7fffffff) {
      throw new ImageDecodeError(name, 'corrupt', `the PNG's ${type} chunk at byte ${pos} declares ${length} bytes`, ADVICE_DAMAGED);
    }
    const data = pos + 8;
    if (data + length + 4 > bytes.length) {
      throw new ImageDecodeError(name, 'truncated', `the PNG ends at byte ${bytes.length}, inside its ${type} chunk (bytes ${pos} to ${data + length + 4})`, ADVICE_DAMAGED);
    }
    if (header === undefined) {
      if (type !== 'IHDR' || length !== 13) {
        throw new ImageDecodeError(name, 'corrupt', `the PNG starts with a ${type} chunk of ${length} bytes where a 13-byte IHDR must be`, ADVICE_DAMAGED);
      }
      header = {
        width: view.getUint32(data, false),
        height: view.getUint32(data + 4, false),
        depth: bytes[data + 8]!,
        colourType: bytes[data + 9]!,
        interlaced: bytes[data + 12] === 1,
      };
      checkDeclaredSize(name, 'PNG', header.width, header.height, options.maxPixels);
      if (!(DEPTHS[header.colourType] ?? []).includes(header.depth)) {
        throw new ImageDecodeError(name, 'corrupt', `the PNG declares colour type ${header.colourType} with bit depth ${header.depth}, which the PNG standard does not allow`, ADVICE_DAMAGED);
      }
    } else if (type === 'IDAT') {
      sawData = true;
    } else if (type === 'IEND') {
      break;
    } else if (type === 'pHYs' && length === 9) {
      const x = view.getUint32(data, false);
      const y = view.getUint32(data + 4, false);
      // Unit 1 is the metre (PNG specification 11.3.5.3); kept as pixels per centimetre.
      resolution = bytes[data + 8] === 1 ? { xPerUnit: x / 100, yPerUnit: y / 100, unit: 'cm' } : { xPerUnit: x, yPerUnit: y, unit: 'none' };
    } else if (type === 'tEXt' || type === 'zTXt' || type === 'iTXt') {
      readTextChunk(type, bytes.subarray(data, data + length), text, warnings);
    }
    pos = data + length + 4;
  }
  if (!sawData) throw new ImageDecodeError(name, 'corrupt', 'the PNG has no IDAT (image data) chunk', ADVICE_DAMAGED);
  return { header: header!, resolution };
}

function inflateText(data: Uint8Array, warnings: string[], keyword: string): Uint8Array | undefined {
  const out = new Uint8Array(Math.min(MAX_TEXT_BYTES, Math.max(1024, data.length * 1100)));
  const result = inflateSegment(data, out);
  if (result.problem !== undefined) {
    warnings.push(`the PNG text "${keyword}" is damaged and was left out`);
    return undefined;
  }
  if (result.bytesWritten === MAX_TEXT_BYTES) warnings.push(`the PNG text "${keyword}" was cut at ${MAX_TEXT_BYTES} bytes`);
  return out.subarray(0, result.bytesWritten);
}

/** tEXt: keyword NUL Latin-1 text; zTXt: keyword NUL method zlib(Latin-1); iTXt: keyword NUL flag method language NUL translated NUL UTF-8 (PNG specification 11.3.4). */
function readTextChunk(type: string, chunk: Uint8Array, text: Record<string, string>, warnings: string[]): void {
  const nul = chunk.indexOf(0);
  if (nul < 1) {
    warnings.push(`a PNG ${type} chunk has no keyword and was left out`);
    return;
  }
  const keyword = decodeLatin1(chunk.subarray(0, nul));
  let value: string | undefined;
  if (type === 'tEXt') {
    value = decodeLatin1(chunk.subarray(nul + 1));
  } else if (type === 'zTXt') {
    const raw = inflateText(chunk.subarray(nul + 2), warnings, keyword);
    if (raw !== undefined) value = decodeLatin1(raw);
  } else {
    const compressed = chunk[nul + 1] === 1;
    const languageEnd = chunk.indexOf(0, nul + 3);
    const translatedEnd = languageEnd < 0 ? -1 : chunk.indexOf(0, languageEnd + 1);
    if (translatedEnd < 0) {
      warnings.push(`the PNG iTXt chunk "${keyword}" is malformed and was left out`);
      return;
    }
    const body = chunk.subarray(translatedEnd + 1);
    const raw = compressed ? inflateText(body, warnings, keyword) : body;
    if (raw !== undefined) value = decodeUtf8(raw) ?? decodeLatin1(raw);
  }
  if (value === undefined) return;
  text[keyword] = keyword in text ? `${text[keyword]}\n${value}` : value;
}

/** Spreads packed 1, 2 or 4-bit samples (rows padded to whole bytes, most significant bits first) into one byte each. */
function unpackBits(packed: ArrayLike<number>, width: number, height: number, depth: number): Uint8Array {
  const out = new Uint8Array(width * height);
  const rowBytes = Math.ceil((width * depth) / 8);
  const perByte = 8 / depth;
  const mask = (1 << depth) - 1;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const byte = packed[y * rowBytes + Math.floor(x / perByte)]!;
      out[y * width + x] = (byte >> (8 - depth * ((x % perByte) + 1))) & mask;
    }
  }
  return out;
}

/**
 * Decodes a PNG file (only page 0 exists).
 * @throws ImageDecodeError for a file that cannot be read, with the reason and what to do
 */
export function decodePng(bytes: Uint8Array, options: ResolvedImageDecodeOptions): DecodedImage {
  const name = options.name;
  if (options.page !== 0) {
    throw new ImageDecodeError(name, 'no-such-page', `page ${options.page} was asked for but a PNG has only page 0`, 'leave out the page or choose page 0');
  }
  const text: Record<string, string> = {};
  const warnings: string[] = [];
  const { header, resolution } = scanChunks(bytes, options, text, warnings);
  const { width, height, depth, colourType } = header;

  let png;
  try {
    png = decodePngPixels(bytes, { checkCrc: true });
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const cause = error instanceof Error && error.cause instanceof Error ? ` (${error.cause.message})` : '';
    throw new ImageDecodeError(name, 'corrupt', `the PNG cannot be decoded: ${message}${cause}`, ADVICE_DAMAGED);
  }
  const channels = CHANNELS[colourType]!;
  const pixelCount = width * height;
  const expected = depth < 8 ? height * Math.ceil((width * depth) / 8) : pixelCount * channels;
  if (png.width !== width || png.height !== height || png.data.length < expected) {
    throw new ImageDecodeError(name, 'truncated', `the PNG's image data hold ${png.data.length} samples where its ${width} x ${height} pixels need ${expected}`, ADVICE_DAMAGED);
  }
  const samples: ArrayLike<number> = depth < 8 ? unpackBits(png.data, width, height, depth) : png.data;
  const out = new Float32Array(pixelCount);
  let allEqual = true;
  if (colourType === 3) {
    const palette = png.palette ?? [];
    for (let i = 0; i < pixelCount; i++) {
      const entry = palette[samples[i]!];
      if (entry === undefined) {
        throw new ImageDecodeError(name, 'corrupt', `pixel ${i} of the PNG points at palette entry ${samples[i]}, beyond its ${palette.length} entries`, ADVICE_DAMAGED);
      }
      const [red, green, blue] = entry as [number, number, number];
      if (red !== green || green !== blue) allEqual = false;
      out[i] = luminance(red, green, blue);
    }
    warnings.push(`palette image: indices mapped through the palette (0 to 255); ${luminanceWarning('its colours', allEqual)}`);
  } else if (channels >= 3) {
    for (let i = 0, s = 0; i < pixelCount; i++, s += channels) {
      const red = samples[s]!, green = samples[s + 1]!, blue = samples[s + 2]!;
      if (red !== green || green !== blue) allEqual = false;
      out[i] = luminance(red, green, blue);
    }
    warnings.push(luminanceWarning('RGB', allEqual));
  } else {
    for (let i = 0, s = 0; i < pixelCount; i++, s += channels) out[i] = samples[s]!;
  }
  if (channels === 2 || channels === 4) warnings.push('alpha channel dropped');

  const info: ImageInfo = {
    format: 'png',
    bitsPerSample: depth,
    sampleFormat: 'uint',
    channels,
    page: 0,
    pageCount: 1,
    text,
    warnings,
    compression: header.interlaced ? 'deflate+adam7' : 'deflate',
  };
  if (colourType === 3) info.palette = true;
  if (resolution !== undefined) info.resolution = resolution;
  return { raster: { width, height, data: out }, info };
}
