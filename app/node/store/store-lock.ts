/**
 * The write lock of a lab store, so that the CLI and the desktop app (or two CLI runs)
 * never write the store at the same time.
 *
 * The lock is the file `<store>.lock`, holding JSON `{ pid, host, since, tool, token }`.
 * It is created exclusively: its content is first written to a private temporary file
 * (opened with 'wx' and flushed), which is then hard-linked to the lock's name. link(2)
 * fails when the name exists, exactly like O_EXCL, and the lock appears with its whole
 * content at once, so a writer stopped while taking the lock never leaves an empty lock.
 * On a file system without hard links the lock is opened with 'wx' directly.
 *
 * A writer that finds the lock taken waits (polling, 5 to 25 ms apart) for at most
 * `timeoutMs`, then fails with a LabStoreError 'locked' naming the holder. (Two writers
 * started together, each adding 30 records in a tight loop, handed the lock over 11 and 16 times
 * in two runs here: a waiting writer gets its turn between the other's writes.)
 *
 * Stale locks: a lock is removed without its holder only when the lock names this host and
 * its pid is not running (kill(pid, 0) answers ESRCH). A lock from another host, a lock
 * whose process is running (even a reused pid), and a lock file that cannot be read are
 * never removed automatically: the error tells the user which file to delete when they
 * know no Annula program is writing. Removal is done under a short second lock
 * (`<store>.lock.breaking`) and only when the lock file still holds exactly what was judged
 * stale, so two writers recovering at once cannot delete a fresh lock.
 *
 * Inside one process, writers of the same store queue in memory before taking the file
 * lock, so one process never waits for itself.
 */
import { randomBytes } from 'node:crypto';
import { link, open, readFile, unlink } from 'node:fs/promises';
import { errorCode, LabStoreError, type LockHolder } from './lab-store-error';
import { hostName, localProcessState } from './local-process';
import { temporaryPath } from './store-file';

/** The lock file's name for a store file. */
export function lockPathOf(storePath: string): string {
  return `${storePath}.lock`;
}

export interface StoreLockOptions {
  /** Longest wait for another holder, ms; default 15000. */
  timeoutMs?: number;
  /** What this writer is, recorded in the lock ("annula cli"). */
  tool?: string;
}

/** A held lock. */
export interface StoreLock {
  readonly lockPath: string;
  /** Whether the lock file is still this holder's (checked before each rename over the store). */
  stillHeld(): Promise<boolean>;
}

export const DEFAULT_LOCK_TIMEOUT_MS = 15_000;

/** Longest pause between two tries of a waiting writer, ms. */
const MAX_POLL_MS = 25;

const NO_LINK = new Set(['EPERM', 'ENOTSUP', 'EOPNOTSUPP', 'EXDEV', 'EMLINK', 'ENOSYS']);

interface LockContent extends LockHolder {
  token: string;
}

/** Creates `path` holding `content`, only if it does not exist; false when it does. */
async function createExclusive(storePath: string, path: string, content: string): Promise<boolean> {
  const privateFile = temporaryPath(storePath, 'lock');
  try {
    const handle = await open(privateFile, 'wx', 0o644);
    try {
      await handle.writeFile(content);
      await handle.sync();
    } finally {
      await handle.close();
    }
    try {
      await link(privateFile, path);
      return true;
    } catch (error) {
      if (errorCode(error) === 'EEXIST') return false;
      if (!NO_LINK.has(errorCode(error) ?? '')) throw error;
    }
    // No hard links here: 'wx' on the lock itself (a reader may see it empty for a moment).
    try {
      const handle = await open(path, 'wx', 0o644);
      try {
        await handle.writeFile(content);
        await handle.sync();
      } finally {
        await handle.close();
      }
      return true;
    } catch (error) {
      if (errorCode(error) === 'EEXIST') return false;
      throw error;
    }
  } finally {
    await unlink(privateFile).catch(() => undefined);
  }
}

/** The lock file's text and what it says, or null when there is no lock file. */
async function readLock(path: string): Promise<{ raw: string; holder: LockContent | null } | null> {
  let raw: string;
  try {
    raw = await readFile(path, 'utf8');
  } catch (error) {
    if (errorCode(error) === 'ENOENT') return null;
    return { raw: '', holder: null };
  }
  try {
    const v = JSON.parse(raw) as Partial<LockContent>;
    if (typeof v.pid === 'number' && typeof v.host === 'string' && typeof v.since === 'string' && typeof v.token === 'string') {
      return { raw, holder: { pid: v.pid, host: v.host, since: v.since, tool: typeof v.tool === 'string' ? v.tool : 'unknown', token: v.token } };
    }
  } catch {
    // not JSON: damaged or still being written (the 'wx' fallback)
  }
  return { raw, holder: null };
}

/**
 * Removes the lock at `lockPath` if it still holds `raw` (judged stale by the caller),
 * under the short `.breaking` lock. Returns whether anything was removed.
 */
