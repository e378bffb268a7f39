import { createHash } from 'node:crypto';
import { basename } from 'node:path';
import type { ImageFileMeta } from './contract';

/** Name (no folders), size and SHA-256 (FIPS 180-4) of a file's bytes. */
export function fileMeta(name: string, bytes: Uint8Array): ImageFileMeta {
  return { name: basename(name), byteLength: bytes.byteLength, sha256: createHash('sha256').update(bytes).digest('hex') };
}
