/**
 * Whether a process that left a lock or a temporary file behind is still running. Only a
 * process on this host can be asked; for any other host the answer is "unknown", and the
 * store then treats the process as alive (it never takes a lock away from a machine it
 * cannot see).
 */
import { createHash } from 'node:crypto';
import { hostname } from 'node:os';
import { errorCode } from './lab-store-error';

/** This machine's host name, as lock files record it. */
export function hostName(): string {
  return hostname();
}

/** Eight hex digits standing for this host in file names (host names can hold any character). */
export function hostTag(host: string = hostName()): string {
  return createHash('sha256').update(host).digest('hex').slice(0, 8);
}

/**
 * 'alive', 'dead' or 'unknown' for process `pid` on `host`. Uses kill(pid, 0), which
 * sends nothing and reports whether the process exists (POSIX.1-2017, kill(2); Node maps
 * it on Windows too). EPERM means it exists under another user: alive.
 * A process that was reused by the system for another program counts as alive, so a
 * lock is never taken away on a guess.
 */
export function localProcessState(pid: number, host: string): 'alive' | 'dead' | 'unknown' {
  if (host !== hostName()) return 'unknown';
  if (!Number.isInteger(pid) || pid <= 0) return 'unknown';
  if (pid === process.pid) return 'alive';
  try {
    process.kill(pid, 0);
    return 'alive';
  } catch (error) {
    return errorCode(error) === 'ESRCH' ? 'dead' : 'alive';
  }
}
