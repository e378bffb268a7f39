/**
 * Opening the lab store for one handler call, and closing it after. Reads never create
 * the file (null: nothing saved yet); writes create it (and its folder at the default
 * location). Store problems become HandlerErrors with the store's own message, which
 * says what is wrong and what to do (an unreadable store's names its backup).
 */
import { LabStoreError, openLabStore, type LabStore } from '../node/store';
import { HandlerError } from './handler-error';

const TOOL = 'annula workspace';

function storeProblem(error: LabStoreError): HandlerError {
  if (error.reason === 'duplicate') return new HandlerError('invalid-input', error.message, 'the calibration already saved under that name is kept unchanged', { cause: error });
  if (error.reason === 'invalid-record' || error.reason === 'unknown-reference') return new HandlerError('invalid-input', error.message, 'correct it and save again', { cause: error });
  return new HandlerError('unreadable', error.message, 'see the message; nothing was changed in the store', { cause: error });
}

/** Runs `use` with the store opened for reading; `null` when there is no store file yet. */
export async function withExistingStore<T>(path: string, use: (store: LabStore | null) => Promise<T>): Promise<T> {
  let store: LabStore | null;
  try {
    store = await openLabStore(path, { create: false, tool: TOOL });
  } catch (error) {
    if (error instanceof LabStoreError) {
      if (error.reason === 'missing') return use(null);
      throw storeProblem(error);
    }
    throw error;
  }
  try {
    return await use(store);
  } catch (error) {
    throw error instanceof LabStoreError ? storeProblem(error) : error;
  } finally {
    await store.close();
  }
}

/** Runs `use` with the store opened for writing, created (with its folder) when missing. */
export async function withWritableStore<T>(path: string, use: (store: LabStore) => Promise<T>): Promise<T> {
  let store: LabStore;
  try {
    store = await openLabStore(path, { create: true, createFolders: true, tool: TOOL });
  } catch (error) {
    if (error instanceof LabStoreError) throw storeProblem(error);
    throw new HandlerError('unreadable', `the lab store ${path} cannot be opened (${(error as Error).message})`, 'check the folder exists and is writable, or start with --store <file>', { cause: error });
  }
  try {
    return await use(store);
  } catch (error) {
    throw error instanceof LabStoreError ? storeProblem(error) : error;
  } finally {
    await store.close();
  }
}
