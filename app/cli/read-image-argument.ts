/** Reads an image named on the command line, turning read and decode failures into input errors (exit 3). */
import { ImageDecodeError } from '../../core/image';
import { FileReadError } from '../node/file-read-error';
import { readImageFile, type ImageFile } from '../node/read-image-file';
import { InputError } from './exit-codes';

export async function readImageArgument(path: string, page?: number): Promise<ImageFile> {
  try {
    return await readImageFile(path, page === undefined ? {} : { page });
  } catch (error) {
    if (error instanceof FileReadError || error instanceof ImageDecodeError) throw new InputError(error.message);
    throw error;
  }
}
