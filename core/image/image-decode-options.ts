/** Options every decoder in core/image takes. */
export interface ImageDecodeOptions {
  /** TIFF page (image file directory) to read, 0-based; default 0. PNG and JPEG have only page 0. */
  page?: number;
  /** Refuse images whose declared width x height is above this, before allocating; default DEFAULT_MAX_PIXELS (4e8). */
  maxPixels?: number;
  /** How messages name the source, usually the file path; default 'image'. */
  name?: string;
}

/** The options with their defaults filled in and checked. */
export type ResolvedImageDecodeOptions = Required<ImageDecodeOptions>;
