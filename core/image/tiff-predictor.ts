/**
 * Undoing what TIFF writers do to samples before compression: byte order and the
 * two predictors. All functions work in place on one decoded strip or tile, whose
 * buffer starts at offset 0 of its own ArrayBuffer (so typed views are aligned).
 */

/** True on the little-endian machines Annula runs on (x86, ARM); checked, not assumed. */
export const PLATFORM_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Reverses the bytes of every `bytesPerSample`-byte sample in `buf` (2, 4 or 8). */
export function swapSampleBytes(buf: Uint8Array, bytesPerSample: number): void {
  const n = buf.length - (buf.length % bytesPerSample);
  for (let i = 0; i < n; i += bytesPerSample) {
    for (let a = i, b = i + bytesPerSample - 1; a < b; a++, b--) {
      const t = buf[a]!;
      buf[a] = buf[b]!;
      buf[b] = t;
    }
  }
}

/**
 * Predictor 2, horizontal differencing (TIFF Revision 6.0, section 14): each sample
 * was stored as its difference from the same channel `stride` samples to the left,
 * modulo 2^bits, restarting at every row of the strip or tile. Undone by a running sum
 * on the unsigned integer view of the samples, whatever their SampleFormat: libtiff
 * (the reference implementation) differences the raw words of float samples too.
 * Samples must already be in platform byte order.
 *
 * @param rowSamples samples in one row of the segment (segment width x samples per pixel in it)
 * @param stride samples per pixel in the segment (1 for planar configuration 2)
 */
export function undoHorizontalDifferencing(
  buf: Uint8Array,
  bytesPerSample: number,
  rowSamples: number,
  rows: number,
  stride: number,
): void {
  const count = rowSamples * rows;
  if (bytesPerSample === 8) {
    const v = new BigUint64Array(buf.buffer, buf.byteOffset, count);
    const mask = (1n << 64n) - 1n;
    for (let r = 0; r < rows; r++) {
      const end = (r + 1) * rowSamples;
      for (let i = r * rowSamples + stride; i < end; i++) v[i] = (v[i]! + v[i - stride]!) & mask;
    }
    return;
  }
  const v =
    bytesPerSample === 1
      ? buf.subarray(0, count)
      : bytesPerSample === 2
        ? new Uint16Array(buf.buffer, buf.byteOffset, count)
        : new Uint32Array(buf.buffer, buf.byteOffset, count);
  // Typed-array stores wrap modulo 2^bits, which is the arithmetic the predictor needs.
  for (let r = 0; r < rows; r++) {
    const end = (r + 1) * rowSamples;
    for (let i = r * rowSamples + stride; i < end; i++) v[i] = v[i]! + v[i - stride]!;
  }
}

/**
 * Predictor 3, floating-point horizontal differencing (Adobe Photoshop TIFF Technical
 * Note 3, April 2005, from memory; checked here against files libtiff writes): each row's samples were split into byte
 * planes, most significant byte first, and the bytes of the row differenced with a
 * stride of the samples per pixel. Undone by a running byte sum, then by gathering
 * each sample's bytes back into platform order. The file's byte order plays no part.
 *
 * @param scratch a buffer of at least rowSamples x bytesPerSample bytes
 */
export function undoFloatingPointPredictor(
  buf: Uint8Array,
  bytesPerSample: number,
  rowSamples: number,
  rows: number,
  stride: number,
  scratch: Uint8Array,
): void {
  const rowBytes = rowSamples * bytesPerSample;
  for (let r = 0; r < rows; r++) {
    const row = buf.subarray(r * rowBytes, (r + 1) * rowBytes);
    for (let i = stride; i < rowBytes; i++) row[i] = (row[i]! + row[i - stride]!) & 0xff;
    scratch.set(row);
    for (let s = 0; s < rowSamples; s++) {
      for (let b = 0; b < bytesPerSample; b++) {
        // Plane b holds byte b, counted from the most significant, of every sample.
        const target = PLATFORM_LITTLE_ENDIAN ? bytesPerSample - 1 - b : b;
        row[s * bytesPerSample + target] = scratch[b * rowSamples + s]!;
      }
    }
  }
}
