/**
 * Writing a command's output files: never over a file the user has, unless they
 * said --force; each file written whole (temporary file, then rename) by
 * app/node/write-file-safely.ts.
 */
import { stat } from 'node:fs/promises';
import { FileWriteError, writeFileSafely } from '../node/write-file-safely';
import { InputError, UsageError } from './exit-codes';

/** Throws a UsageError naming the first of `paths` that exists (and the flag that chose it), before any work is done. */
export async function refuseExisting(paths: readonly string[], flag = '--out'): Promise<void> {
  for (const path of paths) {
    try {
      await stat(path);
    } catch {
      continue;
    }
    throw new UsageError(`${path} already exists and was left unchanged; choose another ${flag}, or add --force to replace it`);
  }
}

/** Writes one output file, mapping write failures to the CLI's error kinds. */
export async function writeOutput(path: string, bytes: Uint8Array | string, overwrite: boolean): Promise<void> {
  try {
    await writeFileSafely(path, bytes, { overwrite });
  } catch (error) {
    if (!(error instanceof FileWriteError)) throw error;
    if (error.reason === 'unwritable') throw new InputError(error.message);
    throw new UsageError(error.message);
  }
}
