/**
 * A baseline TIFF writer for one-channel images: 16-bit unsigned integers or 32-bit
 * IEEE floats, little-endian ("II"), uncompressed or deflated, in strips, with the fields a reader
 * needs and, when given, ImageDescription, Software and the X/Y resolution.
 *
 * Layout (TIFF Revision 6.0, Adobe 1992, section 2 "TIFF Structure" and section 8
 * "Baseline Field Reference Guide"): the 8-byte header "II", 42, offset of the IFD; the
 * one IFD (entry count, 12-byte entries in ascending tag order, 0 for "no next IFD");
 * the values too long for an entry (ASCII text, RATIONALs, strip tables); then the
 * strips, each starting on an even offset. Fields written: ImageWidth (256),
 * ImageLength (257), BitsPerSample (258), Compression (259) = 1, Photometric-
 * Interpretation (262) = 1 BlackIsZero, ImageDescription (270), StripOffsets (273),
 * SamplesPerPixel (277) = 1, RowsPerStrip (278), StripByteCounts (279), XResolution
 * (282), YResolution (283), ResolutionUnit (296), Software (305), SampleFormat (339)
 * = 1 unsigned integer or 3 IEEE float (section 19 of TIFF 6.0).
 *
 * The writer never changes a value: uint16 output refuses a sample that is not an
 * integer from 0 to 65535 (round and clip first, or write float32), and ASCII fields
 * refuse characters outside 7-bit ASCII (the TIFF ASCII type).
 */

import { deflate } from 'pako';
import type { Raster } from './raster';

export interface TiffEncodeOptions {
  /** How samples are stored; default 'uint16'. */
  sampleFormat?: 'uint16' | 'float32';
  /** ImageDescription text, 7-bit ASCII without NUL. */
  description?: string;
  /** Software text, 7-bit ASCII without NUL. */
  software?: string;
  /** Pixels per unit, > 0; default 1 per unit 'none' (TIFF's default resolution is 72 per inch, so one is always written). */
  resolution?: { xPerUnit: number; yPerUnit: number; unit: 'inch' | 'cm' | 'none' };
  /** Rows per strip, >= 1; default the rows that fit in 64 KiB (at least 1). */
  rowsPerStrip?: number;
  /**
   * 'none' (default) or 'deflate': Adobe deflate (Compression 8, zlib stream per strip,
   * TIFF Technical Note 2 / the Adobe PageMaker 6.0 TIFF Technical Notes) with the
   * horizontal-differencing predictor (Predictor 2, TIFF 6.0 section 14) for uint16;
   * float32 is deflated without a predictor.
   */
  compression?: 'none' | 'deflate';
}

const TYPE_ASCII = 2;
const TYPE_SHORT = 3;
const TYPE_LONG = 4;
const TYPE_RATIONAL = 5;
const UNIT_CODE = { none: 1, inch: 2, cm: 3 } as const;
const UINT32_MAX = 0xffffffff;

interface Entry {
  tag: number;
  type: number;
  count: number;
  /** Values: numbers for SHORT/LONG, [numerator, denominator] pairs flattened for RATIONAL, bytes for ASCII. */
  shorts?: number[];
  longs?: number[];
  rational?: [number, number];
  ascii?: Uint8Array;
}

/** Bytes of an ASCII field: the text and a terminating NUL. @throws RangeError naming the field and the first bad character */
function asciiBytes(text: string, field: string): Uint8Array {
  if (typeof text !== 'string') throw new TypeError(`${field} must be a string; got ${String(text)}`);
  const bytes = new Uint8Array(text.length + 1);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 0 || c > 127) {
      throw new RangeError(
        `${field} must be 7-bit ASCII without NUL (the TIFF ASCII type); character ${i} is U+${c.toString(16).toUpperCase().padStart(4, '0')}: write it with ASCII only (e.g. \\u escapes)`,
      );
    }
    bytes[i] = c;
  }
  return bytes;
}

/**
 * The closest fraction n/d to `value` (> 0) with n and d below 2^32, from the continued
 * fraction's convergents (e.g. A. Ya. Khinchin, Continued Fractions, 1964, from memory).
 */
