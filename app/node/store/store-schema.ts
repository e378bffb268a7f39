/**
 * The lab store's schema, as an ordered list of migrations. The schema version of a file is
 * SQLite's `PRAGMA user_version` (a number in the database header, written in the same
 * transaction as the tables it describes); a file marks itself as an Annula store with
 * `PRAGMA application_id` (SQLite file format, "Application ID", header offset 68).
 *
 * Migration n brings a file from version n - 1 to n. Every pending migration runs in one
 * transaction together with the user_version update, so a file is at one version or the
 * next, never in between. Published migrations never change: a new schema is a new entry
 * at the end. A file whose version is higher than the last entry was written by a newer
 * Annula and is refused, untouched.
 *
 * Version 2 (current):
 *
 * instruments
 *   name TEXT PRIMARY KEY COLLATE NOCASE   unique, compared without regard to ASCII case
 *   description TEXT NOT NULL, created TEXT NOT NULL (ISO 8601, UTC)
 * calibrations
 *   name TEXT UNIQUE COLLATE NOCASE (never replaced), instrument TEXT COLLATE NOCASE -> instruments(name) or NULL,
 *   voltage_v REAL, nominal_camera_length_m REAL NULL, pixel_size_m REAL NULL, created TEXT,
 *   standard_phase_id TEXT, camera_length_px REAL, camera_length_sigma_px REAL,
 *   axis_ratio REAL, axis_ratio_sigma REAL, angle_deg REAL, angle_sigma_deg REAL NULL,
 *   residuals_json TEXT ([{ hkl, dA, residualPpm, radiusPx, image }]),
 *   image_fingerprints_json TEXT ([{ sha256, path }]), rejected_rings_json TEXT, notes TEXT
 * analyses
 *   id INTEGER PRIMARY KEY AUTOINCREMENT (never reused), sample_id, operator, created,
 *   image_sha256, image_path, calibration -> calibrations(name) or NULL, phase,
 *   a_a REAL NULL, a_sigma_a REAL NULL, verdict 'pass' | 'fail' | 'inconclusive' | NULL,
 *   tolerance REAL NULL (relative), result_json TEXT
 * indexes (version 2): calibrations by (instrument, voltage, created) for the drift
 *   check; analyses by (phase, created) and (sample_id) for histories.
 */
import type { Database } from 'sql.js';

/** `PRAGMA application_id` of an Annula lab store: the bytes "ANLA" read as a big-endian integer. */
export const STORE_APPLICATION_ID = 0x414e4c41;

export interface Migration {
  /** The version this migration brings the file to (1, 2, ...: consecutive). */
  version: number;
  description: string;
  /** SQL run inside the migration's transaction. */
  sql: string;
}

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    description: 'instruments, calibrations and analyses',
    sql: `
      CREATE TABLE instruments (
        name TEXT NOT NULL PRIMARY KEY COLLATE NOCASE,
        description TEXT NOT NULL DEFAULT '',
        created TEXT NOT NULL
      );
      CREATE TABLE calibrations (
        name TEXT NOT NULL UNIQUE COLLATE NOCASE,
        instrument TEXT COLLATE NOCASE REFERENCES instruments(name),
        voltage_v REAL NOT NULL CHECK (voltage_v > 0),
        nominal_camera_length_m REAL CHECK (nominal_camera_length_m > 0),
        pixel_size_m REAL CHECK (pixel_size_m > 0),
        created TEXT NOT NULL,
        standard_phase_id TEXT NOT NULL,
        camera_length_px REAL NOT NULL CHECK (camera_length_px > 0),
        camera_length_sigma_px REAL NOT NULL CHECK (camera_length_sigma_px >= 0),
        axis_ratio REAL NOT NULL CHECK (axis_ratio >= 1),
        axis_ratio_sigma REAL NOT NULL CHECK (axis_ratio_sigma >= 0),
        angle_deg REAL NOT NULL,
        angle_sigma_deg REAL,
        residuals_json TEXT NOT NULL,
        image_fingerprints_json TEXT NOT NULL,
        rejected_rings_json TEXT NOT NULL,
        notes TEXT NOT NULL DEFAULT ''
      );
      CREATE TABLE analyses (
        id INTEGER PRIMARY KEY AUTOINCREMENT,
        sample_id TEXT,
        operator TEXT,
        created TEXT NOT NULL,
        image_sha256 TEXT NOT NULL,
        image_path TEXT,
        calibration TEXT REFERENCES calibrations(name),
        phase TEXT,
        a_a REAL,
        a_sigma_a REAL,
        verdict TEXT CHECK (verdict IN ('pass', 'fail', 'inconclusive')),
        tolerance REAL,
        result_json TEXT NOT NULL
      );`,
  },
  {
    version: 2,
    description: 'indexes for the drift check and for histories',
    sql: `
      CREATE INDEX calibrations_by_setting ON calibrations (instrument, voltage_v, created);
      CREATE INDEX analyses_by_phase ON analyses (phase, created);
      CREATE INDEX analyses_by_sample ON analyses (sample_id);`,
  },
];

/** The schema version this program writes (the last migration's). */
export const STORE_SCHEMA_VERSION = MIGRATIONS[MIGRATIONS.length - 1]!.version;

/** The file's `PRAGMA user_version`. */
export function schemaVersionOf(db: Database): number {
  return Number(db.exec('PRAGMA user_version')[0]!.values[0]![0]);
}

/**
 * Applies the migrations after the database's version, in order, in one transaction; on
 * any failure the database is rolled back to where it was and the error is rethrown.
 * @param migrations default MIGRATIONS (tests pass their own lists)
 * @returns the versions applied (empty when the database was current)
 * @throws RangeError when the list is not numbered 1, 2, 3, ... or the database is newer than the list
 */
export function applyMigrations(db: Database, migrations: readonly Migration[] = MIGRATIONS): number[] {
  migrations.forEach((m, i) => {
    if (m.version !== i + 1) throw new RangeError(`migrations must be numbered 1, 2, 3, ...; entry ${i} has version ${m.version}`);
  });
  const from = schemaVersionOf(db);
  if (from > migrations.length) throw new RangeError(`the database has schema version ${from}, newer than the ${migrations.length} known`);
  const pending = migrations.slice(from);
  if (pending.length === 0) return [];
  db.run('BEGIN IMMEDIATE');
  try {
    for (const m of pending) db.exec(m.sql);
    db.run(`PRAGMA application_id = ${STORE_APPLICATION_ID}`);
    db.run(`PRAGMA user_version = ${pending[pending.length - 1]!.version}`);
    db.run('COMMIT');
  } catch (error) {
    try {
      db.run('ROLLBACK');
    } catch {
      // SQLite already rolled the transaction back
    }
    throw error;
  }
  return pending.map((m) => m.version);
}
