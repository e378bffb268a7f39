/**
 * The store file on disk, written so that it is always either the previous complete
 * database or the new complete database, never a mixture:
 *
 * 1. the bytes go to a new temporary file in the same folder
 *    (`.<name>.<kind>.<host tag>.<pid>.<random>.tmp`, created exclusively with 'wx');
 * 2. the temporary file is flushed to the disk (fsync);
 * 3. it is renamed over the store file (rename(2) replaces atomically within one file
 *    system, POSIX.1-2017), or, for a file that must not exist yet, hard-linked to its
 *    name (link(2) fails rather than replace) and then unlinked;
 * 4. the folder is flushed (fsync of the directory) so that the rename itself survives a
 *    power cut, where the platform allows it (not on Windows, where folders cannot be
 *    opened for flushing; NTFS journals the rename itself).
 *
 * A process killed at any step leaves the store file as it was, plus at most one
 * temporary file, which the next writer removes (`removeLeftovers`: only files of this
 * host whose process is gone).
 */
import { randomBytes } from 'node:crypto';
import { link, open, readdir, readFile, rename, stat, unlink } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { errorCode, LabStoreError } from './lab-store-error';
import { hostName, hostTag, localProcessState } from './local-process';

/** Codes with which a file system says it cannot hard-link (FAT, some network shares). */
const NO_LINK = new Set(['EPERM', 'ENOTSUP', 'EOPNOTSUPP', 'EXDEV', 'EMLINK', 'ENOSYS']);

function ioFailure(path: string, error: unknown, doing: string): LabStoreError {
  const c = errorCode(error);
  if (c === 'ENOENT' || c === 'ENOTDIR') {
    return new LabStoreError(path, 'folder-missing', `${path}: the folder ${dirname(path)} does not exist; create it or choose another store file with --store`, { cause: error });
  }
  if (c === 'EACCES' || c === 'EPERM' || c === 'EROFS') {
    return new LabStoreError(path, 'no-access', `${path}: permission to ${doing} is denied; ask for access to ${dirname(path)} or choose another store file with --store`, { cause: error });
  }
  if (c === 'ENOSPC' || c === 'EDQUOT') {
    return new LabStoreError(path, 'unwritable', `${path}: the disk is full, so nothing was saved (the store is as it was); free some space and try again`, { cause: error });
  }
  if (c === 'EISDIR') return new LabStoreError(path, 'not-a-file', `${path}: this is a folder; give a file name for the store, e.g. ${join(path, 'lab-records.sqlite')}`, { cause: error });
  const detail = error instanceof Error ? error.message : String(error);
  return new LabStoreError(path, 'unwritable', `${path}: could not ${doing} (${detail}); check the disk or network share and try again (the store is as it was)`, { cause: error });
}

