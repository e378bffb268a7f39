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
  const n = width * height;
  masks.forEach((m, k) => {
    if (m.width !== width || m.height !== height || m.excluded.length !== n) {
      throw new RangeError(`masks[${k}] is ${m.width} x ${m.height}; every mask must be ${width} x ${height}`);
    }
  });
  const excluded = new Uint8Array(n);
  // Four flags at a time where every input is 4-byte aligned: OR the words, then make each
  // non-zero byte 1 (see nonZeroBytes); the last n mod 4 flags one by one.
  const words = masks.every((m) => (m.excluded.byteOffset & 3) === 0) ? n >>> 2 : 0;
  if (words > 0) {
    const out = new Uint32Array(excluded.buffer, 0, words);
    for (const m of masks) {
      const e = new Uint32Array(m.excluded.buffer, m.excluded.byteOffset, words);
      for (let w = 0; w < words; w++) out[w] |= e[w]!;
    }
    for (let w = 0; w < words; w++) out[w] = nonZeroBytes(out[w]!);
  }
  for (const m of masks) {
    const e = m.excluded;
    for (let p = 4 * words; p < n; p++) if (e[p]) excluded[p] = 1;
  }
  return { width, height, excluded };
}

/**
 * Each byte of a 32-bit word made 1 when it is non-zero, 0 when it is zero:
 * (b & 0x7f) + 0x7f sets bit 7 of a byte exactly when its low seven bits are
 * not all zero, without carrying into the next byte; or-ing b adds its own bit 7.
 */
function nonZeroBytes(x: number): number {
  return ((((x & 0x7f7f7f7f) + 0x7f7f7f7f) | x) & 0x80808080) >>> 7;
}

/** Number of excluded pixels. */
export function countExcluded(mask: PixelMask): number {
  let n = 0;
  const e = mask.excluded;
  const words = (e.byteOffset & 3) === 0 ? e.length >>> 2 : 0;
  if (words > 0) {
    const w32 = new Uint32Array(e.buffer, e.byteOffset, words);
    // The four 0/1 bytes of a word summed in its top byte by one multiplication.
    for (let w = 0; w < words; w++) {
      const x = w32[w]!;
      if (x !== 0) n += Math.imul(nonZeroBytes(x), 0x01010101) >>> 24;
    }
  }
  for (let p = 4 * words; p < e.length; p++) if (e[p]) n++;
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
