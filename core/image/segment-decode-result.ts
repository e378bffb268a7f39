/**
 * Outcome of decompressing one TIFF strip or tile: how many bytes were written
 * and, when the data are damaged, what is wrong (the caller names the file and segment).
 */
export interface SegmentDecodeResult {
  bytesWritten: number;
  problem?: string;
}