export function tiffRational(value: number, field = 'value'): [number, number] {
  if (!(value > 0) || !Number.isFinite(value) || value > UINT32_MAX) {
    throw new RangeError(`${field} must be a finite number > 0 and below 2^32; got ${value}`);
  }
  let [p0, q0, p1, q1] = [0, 1, 1, 0];
  let x = value;
  for (let i = 0; i < 64; i++) {
    const a = Math.floor(x);
    const p2 = a * p1 + p0;
    const q2 = a * q1 + q0;
    if (p2 > UINT32_MAX || q2 > UINT32_MAX) break;
    [p0, q0, p1, q1] = [p1, q1, p2, q2];
    const frac = x - a;
    if (frac < 1e-15 || p1 / q1 === value) break;
    x = 1 / frac;
  }
  if (q1 === 0) return [Math.round(value), 1];
  return [p1, q1];
}

/**
 * The TIFF file of `raster`.
 * @param raster width x height samples, row-major (pixel (i, j) at data[j * width + i])
 * @returns the file's bytes
 * @throws RangeError for a bad size, a sample uint16 cannot hold, non-ASCII text, a bad
 *   resolution or rowsPerStrip, or a file past 4 GiB (classic TIFF's offsets are 32-bit)
 */
export function encodeTiff(raster: Raster, options: TiffEncodeOptions = {}): Uint8Array {
  const { width, height, data } = raster;
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1) {
    throw new RangeError(`raster width and height must be integers >= 1; got ${width} x ${height}`);
  }
  if (!data || data.length !== width * height) {
    throw new RangeError(`raster data must hold width x height = ${width * height} samples; got ${data ? data.length : String(data)}`);
  }
  const format = options.sampleFormat ?? 'uint16';
  if (format !== 'uint16' && format !== 'float32') throw new RangeError(`sampleFormat must be 'uint16' or 'float32'; got ${JSON.stringify(format)}`);
  const bytesPerSample = format === 'uint16' ? 2 : 4;
  const rowBytes = width * bytesPerSample;
  const rowsPerStrip = options.rowsPerStrip ?? Math.max(1, Math.floor(65536 / rowBytes));
  if (!Number.isInteger(rowsPerStrip) || rowsPerStrip < 1) throw new RangeError(`rowsPerStrip must be an integer >= 1; got ${rowsPerStrip}`);
  const stripCount = Math.ceil(height / rowsPerStrip);
  const resolution = options.resolution ?? { xPerUnit: 1, yPerUnit: 1, unit: 'none' as const };
  if (!(resolution.unit in UNIT_CODE)) throw new RangeError(`resolution.unit must be 'inch', 'cm' or 'none'; got ${JSON.stringify(resolution.unit)}`);

  const compression = options.compression ?? 'none';
  if (compression !== 'none' && compression !== 'deflate') throw new RangeError(`compression must be 'none' or 'deflate'; got ${JSON.stringify(compression)}`);
  const predictor = compression === 'deflate' && format === 'uint16';
  const strips: Uint8Array[] = [];
  for (let st = 0; st < stripCount; st++) {
    const rows = Math.min(rowsPerStrip, height - st * rowsPerStrip);
    const raw = stripSamples(data, width, st * rowsPerStrip, rows, format, predictor);
    strips.push(compression === 'deflate' ? deflate(raw) : raw);
  }
  const stripByteCounts = strips.map((b) => b.length);
  const entries: Entry[] = [
    { tag: 256, type: TYPE_LONG, count: 1, longs: [width] },
    { tag: 257, type: TYPE_LONG, count: 1, longs: [height] },
    { tag: 258, type: TYPE_SHORT, count: 1, shorts: [8 * bytesPerSample] },
    { tag: 259, type: TYPE_SHORT, count: 1, shorts: [compression === 'deflate' ? 8 : 1] },
    { tag: 262, type: TYPE_SHORT, count: 1, shorts: [1] },
  ];
  if (options.description !== undefined) {
    const ascii = asciiBytes(options.description, 'description (ImageDescription)');
    entries.push({ tag: 270, type: TYPE_ASCII, count: ascii.length, ascii });
  }
  const stripOffsets: Entry = { tag: 273, type: TYPE_LONG, count: stripCount, longs: new Array<number>(stripCount).fill(0) };
  entries.push(
    stripOffsets,
    { tag: 277, type: TYPE_SHORT, count: 1, shorts: [1] },
    { tag: 278, type: TYPE_LONG, count: 1, longs: [rowsPerStrip] },
    { tag: 279, type: TYPE_LONG, count: stripCount, longs: stripByteCounts },
    { tag: 282, type: TYPE_RATIONAL, count: 1, rational: tiffRational(resolution.xPerUnit, 'resolution.xPerUnit') },
    { tag: 283, type: TYPE_RATIONAL, count: 1, rational: tiffRational(resolution.yPerUnit, 'resolution.yPerUnit') },
    { tag: 296, type: TYPE_SHORT, count: 1, shorts: [UNIT_CODE[resolution.unit]] },
  );
  if (options.software !== undefined) {
    const ascii = asciiBytes(options.software, 'software (Software)');
    entries.push({ tag: 305, type: TYPE_ASCII, count: ascii.length, ascii });
  }
  if (predictor) entries.push({ tag: 317, type: TYPE_SHORT, count: 1, shorts: [2] });
  entries.push({ tag: 339, type: TYPE_SHORT, count: 1, shorts: [format === 'uint16' ? 1 : 3] });

  const valueBytes = (e: Entry): number => (e.ascii ? e.ascii.length : e.rational ? 8 : e.count * (e.type === TYPE_SHORT ? 2 : 4));
  const ifdOffset = 8;
  const ifdSize = 2 + 12 * entries.length + 4;
  let cursor = ifdOffset + ifdSize;
  const outOfLine = new Map<Entry, number>();
  for (const e of entries) {
    if (valueBytes(e) > 4) {
      outOfLine.set(e, cursor);
      cursor += valueBytes(e);
      cursor += cursor & 1; // word boundary (TIFF 6.0: values begin on a word boundary)
    }
  }
  const pixelStart = cursor;
  const totalBytes = pixelStart + stripByteCounts.reduce((a, b) => a + b + (b & 1), 0);
  if (totalBytes > UINT32_MAX) throw new RangeError(`a ${width} x ${height} ${format} image needs ${totalBytes} bytes, past the 4 GiB of a classic TIFF`);
  let stripAt = pixelStart;
  for (let st = 0; st < stripCount; st++) {
    stripOffsets.longs![st] = stripAt;
    stripAt += stripByteCounts[st]! + (stripByteCounts[st]! & 1);
  }

  const bytes = new Uint8Array(totalBytes);
  const view = new DataView(bytes.buffer);
  view.setUint16(0, 0x4949, false); // "II"
  view.setUint16(2, 42, true);
  view.setUint32(4, ifdOffset, true);
  view.setUint16(ifdOffset, entries.length, true);
  const writeValues = (e: Entry, at: number): void => {
    if (e.ascii) bytes.set(e.ascii, at);
    else if (e.rational) {
      view.setUint32(at, e.rational[0], true);
      view.setUint32(at + 4, e.rational[1], true);
    } else if (e.shorts) e.shorts.forEach((v, k) => view.setUint16(at + 2 * k, v, true));
    else e.longs!.forEach((v, k) => view.setUint32(at + 4 * k, v, true));
  };
  entries.forEach((e, k) => {
    const at = ifdOffset + 2 + 12 * k;
    view.setUint16(at, e.tag, true);
    view.setUint16(at + 2, e.type, true);
    view.setUint32(at + 4, e.count, true);
    const far = outOfLine.get(e);
    if (far === undefined) writeValues(e, at + 8);
    else {
      view.setUint32(at + 8, far, true);
      writeValues(e, far);
    }
  });
  view.setUint32(ifdOffset + 2 + 12 * entries.length, 0, true);

  strips.forEach((b, st) => bytes.set(b, stripOffsets.longs![st]!));
  return bytes;
}

