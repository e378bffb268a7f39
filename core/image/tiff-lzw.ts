/**
 * TIFF's LZW (compression 5), decoded from one strip or tile.
 *
 * TIFF Revision 6.0 (Adobe, 1992), section 13 "LZW Compression": codes are read
 * most-significant bit first, start 9 bits wide and grow to at most 12; code 256
 * clears the table, 257 ends the information, new strings start at 258. The width
 * grows one code early (when the next free code reaches 511, 1023, 2047), as every
 * TIFF writer since libtiff does.
 *
 * Written here rather than taken from a package: the pure-JS TIFF readers on npm
 * either hide their LZW behind an `exports` map (tiff 7.1.3, geotiff 3.0.5) or do
 * not report a damaged stream (given a strip whose second half was overwritten with
 * 0xFF bytes, utif2 4.1.0 never returns and utif 3.1.0 returns wrong pixels without a
 * word; tried when this module was written). This one never reads or writes outside
 * its arrays and says when a stream is damaged.
 */

import type { SegmentDecodeResult } from './segment-decode-result';

const CLEAR = 256;
const END = 257;
const FIRST_FREE = 258;
const TABLE_SIZE = 4096;

// One table per module, reused: prefix code, last byte, first byte and length of each string.
const prefix = new Int16Array(TABLE_SIZE);
const suffix = new Uint8Array(TABLE_SIZE);
const first = new Uint8Array(TABLE_SIZE);
const length = new Uint16Array(TABLE_SIZE);
for (let i = 0; i < 256; i++) {
  prefix[i] = -1;
  suffix[i] = i;
  first[i] = i;
  length[i] = 1;
}

/**
 * True when the segment starts like the pre-1991 "old-style" LZW (least-significant
 * bit first), which libtiff recognises by a first byte 0 and an odd second byte.
 */
export function isOldStyleLzw(src: Uint8Array): boolean {
  return src.length >= 2 && src[0] === 0 && (src[1]! & 1) === 1;
}

/**
 * Decodes `src` into `out`, stopping when `out` is full or at the end code.
 * Bytes past `out.length` are dropped (some writers pad); fewer bytes than
 * `out.length` are reported by `bytesWritten` for the caller to judge.
 */
export function decodeTiffLzw(src: Uint8Array, out: Uint8Array): SegmentDecodeResult {
  const totalBits = src.length * 8;
  const outLength = out.length;
  let bitPos = 0;
  let width = 9;
  let next = FIRST_FREE;
  let old = -1;
  let pos = 0;
  while (pos < outLength && bitPos + width <= totalBits) {
    const byte = bitPos >>> 3;
    const window = (src[byte]! << 16) | ((src[byte + 1] ?? 0) << 8) | (src[byte + 2] ?? 0);
    const code = (window >>> (24 - (bitPos & 7) - width)) & ((1 << width) - 1);
    bitPos += width;
    if (code === END) break;
    if (code === CLEAR) {
      width = 9;
      next = FIRST_FREE;
      old = -1;
      continue;
    }
    if (old === -1) {
      if (code > 255) return { bytesWritten: pos, problem: `LZW code ${code} where a literal byte must follow a clear code` };
      out[pos++] = code;
      old = code;
      continue;
    }
    let firstByte: number;
    if (code < next) {
      // Known string: write it back to front along its prefix chain.
      const n = length[code]!;
      let c = code;
      for (let p = pos + n - 1; p >= pos; p--) {
        if (p < outLength) out[p] = suffix[c]!;
        c = prefix[c]!;
      }
      pos += n;
      firstByte = first[code]!;
    } else if (code === next && next < TABLE_SIZE) {
      // The one code not yet in the table: old string + its own first byte.
      const n = length[old]!;
      let c = old;
      for (let p = pos + n - 1; p >= pos; p--) {
        if (p < outLength) out[p] = suffix[c]!;
        c = prefix[c]!;
      }
      if (pos + n < outLength) out[pos + n] = first[old]!;
      pos += n + 1;
      firstByte = first[old]!;
    } else {
      return { bytesWritten: Math.min(pos, outLength), problem: `LZW code ${code} is beyond the table's ${next} entries` };
    }
    if (next < TABLE_SIZE) {
      prefix[next] = old;
      suffix[next] = firstByte;
      first[next] = first[old]!;
      length[next] = length[old]! + 1;
      next++;
      if (next >= (1 << width) - 1 && width < 12) width++;
    }
    old = code;
  }
  return { bytesWritten: Math.min(pos, outLength) };
}
