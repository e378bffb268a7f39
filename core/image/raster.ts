/**
 * A camera image as core/ sees it: one channel of float samples, row-major,
 * pixel (column i, row j) at data[j * width + i] with its centre at x = i, y = j.
 *
 * Float32 holds every integer up to 2^24 exactly, so 8- and 16-bit camera data
 * keep their full range; 32-bit integer counts above 2^24 are rounded to 24
 * significant bits (far below the shot noise at such counts).
 */
export interface Raster {
  width: number;
  height: number;
  data: Float32Array;
}

/** What the file said about itself, kept alongside the pixels. */
export interface ImageInfo {
  /** Container format. */
  format: 'tiff' | 'png' | 'jpeg';
  /** Bits per sample as stored (1 to 16 for PNG, 8 for JPEG, 8/16/32/64 for TIFF; palette PNG: bits per index). */
  bitsPerSample: number;
  /** How samples were stored. */
  sampleFormat: 'uint' | 'int' | 'float';
  /** Channels as stored: 1 gray (or a palette index, see `palette`), 2 gray+alpha, 3 RGB, 4 RGBA. */
  channels: number;
  /** Page (TIFF directory) that was read, 0-based, and how many the file has. */
  page: number;
  pageCount: number;
  /**
   * Resolution the file declares, pixels per unit, when it declares one (TIFF
   * X/YResolution and ResolutionUnit; PNG pHYs, whose pixels per metre are given here
   * per cm; JPEG JFIF density). Unit 'none' gives only the pixel aspect ratio.
   */
  resolution?: { xPerUnit: number; yPerUnit: number; unit: 'inch' | 'cm' | 'none' };
  /**
   * Free text the file carries, by key: TIFF tags by their TIFF 6.0 names
   * ('ImageDescription', 'Software', 'DateTime', 'Artist', 'Make', 'Model', ...),
   * PNG tEXt/zTXt/iTXt by keyword, a JPEG COM segment as 'Comment'.
   */
  text: Record<string, string>;
  /** Notes for the user (e.g. "RGB reduced to luminance"). */
  warnings: string[];
  /**
   * How the pixel data were coded, for the record: TIFF 'none' | 'lzw' | 'deflate' |
   * 'packbits' (with '+predictor-2' or '+predictor-3' appended when a predictor was
   * undone), PNG 'deflate' or 'deflate+adam7' (interlaced), JPEG 'baseline' |
   * 'extended' | 'progressive'.
   */
  compression?: string;
  /** Byte order of a TIFF ('little' for II, 'big' for MM); absent for PNG and JPEG. */
  byteOrder?: 'little' | 'big';
  /** How a TIFF lays out its pixel data; absent for PNG and JPEG. */
  layout?: 'strips' | 'tiles';
  /** Palette (indexed-colour) image: the indices were mapped through the palette. */
  palette?: boolean;
}

export interface DecodedImage {
  raster: Raster;
  info: ImageInfo;
}
