/**
 * Reading a camera image from disk: the bytes, their SHA-256 fingerprint (for lab
 * records, so a result can be tied to the exact file), and the decoded raster.
 */
import { createHash } from 'node:crypto';
import { readFile, stat } from 'node:fs/promises';
import { decodeImage, type DecodedImage, type ImageDecodeOptions } from '../../core/image';
import { FileReadError } from './file-read-error';

/** A decoded image with where it came from. */
export type ImageFile = DecodedImage & {
  /** The path as the caller gave it. */
  path: string;
  /** Size of the file in bytes. */
  byteLength: number;
  /** SHA-256 of the file's bytes, 64 lowercase hex digits (FIPS 180-4). */
  sha256: string;
};

export interface ReadImageFileOptions extends Omit<ImageDecodeOptions, 'name'> {
  /** Refuse files larger than this many bytes before reading them; default 4 GiB. */
  maxBytes?: number;
}

/** Largest file read by default: 4 GiB, past any uncompressed 4e8-pixel 16-bit image (0.8 GB) with room to spare. */
export const DEFAULT_MAX_FILE_BYTES = 4 * 2 ** 30;

function errorCode(error: unknown): string | undefined {
  return typeof error === 'object' && error !== null && 'code' in error ? String((error as { code: unknown }).code) : undefined;
}

function readFailure(path: string, error: unknown): FileReadError {
  const code = errorCode(error);
  if (code === 'ENOENT' || code === 'ENOTDIR') {
    return new FileReadError(path, 'missing', 'no such file', 'check the path and the spelling of the file name', { cause: error });
  }
  if (code === 'EISDIR') {
    return new FileReadError(path, 'directory', 'this is a folder, not an image file', 'name the image file inside it', { cause: error });
  }
  if (code === 'EACCES' || code === 'EPERM') {
    return new FileReadError(path, 'unreadable', 'permission to read the file is denied', 'ask for read access or copy the file somewhere readable', { cause: error });
  }
  const detail = error instanceof Error ? error.message : String(error);
  return new FileReadError(path, 'unreadable', `the file cannot be read (${detail})`, 'check the disk or network share and try again', { cause: error });
}

/**
 * Reads and decodes the image at `path` (TIFF, PNG or JPEG, recognised by content).
 *
 * @param path file path, relative to the working directory or absolute
 * @param options.page, options.maxPixels as for decodeImage; options.maxBytes file-size ceiling
 * @returns the decoded image with its path, byte length and SHA-256
 * @throws FileReadError (missing, directory, unreadable, too-large) or ImageDecodeError
 *   (the file's content), each naming the path
 */
export async function readImageFile(path: string, options: ReadImageFileOptions = {}): Promise<ImageFile> {
  if (typeof path !== 'string' || path.length === 0) {
    throw new TypeError(`path must be a non-empty string; got ${JSON.stringify(path)}`);
  }
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_FILE_BYTES;
  if (!(maxBytes > 0)) throw new RangeError(`maxBytes must be a positive number of bytes; got ${maxBytes}`);
  let size: number;
  try {
    const info = await stat(path);
    if (info.isDirectory()) {
      throw new FileReadError(path, 'directory', 'this is a folder, not an image file', 'name the image file inside it');
    }
    size = info.size;
  } catch (error) {
    if (error instanceof FileReadError) throw error;
    throw readFailure(path, error);
  }
  if (size > maxBytes) {
    throw new FileReadError(path, 'too-large', `the file has ${size} bytes, more than the ${maxBytes} this reader accepts`, 'bin or crop the image, or raise the file-size limit');
  }
  let buffer: Buffer;
  try {
    buffer = await readFile(path);
  } catch (error) {
    throw readFailure(path, error);
  }
  const bytes = new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const decoded = decodeImage(bytes, { page: options.page, maxPixels: options.maxPixels, name: path });
  return { ...decoded, path, byteLength: bytes.byteLength, sha256 };
}
