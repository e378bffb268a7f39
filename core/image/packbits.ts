/**
 * PackBits (TIFF compression 32773), decoded from one strip or tile.
 *
 * TIFF Revision 6.0 (Adobe, 1992), section 9 "PackBits Compression": read a header
 * byte n as a signed 8-bit number; 0..127 copies the next n + 1 bytes literally,
 * -127..-1 repeats the next byte 1 - n times, -128 is a no-op.
 *
 * Fifteen lines of glue-sized code; no maintained npm package offers it as a
 * stand-alone, bounds-checked function (the TIFF packages keep it internal).
 */
import type { SegmentDecodeResult } from './segment-decode-result';

/**
 * Decodes `src` into `out`, stopping when `out` is full. A run or literal that
 * needs more input than `src` holds is reported as a problem.
 */
export function decodePackBits(src: Uint8Array, out: Uint8Array): SegmentDecodeResult {
  let i = 0;
  let pos = 0;
  const outLength = out.length;
  while (i < src.length && pos < outLength) {
    const n = (src[i++]! << 24) >> 24;
    if (n >= 0) {
      const count = n + 1;
      if (i + count > src.length) {
        return { bytesWritten: pos, problem: `a PackBits literal of ${count} bytes runs past the end of the segment` };
      }
      const take = Math.min(count, outLength - pos);
      out.set(src.subarray(i, i + take), pos);
      pos += take;
      i += count;
    } else if (n !== -128) {
      if (i >= src.length) {
        return { bytesWritten: pos, problem: 'a PackBits run has no byte to repeat' };
      }
      const take = Math.min(1 - n, outLength - pos);
      out.fill(src[i++]!, pos, pos + take);
      pos += take;
    }
  }
  return { bytesWritten: pos };
}
