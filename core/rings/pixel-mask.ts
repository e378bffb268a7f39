/**
 * Which pixels every measurement must ignore: excluded[j * width + i] = 1 for
 * pixel (i, j) (saturated, hot, beam stop, user polygons), 0 otherwise.
 */
export interface PixelMask {
  width: number;
  height: number;
  excluded: Uint8Array;
}

/** A mask that excludes nothing. */
export function emptyMask(width: number, height: number): PixelMask {
  return { width, height, excluded: new Uint8Array(width * height) };
}
