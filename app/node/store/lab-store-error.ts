/**
 * Why the lab store refused something. Every message says what is wrong and what to do
 * (`<subject>: <what is wrong>; <what to do>`), so a surface can show it as it is.
 *
 * About the store file:
 * - 'missing': no store file at the path, and the caller did not ask to create one;
 * - 'folder-missing': the folder of the store file does not exist;
 * - 'not-a-file': the path is a folder;
 * - 'no-access': permission to read or write is denied (the file is left as it is);
 * - 'unreadable': the file is not an SQLite database, is truncated or damaged; it was
 *   moved aside to `backupPath` (never overwritten) when that was possible;
 * - 'foreign': an SQLite database of some other program; left untouched;
 * - 'newer-schema': written by a newer Annula; left untouched (update Annula);
 * - 'locked': another process held the write lock for longer than the wait (`holder`);
 * - 'unwritable': the disk is full or another I/O failure while saving (nothing changed);
 * - 'closed': the store was closed.
 *
 * About a record (nothing was written):
 * - 'duplicate': a record of that name already exists (it is never replaced);
 * - 'invalid-record': a field is missing or out of range (the message names it);
 * - 'unknown-reference': the record names a calibration the store does not hold.
 */
export type LabStoreProblem =
  | 'missing'
  | 'folder-missing'
  | 'not-a-file'
  | 'no-access'
  | 'unreadable'
  | 'foreign'
  | 'newer-schema'
  | 'locked'
  | 'unwritable'
  | 'closed'
  | 'duplicate'
  | 'invalid-record'
  | 'unknown-reference';

/** Who holds the write lock, as its lock file says. */
export interface LockHolder {
  pid: number;
  host: string;
  /** When the holder took the lock (ISO 8601). */
  since: string;
  /** What the holder is ("annula cli", "annula desktop"). */
  tool: string;
}

export class LabStoreError extends Error {
  override name = 'LabStoreError';
  /** Where an unreadable store file was moved (reason 'unreadable'); null when it could not be moved. */
  readonly backupPath: string | null;
  /** The process holding the lock (reason 'locked'); null when the lock file could not be read. */
  readonly holder: LockHolder | null;

  constructor(
    /** The store file concerned. */
    readonly path: string,
    readonly reason: LabStoreProblem,
    message: string,
    options: { cause?: unknown; backupPath?: string | null; holder?: LockHolder | null } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.backupPath = options.backupPath ?? null;
    this.holder = options.holder ?? null;
  }
}

/** The error code of a Node file-system error, if any. */
export function errorCode(error: unknown): string | undefined {
  return typeof error === 'object' && error !== null && 'code' in error ? String((error as { code: unknown }).code) : undefined;
}
