/**
 * Opening a store file's bytes as a database, and telling apart the ways that can fail:
 *
 * - 'damaged': not an SQLite database, truncated, or failing SQLite's own consistency check
 *   (the store moves such a file aside and reports it);
 * - 'foreign': a sound SQLite database that is not an Annula store (another program's; left alone);
 * - 'newer': an Annula store of a schema version this program does not know (left alone).
 *
 * The checks, in order: the 100-byte header (SQLite file format: the magic string
 * "SQLite format 3\0" at offset 0, the page size at 16, the change counter at 24, the page
 * count at 28, valid when "version-valid-for" at 92 equals the change counter); the file
 * length against the page size and count, which catches truncation that SQLite itself would
 * read past silently; then `PRAGMA quick_check` (every page and record readable and well
 * formed); then `PRAGMA application_id` and `PRAGMA user_version`. An SQLite file with no
 * tables and no application id counts as an empty store of version 0.
 */
import type { Database, SqlJsStatic } from 'sql.js';
import { applyMigrations, schemaVersionOf, STORE_APPLICATION_ID, STORE_SCHEMA_VERSION } from './store-schema';

export type StoreBytesProblem =
  | { kind: 'damaged'; detail: string }
  | { kind: 'foreign'; detail: string }
  | { kind: 'newer'; version: number };

export type OpenedStoreBytes =
  | {
      ok: true;
      /** Migrated (in memory) to STORE_SCHEMA_VERSION, foreign keys on. */
      db: Database;
      /** The schema version of the file as it is on disk. */
      fileVersion: number;
    }
  | { ok: false; problem: StoreBytesProblem };

const MAGIC = 'SQLite format 3\u0000';
const TABLES = ['instruments', 'calibrations', 'analyses'];

function u32(bytes: Uint8Array, offset: number): number {
  return ((bytes[offset]! << 24) | (bytes[offset + 1]! << 16) | (bytes[offset + 2]! << 8) | bytes[offset + 3]!) >>> 0;
}

/** A problem the header shows, or null when the header and length are consistent. */
function headerProblem(bytes: Uint8Array): string | null {
  if (bytes.byteLength === 0) return 'the file is empty';
  const magic = String.fromCharCode(...bytes.subarray(0, Math.min(16, bytes.byteLength)));
  if (bytes.byteLength < 100 || magic !== MAGIC) {
    return magic.startsWith(MAGIC.slice(0, bytes.byteLength)) && bytes.byteLength < 100
      ? `the file is truncated (${bytes.byteLength} bytes, shorter than an SQLite header)`
      : 'it is not an SQLite database';
  }
  const rawPageSize = (bytes[16]! << 8) | bytes[17]!;
  const pageSize = rawPageSize === 1 ? 65536 : rawPageSize;
  if (pageSize < 512 || pageSize > 65536 || (pageSize & (pageSize - 1)) !== 0) return `its header is damaged (page size ${rawPageSize})`;
  if (bytes.byteLength % pageSize !== 0) {
    return `the file is truncated or damaged (${bytes.byteLength} bytes is not a whole number of ${pageSize}-byte pages)`;
  }
  const changeCounter = u32(bytes, 24);
  const pageCount = u32(bytes, 28);
  if (pageCount !== 0 && u32(bytes, 92) === changeCounter && pageCount * pageSize !== bytes.byteLength) {
    return pageCount * pageSize > bytes.byteLength
      ? `the file is truncated (${bytes.byteLength} bytes; its header says ${pageCount * pageSize})`
      : `the file has ${bytes.byteLength - pageCount * pageSize} bytes past the end its header states`;
  }
  return null;
}

function single(db: Database, sql: string): unknown {
  return db.exec(sql)[0]?.values[0]?.[0];
}

/**
 * Opens `bytes` (a store file's content) as a database and migrates it in memory.
 * Never throws for bad bytes: the problem comes back as a value. The caller owns (and
 * must close) the returned database.
 */
export function openStoreBytes(SQL: SqlJsStatic, bytes: Uint8Array): OpenedStoreBytes {
  const header = headerProblem(bytes);
  if (header) return { ok: false, problem: { kind: 'damaged', detail: header } };
  let db: Database;
  try {
    db = new SQL.Database(bytes);
  } catch (error) {
    return { ok: false, problem: { kind: 'damaged', detail: `SQLite cannot open it (${(error as Error).message})` } };
  }
  let fileVersion: number;
  try {
    const check = db.exec('PRAGMA quick_check')[0]?.values.map((row) => String(row[0])) ?? [];
    if (check.length !== 1 || check[0] !== 'ok') {
      db.close();
      return { ok: false, problem: { kind: 'damaged', detail: `SQLite's consistency check fails (${check.slice(0, 2).join('; ') || 'no answer'})` } };
    }
    const applicationId = Number(single(db, 'PRAGMA application_id'));
    const objects = Number(single(db, "SELECT count(*) FROM sqlite_master WHERE name NOT LIKE 'sqlite_%'"));
    fileVersion = schemaVersionOf(db);
    if (applicationId !== STORE_APPLICATION_ID && !(applicationId === 0 && objects === 0 && fileVersion === 0)) {
      db.close();
      const whose = applicationId === 0 ? 'it has tables of its own' : `its application id is ${applicationId}`;
      return { ok: false, problem: { kind: 'foreign', detail: `it is an SQLite database of another program (${whose}), not an Annula lab store` } };
    }
  } catch (error) {
    db.close();
    return { ok: false, problem: { kind: 'damaged', detail: `SQLite cannot read it (${(error as Error).message})` } };
  }
  if (fileVersion > STORE_SCHEMA_VERSION) {
    db.close();
    return { ok: false, problem: { kind: 'newer', version: fileVersion } };
  }
  try {
    applyMigrations(db);
    const present = new Set(db.exec("SELECT name FROM sqlite_master WHERE type = 'table'")[0]?.values.map((r) => String(r[0])) ?? []);
    const missing = TABLES.filter((t) => !present.has(t));
    if (missing.length > 0) {
      db.close();
      return { ok: false, problem: { kind: 'damaged', detail: `its table${missing.length > 1 ? 's' : ''} ${missing.join(', ')} ${missing.length > 1 ? 'are' : 'is'} missing` } };
    }
    db.run('PRAGMA foreign_keys = ON');
  } catch (error) {
    db.close();
    return { ok: false, problem: { kind: 'damaged', detail: `it cannot be brought to schema version ${STORE_SCHEMA_VERSION} (${(error as Error).message})` } };
  }
  return { ok: true, db, fileVersion };
}
