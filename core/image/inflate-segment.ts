/**
 * zlib-wrapped deflate (RFC 1950 around RFC 1951) into a buffer of known size, through
 * pako's port of zlib's own inflate (https://github.com/nodeca/pako), driven at its
 * low level so it writes straight into the caller's buffer and never past it: a small
 * stream that claims gigabytes cannot allocate them. zlib's own checks apply (invalid
 * block types and distances, the Adler-32 check value when the stream is read to its end).
 */
import { Z_DATA_ERROR, Z_FINISH, Z_NEED_DICT, Z_STREAM_END, Z_STREAM_ERROR, ZStream, zlibInflate, zlibInflateEnd, zlibInflateInit } from 'pako';
import type { SegmentDecodeResult } from './segment-decode-result';

/**
 * Inflates `src` into `out`. Stops when `out` is full (the rest of the stream is not
 * read); fewer bytes than `out.length` means the stream ended early.
 */
export function inflateSegment(src: Uint8Array, out: Uint8Array<ArrayBuffer>): SegmentDecodeResult {
  const stream = new ZStream();
  zlibInflateInit(stream);
  stream.input = src;
  stream.next_in = 0;
  stream.avail_in = src.length;
  stream.output = out;
  stream.next_out = 0;
  stream.avail_out = out.length;
  const status = zlibInflate(stream, Z_FINISH);
  zlibInflateEnd(stream);
  if (status === Z_DATA_ERROR || status === Z_STREAM_ERROR || status === Z_NEED_DICT) {
    return { bytesWritten: stream.total_out, problem: `the deflate stream is damaged (${stream.msg || `zlib status ${status}`})` };
  }
  // Z_STREAM_END: complete. Z_BUF_ERROR / Z_OK: either `out` is full (fine) or the input ran out (short count).
  return { bytesWritten: status === Z_STREAM_END ? stream.total_out : out.length - stream.avail_out };
}
