/**
 * The SQLite engine: sql.js (SQLite compiled to WebAssembly), loaded once per process.
 * The same engine runs in the CLI and in the Electron main process, with no native build.
 * It keeps a database in memory; the lab store reads and writes the file itself.
 */
import initSqlJs, { type SqlJsStatic } from 'sql.js';

let engine: Promise<SqlJsStatic> | undefined;

/**
 * The sql.js module (about 20 ms to compile its WebAssembly here; later calls reuse it).
 * Native SQLite functions only (`useOldExtensionFunctions: false`), so no legacy-function
 * warnings are printed.
 * @throws Error when the WebAssembly file cannot be loaded (a damaged install)
 */
export function loadSqlEngine(): Promise<SqlJsStatic> {
  engine ??= initSqlJs({ useOldExtensionFunctions: false }).catch((error: unknown) => {
    engine = undefined;
    throw error;
  });
  return engine;
}
