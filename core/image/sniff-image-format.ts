import { ImageDecodeError } from './image-decode-error';

/** The formats Annula decodes. */
export type ImageFormat = 'tiff' | 'png' | 'jpeg';

const ADVICE = 'export the image as TIFF, PNG or JPEG';

function startsWith(bytes: Uint8Array, magic: number[], at = 0): boolean {
  if (bytes.length < at + magic.length) return false;
  for (let i = 0; i < magic.length; i++) if (bytes[at + i] !== magic[i]) return false;
  return true;
}

function ascii(text: string): number[] {
  return [...text].map((c) => c.charCodeAt(0));
}

/** Image formats that are recognised but not read, by their signatures (each format's own specification). */
const OTHER_IMAGES: Array<{ what: string; magic: number[]; at?: number }> = [
  { what: 'a GIF image', magic: ascii('GIF8') },
  { what: 'a BMP image', magic: ascii('BM') },
  { what: 'a WebP image', magic: ascii('WEBP'), at: 8 },
  { what: 'a JPEG 2000 image', magic: [0, 0, 0, 12, 0x6a, 0x50, 0x20, 0x20] },
  { what: 'a JPEG 2000 codestream', magic: [0xff, 0x4f, 0xff, 0x51] },
  { what: 'a JPEG XL image', magic: [0xff, 0x0a] },
  { what: 'a JPEG XL image', magic: [0, 0, 0, 12, 0x4a, 0x58, 0x4c, 0x20] },
  { what: 'an OpenEXR image', magic: [0x76, 0x2f, 0x31, 0x01] },
  { what: 'a FITS file', magic: ascii('SIMPLE  =') },
  { what: 'an HDF5 file', magic: [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a] },
  { what: 'a DICOM file', magic: ascii('DICM'), at: 128 },
];

/** Files that are not images at all. */
const NON_IMAGES: Array<{ what: string; magic: number[] }> = [
  { what: 'a PDF document', magic: ascii('%PDF') },
  { what: 'a ZIP archive', magic: [0x50, 0x4b, 0x03, 0x04] },
  { what: 'a gzip archive', magic: [0x1f, 0x8b] },
];

/** True when the first bytes read as text: printable ASCII, tabs, line ends, or UTF-8 lead/continuation bytes. */
function looksLikeText(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.length, 512);
  for (let i = 0; i < n; i++) {
    const b = bytes[i]!;
    if (b < 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d) return false;
    if (b === 0x7f) return false;
  }
  return true;
}

/**
 * Which format `bytes` hold, from their first bytes (never from a file name):
 * TIFF "II*\0" / "MM\0*" (BigTIFF "II+\0" / "MM\0+"), PNG's 8-byte signature, JPEG's
 * SOI marker followed by another marker.
 * @throws ImageDecodeError 'empty' for no bytes, 'unsupported' for another image format,
 *   'not-an-image' for anything else (the message says what the file looks like)
 */
export function sniffImageFormat(bytes: Uint8Array, name: string): ImageFormat {
  if (bytes.length === 0) {
    throw new ImageDecodeError(name, 'empty', 'the file is empty (0 bytes)', 'check that the copy or export finished');
  }
  if (startsWith(bytes, [0x49, 0x49, 0x2a, 0x00]) || startsWith(bytes, [0x4d, 0x4d, 0x00, 0x2a])) return 'tiff';
  if (startsWith(bytes, [0x49, 0x49, 0x2b, 0x00]) || startsWith(bytes, [0x4d, 0x4d, 0x00, 0x2b])) return 'tiff';
  if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'png';
  if (startsWith(bytes, [0xff, 0xd8, 0xff])) return 'jpeg';
  for (const { what, magic, at } of OTHER_IMAGES) {
    if (startsWith(bytes, magic, at)) {
      throw new ImageDecodeError(name, 'unsupported', `the file is ${what}, which Annula does not read`, ADVICE);
    }
  }
  for (const { what, magic } of NON_IMAGES) {
    if (startsWith(bytes, magic)) throw new ImageDecodeError(name, 'not-an-image', `the file is ${what}, not an image`, ADVICE);
  }
  if (looksLikeText(bytes)) {
    throw new ImageDecodeError(name, 'not-an-image', 'the file holds text, not an image', 'choose the image file itself (TIFF, PNG or JPEG)');
  }
  const head = [...bytes.subarray(0, 8)].map((b) => b.toString(16).padStart(2, '0')).join(' ');
  throw new ImageDecodeError(name, 'not-an-image', `the file is not a TIFF, PNG or JPEG image (it starts with bytes ${head})`, ADVICE);
}
