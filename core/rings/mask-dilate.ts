/**
 * Grows the excluded region of a mask by a margin: a pixel becomes excluded when
 * an excluded pixel lies within `radiusPx` of it in the Chebyshev (chessboard)
 * metric, i.e. dilation by a (2r+1) x (2r+1) square. The square is separable
 * (a row pass tracking the nearest excluded pixel on either side, then a column
 * pass keeping a running count per column; O(width x height) whatever r, rows
 * without any excluded pixel skipped), and it is the conservative choice
 * for a safety margin: it covers the disc of radius r.
 */
import type { PixelMask } from './pixel-mask';

/**
 * @param mask the mask to grow (not mutated)
 * @param radiusPx margin in whole pixels, integer >= 0 (0 returns a copy)
 * @returns a new mask of the same size
 * @throws RangeError when radiusPx is not a non-negative integer
 */
export function dilateMask(mask: PixelMask, radiusPx: number): PixelMask {
  if (!Number.isInteger(radiusPx) || radiusPx < 0) {
    throw new RangeError(`radiusPx must be a non-negative integer number of pixels; got ${radiusPx}`);
  }
  const { width, height } = mask;
  if (radiusPx === 0) return { width, height, excluded: Uint8Array.from(mask.excluded) };
  const rows = new Uint8Array(width * height);
  const line = new Uint8Array(width);
  const grown = new Uint8Array(width);
  for (let j = 0; j < height; j++) {
    const base = j * width;
    let any = false;
    for (let i = 0; i < width; i++) if (mask.excluded[base + i]) { any = true; break; }
    if (!any) continue;
    line.set(mask.excluded.subarray(base, base + width));
    dilateLine(line, grown, width, radiusPx);
    rows.set(grown, base);
  }
  // Column pass, row by row (sequential memory): count[i] is the number of set pixels
  // of column i among rows j - r .. j + r of the row-dilated mask.
  const out = new Uint8Array(width * height);
  const count = new Int32Array(width);
  const rowHasAny = new Uint8Array(height);
  for (let j = 0; j < height; j++) {
    const base = j * width;
    for (let i = 0; i < width; i++) if (rows[base + i]) { rowHasAny[j] = 1; break; }
  }
  const add = (j: number, sign: number) => {
    if (j < 0 || j >= height || !rowHasAny[j]) return;
    const base = j * width;
    for (let i = 0; i < width; i++) if (rows[base + i]) count[i] += sign;
  };
  for (let j = 0; j < Math.min(radiusPx, height); j++) add(j, 1);
  let live = 0;
  for (let j = 0; j < Math.min(radiusPx, height); j++) live += rowHasAny[j]!;
  for (let j = 0; j < height; j++) {
    add(j + radiusPx, 1);
    if (j + radiusPx < height) live += rowHasAny[j + radiusPx]!;
    if (live > 0) {
      const base = j * width;
      for (let i = 0; i < width; i++) if (count[i]! > 0) out[base + i] = 1;
    }
    add(j - radiusPx, -1);
    if (j - radiusPx >= 0) live -= rowHasAny[j - radiusPx]!;
  }
  return { width, height, excluded: out };
}

/** out[k] = 1 when some line[k'] is set with |k - k'| <= r, for k < n. */
function dilateLine(line: Uint8Array, out: Uint8Array, n: number, r: number): void {
  let last = -Infinity;
  let next = -1;
  for (let k = 0; k < n; k++) {
    if (line[k]) last = k;
    if (next < k) {
      next = k;
      while (next < n && !line[next]) next++;
    }
    out[k] = k - last <= r || (next < n && next - k <= r) ? 1 : 0;
  }
}