/** A temporary file name beside `path`, carrying this host and process so leftovers can be told apart. */
export function temporaryPath(path: string, kind: string): string {
  return join(dirname(path), `.${basename(path)}.${kind}.${hostTag()}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
}

/**
 * The store file's bytes, or null when there is no file.
 * @throws LabStoreError 'not-a-file', 'no-access' or 'unwritable' (another read failure)
 */
export async function readStoreBytes(path: string): Promise<Uint8Array | null> {
  try {
    const buffer = await readFile(path);
    return new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  } catch (error) {
    const c = errorCode(error);
    if (c === 'ENOENT') return null;
    if (c === 'EACCES' || c === 'EPERM') {
      throw new LabStoreError(path, 'no-access', `${path}: permission to read the lab store is denied; ask for read access or choose another store file with --store`, { cause: error });
    }
    throw ioFailure(path, error, 'read the lab store');
  }
}

/** Flushes a folder's entries to disk where the platform allows it (see the header). */
async function syncFolder(folder: string): Promise<void> {
  if (process.platform === 'win32') return;
  let handle;
  try {
    handle = await open(folder, 'r');
    await handle.sync();
  } catch (error) {
    // Some file systems cannot flush a folder (EINVAL, EISDIR): the rename is done all the same.
    if (!['EINVAL', 'EISDIR', 'ENOTSUP', 'EPERM', 'EBADF'].includes(errorCode(error) ?? '')) throw error;
  } finally {
    await handle?.close();
  }
}

/** rename(2), retried briefly where Windows refuses while another program has the target open. */
async function renameOver(from: string, to: string): Promise<void> {
  for (let attempt = 0; ; attempt++) {
    try {
      await rename(from, to);
      return;
    } catch (error) {
      const c = errorCode(error);
      if (process.platform !== 'win32' || attempt >= 20 || !['EPERM', 'EBUSY', 'EACCES'].includes(c ?? '')) throw error;
      await new Promise((r) => setTimeout(r, 25 * (attempt + 1)));
    }
  }
}

async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch {
    return false;
  }
}

/**
 * Writes `bytes` as the file `path`, completely or not at all (see the header).
 * @param replace true: replace the existing file atomically; false: the file must not exist
 *   yet ('exists' is reported by returning false, and nothing is written)
 * @returns true when written; false when `replace` is false and the file already exists
 * @throws LabStoreError 'folder-missing', 'no-access', 'not-a-file' or 'unwritable'; the target is as it was
 */
export async function writeStoreFile(path: string, bytes: Uint8Array, replace: boolean): Promise<boolean> {
  const temporary = temporaryPath(path, 'write');
  try {
    const handle = await open(temporary, 'wx', 0o644);
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    if (replace) {
      await renameOver(temporary, path);
    } else {
      try {
        await link(temporary, path);
      } catch (error) {
        if (errorCode(error) === 'EEXIST') return false;
        if (!NO_LINK.has(errorCode(error) ?? '')) throw error;
        // No hard links on this file system: check, then rename (a moment in which another
        // program could create the file first; rename would then replace it).
        if (await exists(path)) return false;
        await renameOver(temporary, path);
      }
    }
    await syncFolder(dirname(path));
    return true;
  } catch (error) {
    throw ioFailure(path, error, 'write the lab store');
  } finally {
    await unlink(temporary).catch(() => undefined);
  }
}

/** `20260105T101112Z` from a date, for backup names that sort by time. */
function stamp(now: Date): string {
  return now.toISOString().replace(/\.\d{3}Z$/, 'Z').replace(/[-:]/g, '');
}

/**
 * Moves the store file aside to `<path>.<label>-<timestamp>` (with `-2`, `-3`, ... when
 * that name is taken: an earlier backup is never replaced).
 * @returns the backup's path
 * @throws LabStoreError ('no-access', 'unwritable') when the file cannot be moved; it is then left where it was
 */
export async function moveStoreAside(path: string, label: string, now: Date): Promise<string> {
  const base = `${path}.${label}-${stamp(now)}`;
  for (let n = 1; n < 1000; n++) {
    const backup = n === 1 ? base : `${base}-${n}`;
    try {
      await link(path, backup);
    } catch (error) {
      const c = errorCode(error);
      if (c === 'EEXIST') continue;
      if (!NO_LINK.has(c ?? '')) throw ioFailure(path, error, 'move the unreadable store aside');
      if (await exists(backup)) continue;
      try {
        await renameOver(path, backup);
      } catch (renameError) {
        throw ioFailure(path, renameError, 'move the unreadable store aside');
      }
      await syncFolder(dirname(path)).catch(() => undefined);
      return backup;
    }
    // Both names hold the file now; removing the store's name completes the move.
    try {
      await unlink(path);
    } catch (error) {
      throw ioFailure(path, error, 'move the unreadable store aside');
    }
    await syncFolder(dirname(path)).catch(() => undefined);
    return backup;
  }
  throw new LabStoreError(path, 'unwritable', `${path}: too many backups named ${base}-*; move some of them away and try again`);
}

/**
 * Writes a copy of the store (its `bytes`) beside it as `<path>.<label>-<timestamp>`,
 * never replacing an existing file.
 * @returns the copy's path
 */
export async function copyStoreAside(path: string, bytes: Uint8Array, label: string, now: Date): Promise<string> {
  const base = `${path}.${label}-${stamp(now)}`;
  for (let n = 1; n < 1000; n++) {
    const backup = n === 1 ? base : `${base}-${n}`;
    if (await writeStoreFile(backup, bytes, false)) return backup;
  }
  throw new LabStoreError(path, 'unwritable', `${path}: too many backups named ${base}-*; move some of them away and try again`);
}

/**
 * Removes temporary files that writers of `path` on this host left when they were
 * stopped (their process is gone). Files of other hosts and of running processes stay.
 * @returns how many were removed
 */
export async function removeLeftovers(path: string): Promise<number> {
  const prefix = `.${basename(path)}.`;
  const tag = hostTag();
  let names: string[];
  try {
    names = await readdir(dirname(path));
  } catch {
    return 0;
  }
  let removed = 0;
  for (const name of names) {
    if (!name.startsWith(prefix) || !name.endsWith('.tmp')) continue;
    const parts = name.slice(prefix.length, -'.tmp'.length).split('.');
    if (parts.length !== 4 || parts[1] !== tag) continue;
    const pid = Number(parts[2]);
    if (pid === process.pid || localProcessState(pid, hostName()) !== 'dead') continue;
    await unlink(join(dirname(path), name)).then(
      () => removed++,
      () => undefined,
    );
  }
  return removed;
}
