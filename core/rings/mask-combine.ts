/**
 * Union of pixel masks, and the count of excluded pixels. Each mask step
 * (saturated, hot pixels, beam stop, user polygons) produces its own mask so
 * the app can show and toggle them; every measurement then uses their union.
 */
import type { PixelMask } from './pixel-mask';

/**
 * A pixel is excluded in the result when any input excludes it.
 * @param masks one or more masks of one size (not mutated)
 * @throws RangeError when no mask is given or the sizes differ
 */
export function combineMasks(...masks: PixelMask[]): PixelMask {
  if (masks.length === 0) throw new RangeError('combineMasks needs at least one mask; got none');
  const { width, height } = masks[0]!;
  const excluded = new Uint8Array(width * height);
  masks.forEach((m, k) => {
    if (m.width !== width || m.height !== height || m.excluded.length !== width * height) {
      throw new RangeError(`masks[${k}] is ${m.width} x ${m.height}; every mask must be ${width} x ${height}`);
    }
    const e = m.excluded;
    for (let p = 0; p < e.length; p++) if (e[p]) excluded[p] = 1;
  });
  return { width, height, excluded };
}

/** Number of excluded pixels. */
export function countExcluded(mask: PixelMask): number {
  let n = 0;
  const e = mask.excluded;
  for (let p = 0; p < e.length; p++) if (e[p]) n++;
  return n;
}

/**
 * Checks that a mask matches an image of width x height.
 * @throws RangeError naming the parameter and both sizes
 */
export function checkMaskSize(mask: PixelMask, width: number, height: number, name = 'mask'): void {
  if (mask.width !== width || mask.height !== height || mask.excluded.length !== width * height) {
    throw new RangeError(`${name} is ${mask.width} x ${mask.height} (${mask.excluded.length} flags); the image is ${width} x ${height}: build the mask from this image`);
  }
}