/**
 * Little-endian samples of `rows` rows from `row0`; with `predictor`, each uint16 row as
 * differences from the sample to its left, modulo 2^16 (TIFF 6.0 section 14, Predictor 2).
 * @throws RangeError for a uint16 sample that is not an integer from 0 to 65535
 */
function stripSamples(data: Float32Array, width: number, row0: number, rows: number, format: 'uint16' | 'float32', predictor: boolean): Uint8Array {
  const out = new Uint8Array(rows * width * (format === 'uint16' ? 2 : 4));
  const view = new DataView(out.buffer);
  for (let r = 0; r < rows; r++) {
    const base = (row0 + r) * width;
    let left = 0;
    for (let i = 0; i < width; i++) {
      const v = data[base + i]!;
      const at = r * width + i;
      if (format === 'float32') {
        view.setFloat32(4 * at, v, true);
        continue;
      }
      if (!(v >= 0 && v <= 65535) || v !== Math.floor(v)) {
        throw new RangeError(
          `pixel (${i}, ${row0 + r}) = ${v} is not an integer from 0 to 65535; round and clip the data first, or write sampleFormat 'float32'`,
        );
      }
      view.setUint16(2 * at, predictor ? (v - left) & 0xffff : v, true);
      left = v;
    }
  }
  return out;
}
