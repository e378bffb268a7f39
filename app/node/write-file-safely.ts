/**
 * Writing a file so that a reader never sees half of it and nothing the user saved is
 * replaced unless the caller asked for that:
 *
 * 1. the bytes go to a new temporary file in the same folder (".<name>.<random>.tmp",
 *    created exclusively, flushed to disk);
 * 2. with `overwrite`, the temporary file is renamed over the target (rename(2) replaces
 *    atomically on one file system); without it, it is hard-linked to the target name,
 *    which fails if that name exists (link(2) never replaces), and then removed. Where a
 *    file system cannot hard-link (some network and FAT volumes), an existence check and
 *    a rename are used instead, which leaves a moment in which another program could
 *    create the target first.
 *
 * On any failure the temporary file is removed and the target is as it was.
 */
import { randomBytes } from 'node:crypto';
import { link, open, rename, stat, unlink } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';

/**
 * Why a file could not be written: 'exists' the target exists and overwriting was not
 * allowed; 'folder-missing' its folder does not exist; 'not-a-file' the target is a
 * folder; 'unwritable' no permission, a full disk or another I/O failure.
 */
export type FileWriteReason = 'exists' | 'folder-missing' | 'not-a-file' | 'unwritable';

/** A file that was not written; the message is `<path>: <what is wrong>; <what to do>`. */
export class FileWriteError extends Error {
  override name = 'FileWriteError';

  constructor(
    readonly path: string,
    readonly reason: FileWriteReason,
    problem: string,
    advice: string,
    options?: { cause?: unknown },
  ) {
    super(`${path}: ${problem}; ${advice}`, options);
  }
}

export interface WriteFileSafelyOptions {
  /** Replace an existing file at `path`; default false (an existing file is an error). */
  overwrite?: boolean;
}

function code(error: unknown): string | undefined {
  return typeof error === 'object' && error !== null && 'code' in error ? String((error as { code: unknown }).code) : undefined;
}

function existsError(path: string, cause?: unknown): FileWriteError {
  return new FileWriteError(path, 'exists', 'a file of that name already exists and was left unchanged', 'choose another name, or allow overwriting (the CLI: --force)', { cause });
}

function failure(path: string, error: unknown): FileWriteError {
  const c = code(error);
  if (c === 'ENOENT' || c === 'ENOTDIR') {
    return new FileWriteError(path, 'folder-missing', `the folder ${dirname(path)} does not exist`, 'create the folder first or choose another path', { cause: error });
  }
  if (c === 'EISDIR') return new FileWriteError(path, 'not-a-file', 'this is a folder', 'give a file name inside it', { cause: error });
  if (c === 'EACCES' || c === 'EPERM' || c === 'EROFS') {
    return new FileWriteError(path, 'unwritable', 'permission to write there is denied', 'choose a folder you can write to', { cause: error });
  }
  if (c === 'ENOSPC' || c === 'EDQUOT') return new FileWriteError(path, 'unwritable', 'the disk is full', 'free some space or choose another disk', { cause: error });
  const detail = error instanceof Error ? error.message : String(error);
  return new FileWriteError(path, 'unwritable', `the file cannot be written (${detail})`, 'check the disk or network share and try again', { cause: error });
}

/** Whether something exists at `path` (a broken symbolic link counts as nothing). */
async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch {
    return false;
  }
}

/**
 * Writes `bytes` to `path` completely or not at all.
 * @param path file path, relative to the working directory or absolute
 * @param bytes the file's content (a string is written as UTF-8)
 * @throws FileWriteError 'exists' (without overwrite), 'folder-missing', 'not-a-file' or 'unwritable'
 */
export async function writeFileSafely(path: string, bytes: Uint8Array | string, options: WriteFileSafelyOptions = {}): Promise<void> {
  if (typeof path !== 'string' || path.length === 0) throw new TypeError(`path must be a non-empty string; got ${JSON.stringify(path)}`);
  const overwrite = options.overwrite ?? false;
  try {
    if ((await stat(path)).isDirectory()) throw new FileWriteError(path, 'not-a-file', 'this is a folder', 'give a file name inside it');
    if (!overwrite) throw existsError(path);
  } catch (error) {
    if (error instanceof FileWriteError) throw error;
    if (code(error) !== 'ENOENT') throw failure(path, error);
  }
  const temporary = join(dirname(path), `.${basename(path)}.${randomBytes(6).toString('hex')}.tmp`);
  try {
    const handle = await open(temporary, 'wx');
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
  } catch (error) {
    await unlink(temporary).catch(() => undefined);
    throw failure(path, error);
  }
  try {
    if (overwrite) {
      await rename(temporary, path);
      return;
    }
    try {
      await link(temporary, path);
    } catch (error) {
      const c = code(error);
      if (c === 'EEXIST') throw existsError(path, error);
      if (c !== 'EPERM' && c !== 'ENOTSUP' && c !== 'EOPNOTSUPP' && c !== 'EXDEV' && c !== 'EMLINK') throw failure(path, error);
      // No hard links here: check, then rename (see the header).
      if (await exists(path)) throw existsError(path);
      await rename(temporary, path);
      return;
    }
  } catch (error) {
    await unlink(temporary).catch(() => undefined);
    if (error instanceof FileWriteError) throw error;
    throw failure(path, error);
  }
  // The target is complete under its name; the temporary name is only a second link now.
  await unlink(temporary).catch(() => undefined);
}
