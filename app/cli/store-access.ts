/** Opening the lab's records from a command (--store, ANNULA_STORE, or the default location). */
import {
  LabStoreError,
  openLabStore,
  resolveStorePath,
  STORE_ENV_VARIABLE,
  type LabStore,
  type StoreLocation,
} from '../node/store';
import type { CliIo } from './cli-io';
import { InputError, UsageError } from './exit-codes';

/** The help text of `--store`, the same on every command that reads or writes the lab's records. */
export const STORE_OPTION_HELP = `the lab store file (default: $${STORE_ENV_VARIABLE}, else lab-records.sqlite in your data folder)`;

/**
 * Opens the lab store for a command: `--store`, then ANNULA_STORE, then the default
 * location (see resolveStorePath). Store problems become input errors (exit 3) with the
 * store's own message (an unreadable store's names the backup it was moved to).
 * @returns the store, or null when there is no store file at the default location and
 *   `create` is false (nothing has been saved yet); a missing file named by --store or
 *   ANNULA_STORE is an input error
 */
export async function openStoreForCommand(
  storeOption: string | undefined,
  options: { create: boolean; io: CliIo; tool?: string },
): Promise<{ store: LabStore | null; location: StoreLocation }> {
  let location: StoreLocation;
  try {
    location = resolveStorePath({ option: storeOption });
  } catch (error) {
    throw new UsageError((error as Error).message);
  }
  try {
    const store = await openLabStore(location.path, {
      create: options.create,
      createFolders: location.source === 'default',
      tool: options.tool ?? 'annula cli',
      onNotice: (message) => options.io.err(`note: ${message}`),
    });
    return { store, location };
  } catch (error) {
    if (error instanceof LabStoreError) {
      if (error.reason === 'missing' && location.source === 'default') return { store: null, location };
      const where = location.source === 'option' ? '' : location.source === 'environment' ? ` (from ${STORE_ENV_VARIABLE})` : '';
      throw new InputError(error.message + where);
    }
    throw error;
  }
}

