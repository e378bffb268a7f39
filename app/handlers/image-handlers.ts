/**
 * Image files the user chose. The desktop app reads a file only when the user picked
 * that path in an open dialog this session (HandlerContext.isUserChosenPath); browser
 * mode uploads the bytes instead, and the workspace decodes them in its worker.
 */
import { readFile, stat } from 'node:fs/promises';
import { isAbsolute } from 'node:path';
import { z } from 'zod';
import { DEFAULT_MAX_FILE_BYTES } from '../node/read-image-file';
import { defineHandler } from './handler';
import { HandlerError } from './handler-error';
import { fileMeta } from './image-file-meta';

/** Largest upload or file the workspace takes, bytes (the CLI's reader ceiling). */
export const MAX_IMAGE_BYTES = DEFAULT_MAX_FILE_BYTES;

export const readChosenImage = defineHandler({
  name: 'read-chosen-image',
  summary: 'the bytes of an image file the user chose in an open dialog',
  input: z.strictObject({ path: z.string().min(1).refine(isAbsolute, 'an absolute path') }),
  async run({ path }, context) {
    if (!context.isUserChosenPath(path)) {
      throw new HandlerError('not-allowed', `${path} was not chosen in an open dialog`, 'open the file with File > Open image, or drop it on the window');
    }
    let size: number;
    try {
      const info = await stat(path);
      if (!info.isFile()) throw new HandlerError('unreadable', `${path} is not a file`, 'choose an image file');
      size = info.size;
    } catch (e) {
      if (e instanceof HandlerError) throw e;
      throw new HandlerError('not-found', `${path} cannot be found`, 'check that the file still exists and choose it again');
    }
    if (size > MAX_IMAGE_BYTES) {
      throw new HandlerError('unreadable', `${path} has ${size} bytes, more than the ${MAX_IMAGE_BYTES} Annula reads`, 'bin or crop the image');
    }
    let bytes: Uint8Array;
    try {
      const buffer = await readFile(path);
      bytes = new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
    } catch (e) {
      throw new HandlerError('unreadable', `${path} cannot be read (${(e as Error).message})`, 'check the permissions or copy the file somewhere readable', { cause: e });
    }
    return { meta: fileMeta(path, bytes), bytes };
  },
});

export const fingerprintImage = defineHandler({
  name: 'fingerprint-image',
  summary: "an uploaded image's size and SHA-256, for the lab's records",
  takesBytes: true,
  input: z.strictObject({
    name: z.string().min(1).max(255),
    bytes: z.instanceof(Uint8Array).refine((b) => b.byteLength > 0, 'a non-empty file'),
  }),
  async run({ name, bytes }) {
    return fileMeta(name, bytes);
  },
});
