/**
 * Hot pixels: a few detector elements that read high whatever the exposure. Positions
 * are distinct pixels drawn uniformly over the image, values integers drawn uniformly
 * from [minAdu, maxAdu]; both from one seeded stream, positions first.
 */

import type { RandomStream } from './seeded-random';

export interface HotPixel {
  xPx: number;
  yPx: number;
  adu: number;
}

/**
 * `count` distinct hot pixels in a `width` x `height` image (count at most a tenth of
 * the pixels, so the rejection of repeats ends quickly), in the order drawn.
 */
export function drawHotPixels(count: number, width: number, height: number, minAdu: number, maxAdu: number, random: RandomStream): HotPixel[] {
  if (!Number.isInteger(count) || count < 0 || count > (width * height) / 10) {
    throw new RangeError(`hot pixel count must be an integer from 0 to a tenth of the ${width * height} pixels; got ${count}`);
  }
  const taken = new Set<number>();
  const positions: number[] = [];
  while (positions.length < count) {
    const index = Math.floor(random.uniform() * width * height);
    if (taken.has(index)) continue;
    taken.add(index);
    positions.push(index);
  }
  return positions.map((index) => ({
    xPx: index % width,
    yPx: Math.floor(index / width),
    adu: minAdu + Math.floor(random.uniform() * (maxAdu - minAdu + 1)),
  }));
}