async function breakStaleLock(storePath: string, lockPath: string, raw: string): Promise<boolean> {
  const guard = `${lockPath}.breaking`;
  const content = JSON.stringify({ pid: process.pid, host: hostName(), since: new Date().toISOString(), tool: 'stale-lock recovery', token: randomBytes(8).toString('hex') });
  if (!(await createExclusive(storePath, guard, content))) {
    // Someone else is recovering; if that one was stopped while at it, its guard is stale too.
    const other = await readLock(guard);
    if (other?.holder && localProcessState(other.holder.pid, other.holder.host) === 'dead') await unlink(guard).catch(() => undefined);
    return false;
  }
  try {
    const now = await readLock(lockPath);
    if (now === null || now.raw !== raw) return false;
    await unlink(lockPath);
    return true;
  } finally {
    await unlink(guard).catch(() => undefined);
  }
}

function describeHolder(h: LockHolder): string {
  return `${h.tool}, pid ${h.pid} on host ${h.host}, since ${h.since}`;
}

const queues = new Map<string, Promise<unknown>>();

/**
 * Runs `work` while holding the write lock of the store at `storePath`; releases the lock
 * afterwards whether `work` succeeded or threw.
 * @throws LabStoreError 'locked' after `timeoutMs` of waiting, naming the holder;
 *   'no-access' / 'folder-missing' / 'unwritable' when the lock cannot be created at all
 */
export async function withStoreLock<T>(storePath: string, options: StoreLockOptions, work: (lock: StoreLock) => Promise<T>): Promise<T> {
  const lockPath = lockPathOf(storePath);
  const previous = queues.get(lockPath) ?? Promise.resolve();
  const run = previous.catch(() => undefined).then(() => lockedRun(storePath, lockPath, options, work));
  const settled = run.catch(() => undefined);
  queues.set(lockPath, settled);
  try {
    return await run;
  } finally {
    if (queues.get(lockPath) === settled) queues.delete(lockPath);
  }
}

async function lockedRun<T>(storePath: string, lockPath: string, options: StoreLockOptions, work: (lock: StoreLock) => Promise<T>): Promise<T> {
  const timeoutMs = options.timeoutMs ?? DEFAULT_LOCK_TIMEOUT_MS;
  if (!(timeoutMs >= 0)) throw new RangeError(`timeoutMs must be a number of milliseconds >= 0; got ${timeoutMs}`);
  const mine: LockContent = { pid: process.pid, host: hostName(), since: new Date().toISOString(), tool: options.tool ?? 'annula', token: randomBytes(12).toString('hex') };
  await takeLock(storePath, lockPath, JSON.stringify(mine) + '\n', timeoutMs);
  const lock: StoreLock = {
    lockPath,
    stillHeld: async () => (await readLock(lockPath))?.holder?.token === mine.token,
  };
  try {
    return await work(lock);
  } finally {
    if (await lock.stillHeld()) await unlink(lockPath).catch(() => undefined);
  }
}

/** Creates the lock file holding `content`, waiting for another holder at most `timeoutMs`. */
async function takeLock(storePath: string, lockPath: string, content: string, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  let pause = 5;
  for (;;) {
    let created: boolean;
    try {
      created = await createExclusive(storePath, lockPath, content);
    } catch (error) {
      const c = errorCode(error);
      if (c === 'ENOENT' || c === 'ENOTDIR') {
        throw new LabStoreError(storePath, 'folder-missing', `${storePath}: the folder of the lab store does not exist; create it or choose another store file with --store`, { cause: error });
      }
      if (c === 'EACCES' || c === 'EPERM' || c === 'EROFS') {
        throw new LabStoreError(storePath, 'no-access', `${storePath}: permission to write in the store's folder (for its lock file) is denied; ask for write access or choose another store file with --store`, { cause: error });
      }
      throw new LabStoreError(storePath, 'unwritable', `${storePath}: the lock file ${lockPath} cannot be created (${(error as Error).message}); check the disk and try again`, { cause: error });
    }
    if (created) {
      // A recovery that was stopped midway leaves its guard; with the lock held, remove it if its process is gone.
      const guard = await readLock(`${lockPath}.breaking`);
      if (guard?.holder && localProcessState(guard.holder.pid, guard.holder.host) === 'dead') await unlink(`${lockPath}.breaking`).catch(() => undefined);
      return;
    }
    const found = await readLock(lockPath);
    if (found === null) continue; // released just now
    if (found.holder && localProcessState(found.holder.pid, found.holder.host) === 'dead') {
      // Its writer was stopped: remove the lock and try again at once (or wait, if that failed).
      if (await breakStaleLock(storePath, lockPath, found.raw).catch(() => false)) continue;
    }
    if (Date.now() >= deadline) {
      const waited = `${(timeoutMs / 1000).toFixed(timeoutMs < 1000 ? 1 : 0)} s`;
      if (!found.holder) {
        throw new LabStoreError(
          storePath,
          'locked',
          `${storePath}: the lab store is locked by ${lockPath}, which cannot be read (empty or damaged), and stayed so for ${waited}; if no Annula program is writing to this store, delete ${lockPath} and try again`,
        );
      }
      const { token: _token, ...holder } = found.holder;
      const remote = holder.host !== hostName() ? ' (a lock taken on another computer is never removed automatically)' : '';
      throw new LabStoreError(
        storePath,
        'locked',
        `${storePath}: the lab store is being written by another program (${describeHolder(holder)})${remote} and stayed locked for ${waited}; try again when it has finished, or, if that program is no longer running, delete ${lockPath}`,
        { holder },
      );
    }
    await new Promise((r) => setTimeout(r, pause * (0.5 + Math.random())));
    pause = Math.min(MAX_POLL_MS, pause * 1.5);
  }
}
