/**
 * The lab's records: one local SQLite database file (through sql.js) holding instruments,
 * camera calibrations and analyses. The CLI and the desktop app's main process open it with
 * `openLabStore` and share it safely:
 *
 * - Nothing a user saved is lost or replaced. Records are only added; a name that exists is
 *   refused. Every committed change is written as a whole new file (temporary file in the
 *   same folder, fsync, atomic rename, fsync of the folder: see store-file.ts), so the file
 *   is always the last complete database; a record is committed when its add... call returns.
 *   The cost is a whole-file read and write per commit (sql.js keeps the database in memory):
 *   measured here, about 12 ms per record while a store grew to 150 kB, 46 ms at 2 MB, 140 ms at 20 MB.
 * - One writer at a time: each change takes the store's lock file (store-lock.ts), reloads
 *   the file from disk, applies the change in a transaction, writes, and releases the lock.
 *   Two processes taking turns therefore never lose each other's records. Reads reload when
 *   the file changed on disk since it was last read (its inode, size and modification time).
 * - Opening policy. No file: an error ('missing'), unless `create: true`, which creates a new
 *   empty store (never over a file that appeared meanwhile). A file that is not SQLite, is
 *   truncated or damaged: it is renamed aside to `<file>.unreadable-<UTC timestamp>` (an
 *   earlier backup is never replaced) and a LabStoreError 'unreadable' names the backup; this
 *   happens even with `create: true`, so the caller always learns of it; a new store is made
 *   only by a later open with `create: true` (the next command that saves a record). A file
 *   of a newer schema is refused and left untouched ('newer-schema': update Annula), and so
 *   is another program's SQLite database ('foreign'). An SQLite file with no tables and no
 *   application id counts as an empty store.
 * - Older schemas are migrated in memory when read (store-schema.ts); the file itself is
 *   upgraded by the next write, after a copy of the old file is kept beside it as
 *   `<file>.schema-<n>-<UTC timestamp>`.
 *
 * Example:
 *   const store = await openLabStore(resolveStorePath().path, { create: true });
 *   await store.addCalibration({ name: 'TEM-2 200kV 2026-03', ... });
 *   const previous = await store.previousCalibration({ instrument: 'TEM-2', voltageV: 200e3, nominalCameraLengthM: 1 });
 *   await store.close();
 */
import { mkdir, stat } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import type { Database, SqlJsStatic, SqlValue } from 'sql.js';
import { calibrationDrift, type CalibrationDrift } from './calibration-drift';
import { errorCode, LabStoreError } from './lab-store-error';
import { loadSqlEngine } from './sql-engine';
import { openStoreBytes, type StoreBytesProblem } from './store-database';
import { num, previousIn, query, sameSql, SUMMARY_COLUMNS, toAnalysisSummary, toCalibration, toInstrument } from './store-rows';
import { copyStoreAside, moveStoreAside, readStoreBytes, removeLeftovers, writeStoreFile } from './store-file';
import { DEFAULT_LOCK_TIMEOUT_MS, withStoreLock, type StoreLock } from './store-lock';
import {
  isoDate,
  newAnalysisSchema,
  newCalibrationSchema,
  newInstrumentSchema,
  parseRecord,
  type AnalysisRecord,
  type AnalysisSummary,
  type CalibrationRecord,
  type InstrumentRecord,
  type NewAnalysis,
  type NewCalibration,
  type NewInstrument,
  type Verdict,
} from './store-records';
import { applyMigrations, STORE_SCHEMA_VERSION } from './store-schema';

export interface OpenLabStoreOptions {
  /** Create a new, empty store when there is no file at the path; default false. */
  create?: boolean;
  /** With `create`, also create missing folders (for the default location in the user's data directory); default false. */
  createFolders?: boolean;
  /** Longest wait for another writer's lock, ms; default 15000. */
  lockTimeoutMs?: number;
  /** What this program is, recorded in the lock file for others' messages; default "annula". */
  tool?: string;
  /** The clock for record dates and backup names; default the system clock. */
  now?: () => Date;
  /** Told about things worth a note to the user: a schema upgrade and its backup copy, removed leftovers. */
  onNotice?: (message: string) => void;
}

/** The setting a calibration belongs to, for finding the previous one (drift check). */
export interface CalibrationSetting {
  /** Null: calibrations recorded without an instrument. */
  instrument: string | null;
  voltageV: number;
  /** Null: calibrations without a nominal camera length. */
  nominalCameraLengthM: number | null;
  /** When given (a number or null), the pixel pitch must match too; left out, any pixel pitch matches. */
  pixelSizeM?: number | null;
  /** Only calibrations created strictly before this ISO date; default: all. */
  before?: string;
}

export interface CalibrationFilter {
  instrument?: string;
  voltageV?: number;
}

export interface AnalysisFilter {
  /** Phase id (ASCII case ignored). */
  phase?: string;
  /** ISO 8601 date or date-time: analyses created at or after it. */
  since?: string;
  sampleId?: string;
  calibration?: string;
  verdict?: Verdict;
}

/** What addCalibration did. */
export interface AddedCalibration {
  calibration: CalibrationRecord;
  /** The instrument was not in the store and was recorded with it (empty description). */
  instrumentAdded: boolean;
  /** The latest earlier calibration at the same setting, if any. */
  previous: CalibrationRecord | null;
  /** The drift check against `previous` (null without one). */
  drift: CalibrationDrift | null;
}

export interface LabStore {
  /** Absolute path of the store file. */
  readonly path: string;
  /** The schema version of the file on disk when last read (lower than the current one until the first write upgrades it). */
  readonly fileSchemaVersion: number;
  /** @throws LabStoreError 'duplicate' when an instrument of that name (ASCII case ignored) exists; 'invalid-record' */
  addInstrument(instrument: NewInstrument): Promise<InstrumentRecord>;
  findInstrument(name: string): Promise<InstrumentRecord | null>;
  listInstruments(): Promise<InstrumentRecord[]>;
  /**
   * Adds a calibration (its instrument too, when new) and checks it against the previous
   * one at the same setting.
   * @throws LabStoreError 'duplicate' (a calibration of that name exists: it is never replaced), 'invalid-record'
   */
  addCalibration(calibration: NewCalibration): Promise<AddedCalibration>;
  /** The calibration of that name (ASCII case ignored), or null. */
  findCalibration(name: string): Promise<CalibrationRecord | null>;
  /** Calibrations, oldest first. */
  listCalibrations(filter?: CalibrationFilter): Promise<CalibrationRecord[]>;
  /** The latest calibration at `setting` (see CalibrationSetting), or null. */
  previousCalibration(setting: CalibrationSetting): Promise<CalibrationRecord | null>;
  /**
   * Adds an analysis; its id is assigned by the store.
   * @throws LabStoreError 'unknown-reference' when it names a calibration the store does not hold; 'invalid-record'
   */
  addAnalysis(analysis: NewAnalysis): Promise<AnalysisRecord>;
  findAnalysis(id: number): Promise<AnalysisRecord | null>;
  /** Analyses without their full results, oldest first. @throws RangeError for a `since` that is not an ISO date */
  listAnalyses(filter?: AnalysisFilter): Promise<AnalysisSummary[]>;
  /** Waits for writes in progress, then closes; later calls fail with LabStoreError 'closed'. */
  close(): Promise<void>;
}

/** A stamp that changes whenever the file is replaced or changed (inode, size, modification time in ns). */
async function fileStamp(path: string): Promise<string | null> {
  try {
    const s = await stat(path, { bigint: true });
    return `${s.ino}:${s.size}:${s.mtimeNs}:${s.ctimeNs}`;
  } catch (error) {
    if (errorCode(error) === 'ENOENT') return null;
    throw error;
  }
}

function sameBytes(a: Uint8Array, b: Uint8Array): boolean {
  if (a.byteLength !== b.byteLength) return false;
  for (let i = 0; i < a.byteLength; i++) if (a[i] !== b[i]) return false;
  return true;
}

function missingError(path: string, whileOpen: boolean): LabStoreError {
  return whileOpen
    ? new LabStoreError(path, 'missing', `${path}: the lab store was moved or deleted while Annula had it open, so nothing was saved; put it back, or choose the store with --store`)
    : new LabStoreError(path, 'missing', `${path}: there is no lab store here yet; check the path (--store or ANNULA_STORE), or save a first record to create it`);
}

function refusal(path: string, problem: Exclude<StoreBytesProblem, { kind: 'damaged' }>): LabStoreError {
  if (problem.kind === 'newer') {
    return new LabStoreError(
      path,
      'newer-schema',
      `${path}: this lab store was written by a newer version of Annula (schema version ${problem.version}; this version reads up to ${STORE_SCHEMA_VERSION}); update Annula to use it (the file was left unchanged)`,
    );
  }
  return new LabStoreError(path, 'foreign', `${path}: ${problem.detail}; choose another store file with --store (this file was left unchanged)`);
}

interface Options {
  lockTimeoutMs: number;
  tool: string;
  now: () => Date;
  onNotice: (message: string) => void;
}

class SqlLabStore implements LabStore {
  #db: Database;
  #stamp: string | null;
  #fileVersion: number;
  #closed = false;
  #inFlight = new Set<Promise<unknown>>();

  constructor(
    readonly path: string,
    private readonly SQL: SqlJsStatic,
    private readonly options: Options,
    db: Database,
    fileVersion: number,
    stamp: string | null,
  ) {
    this.#db = db;
    this.#fileVersion = fileVersion;
    this.#stamp = stamp;
  }

  get fileSchemaVersion(): number {
    return this.#fileVersion;
  }

  // --- reading --------------------------------------------------------------------------

  /**
   * Runs `read` on the database as it is on disk now (reloaded first when the file changed).
   * `read` is synchronous and gets the current connection after the last await, so a reload
   * or a write finishing meanwhile can never close the connection under it.
   */
  async #read<T>(read: (db: Database) => T): Promise<T> {
    this.#checkOpen();
    const stamp = await fileStamp(this.path);
    if (stamp === null) throw missingError(this.path, true);
    if (stamp !== this.#stamp) {
      const bytes = await readStoreBytes(this.path);
      if (bytes === null) throw missingError(this.path, true);
      const opened = openStoreBytes(this.SQL, bytes);
      if (!opened.ok) {
        if (opened.problem.kind === 'damaged') throw await setAsideDamaged(this.path, bytes, opened.problem.detail, this.options, false);
        throw refusal(this.path, opened.problem);
      }
      this.#checkOpen();
      this.#replace(opened.db, opened.fileVersion, stamp);
    }
    return read(this.#db);
  }

  #replace(db: Database, fileVersion: number, stamp: string | null): void {
    if (db !== this.#db) this.#db.close();
    this.#db = db;
    this.#fileVersion = fileVersion;
    this.#stamp = stamp;
  }

  #checkOpen(): void {
    if (this.#closed) throw new LabStoreError(this.path, 'closed', `${this.path}: the lab store was closed; open it again`);
  }

  // --- writing --------------------------------------------------------------------------

  /**
   * Under the lock: reload from disk, run `change` in a transaction, write the new file.
   * `change` throws to refuse (nothing is written then).
   */
  #write<T>(change: (db: Database) => T): Promise<T> {
    this.#checkOpen();
    const run = withStoreLock(this.path, { timeoutMs: this.options.lockTimeoutMs, tool: this.options.tool }, (lock) => this.#writeLocked(lock, change));
    this.#inFlight.add(run);
    const forget = (): void => void this.#inFlight.delete(run);
    run.then(forget, forget);
    return run;
  }

  async #writeLocked<T>(lock: StoreLock, change: (db: Database) => T): Promise<T> {
    const removed = await removeLeftovers(this.path);
    if (removed > 0) this.options.onNotice(`removed ${removed} temporary file${removed > 1 ? 's' : ''} left beside ${this.path} by a writer that was stopped`);
    const bytes = await readStoreBytes(this.path);
    if (bytes === null) throw missingError(this.path, true);
    const opened = openStoreBytes(this.SQL, bytes);
    if (!opened.ok) {
      if (opened.problem.kind === 'damaged') throw await setAsideDamaged(this.path, bytes, opened.problem.detail, this.options, true);
      throw refusal(this.path, opened.problem);
    }
    const db = opened.db;
    let result: T;
    try {
      db.run('BEGIN IMMEDIATE');
      try {
        result = change(db);
        db.run('COMMIT');
      } catch (error) {
        try {
          db.run('ROLLBACK');
        } catch {
          // already rolled back by SQLite
        }
        throw error;
      }
      // A file of an older schema (with records: version 1 or later) is kept as it was before its upgrade.
      const copy = opened.fileVersion > 0 && opened.fileVersion < STORE_SCHEMA_VERSION ? await copyStoreAside(this.path, bytes, `schema-${opened.fileVersion}`, this.options.now()) : null;
      const out = db.export();
      db.run('PRAGMA foreign_keys = ON'); // export() reopens the connection
      if (!(await lock.stillHeld())) {
        throw new LabStoreError(this.path, 'locked', `${this.path}: the store's lock file was removed by someone else while saving, so nothing was saved; try again`);
      }
      await writeStoreFile(this.path, out, true);
      if (copy) this.options.onNotice(`the lab store was upgraded from schema version ${opened.fileVersion} to ${STORE_SCHEMA_VERSION}; a copy of the old file is kept at ${copy}`);
    } catch (error) {
      db.close();
      throw error;
    }
    this.#replace(db, STORE_SCHEMA_VERSION, await fileStamp(this.path));
    return result;
  }

  // --- instruments ----------------------------------------------------------------------

  async addInstrument(input: NewInstrument): Promise<InstrumentRecord> {
    const what = `instrument ${JSON.stringify((input as { name?: unknown })?.name ?? '')}`;
    const instrument = parseRecord(newInstrumentSchema, input, what, this.path);
    return this.#write((db) => {
      const created = this.options.now().toISOString(); // under the lock, so dates follow the order of saving
      const existing = query(db, 'SELECT * FROM instruments WHERE name = :name', { ':name': instrument.name });
      if (existing.length) {
        const other = toInstrument(existing[0]!);
        const as = other.name !== instrument.name ? ` as "${other.name}"` : '';
        throw new LabStoreError(this.path, 'duplicate', `instrument "${instrument.name}" was not saved: an instrument of that name is already recorded${as} (since ${other.created}); records are never replaced: use it as it is, or choose another name`);
      }
      db.run('INSERT INTO instruments (name, description, created) VALUES (:name, :description, :created)', {
        ':name': instrument.name,
        ':description': instrument.description,
        ':created': created,
      });
      return { name: instrument.name, description: instrument.description, created };
    });
  }

  async findInstrument(name: string): Promise<InstrumentRecord | null> {
    const rows = await this.#read((db) => query(db, 'SELECT * FROM instruments WHERE name = :name', { ':name': String(name).trim() }));
    return rows.length ? toInstrument(rows[0]!) : null;
  }

  async listInstruments(): Promise<InstrumentRecord[]> {
    return this.#read((db) => query(db, 'SELECT * FROM instruments ORDER BY name').map(toInstrument));
  }

  // --- calibrations ---------------------------------------------------------------------

  async addCalibration(input: NewCalibration): Promise<AddedCalibration> {
    const what = `calibration ${JSON.stringify((input as { name?: unknown })?.name ?? '')}`;
    const c = parseRecord(newCalibrationSchema, input, what, this.path);
    return this.#write((db) => {
      const created = c.created ?? this.options.now().toISOString();
      const existing = query(db, 'SELECT name, created FROM calibrations WHERE name = :name', { ':name': c.name });
      if (existing.length) {
        const as = existing[0]!.name !== c.name ? ` as "${String(existing[0]!.name)}"` : '';
        throw new LabStoreError(
          this.path,
          'duplicate',
          `calibration "${c.name}" was not saved: a calibration of that name already exists${as} (saved ${String(existing[0]!.created)}); records are never replaced: choose another name, e.g. "${c.name} ${created.slice(0, 10)}"`,
        );
      }
      let instrument: string | null = null;
      let instrumentAdded = false;
      if (c.instrument !== null) {
        const known = query(db, 'SELECT name FROM instruments WHERE name = :name', { ':name': c.instrument });
        if (known.length) {
          instrument = String(known[0]!.name);
        } else {
          instrument = c.instrument;
          instrumentAdded = true;
          db.run("INSERT INTO instruments (name, description, created) VALUES (:name, '', :created)", { ':name': instrument, ':created': this.options.now().toISOString() });
        }
      }
      const record: CalibrationRecord = {
        name: c.name,
        instrument,
        voltageV: c.voltageV,
        nominalCameraLengthM: c.nominalCameraLengthM,
        pixelSizeM: c.pixelSizeM,
        created,
        standardPhaseId: c.standardPhaseId,
        cameraLengthPx: c.cameraLengthPx,
        cameraLengthSigmaPx: c.cameraLengthSigmaPx,
        axisRatio: c.axisRatio,
        axisRatioSigma: c.axisRatioSigma,
        angleDeg: c.angleDeg,
        angleSigmaDeg: c.angleSigmaDeg,
        residuals: c.residuals,
        imageFingerprints: c.imageFingerprints,
        rejectedRings: c.rejectedRings,
        notes: c.notes,
      };
      // The previous one: the latest at or before this one's date, at the same setting.
      const previous = previousIn(db, {
        instrument,
        voltageV: record.voltageV,
        nominalCameraLengthM: record.nominalCameraLengthM,
        pixelSizeM: record.pixelSizeM,
        before: new Date(Date.parse(created) + 1).toISOString(),
      });
      db.run(
        `INSERT INTO calibrations (name, instrument, voltage_v, nominal_camera_length_m, pixel_size_m, created, standard_phase_id,
           camera_length_px, camera_length_sigma_px, axis_ratio, axis_ratio_sigma, angle_deg, angle_sigma_deg,
           residuals_json, image_fingerprints_json, rejected_rings_json, notes)
         VALUES (:name, :instrument, :voltage, :length, :pixel, :created, :standard, :l, :ls, :q, :qs, :angle, :angles, :residuals, :images, :rejected, :notes)`,
        {
          ':name': record.name,
          ':instrument': record.instrument,
          ':voltage': record.voltageV,
          ':length': record.nominalCameraLengthM,
          ':pixel': record.pixelSizeM,
          ':created': record.created,
          ':standard': record.standardPhaseId,
          ':l': record.cameraLengthPx,
          ':ls': record.cameraLengthSigmaPx,
          ':q': record.axisRatio,
          ':qs': record.axisRatioSigma,
          ':angle': record.angleDeg,
          ':angles': record.angleSigmaDeg,
          ':residuals': JSON.stringify(record.residuals),
          ':images': JSON.stringify(record.imageFingerprints),
          ':rejected': JSON.stringify(record.rejectedRings),
          ':notes': record.notes,
        },
      );
      return { calibration: record, instrumentAdded, previous, drift: previous ? calibrationDrift(previous, record) : null };
    });
  }

  async findCalibration(name: string): Promise<CalibrationRecord | null> {
    const rows = await this.#read((db) => query(db, 'SELECT * FROM calibrations WHERE name = :name', { ':name': String(name).trim() }));
    return rows.length ? toCalibration(rows[0]!) : null;
  }

  async listCalibrations(filter: CalibrationFilter = {}): Promise<CalibrationRecord[]> {
    const clauses: string[] = [];
    const params: Record<string, SqlValue> = {};
    if (filter.instrument !== undefined) {
      clauses.push('instrument = :instrument');
      params[':instrument'] = filter.instrument.trim();
    }
    if (filter.voltageV !== undefined) {
      if (!(filter.voltageV > 0)) throw new RangeError(`voltageV must be a positive number of volts; got ${filter.voltageV}`);
      clauses.push(sameSql('voltage_v', ':voltage'));
      params[':voltage'] = filter.voltageV;
    }
    const where = clauses.length ? `WHERE ${clauses.join(' AND ')}` : '';
    return this.#read((db) => query(db, `SELECT * FROM calibrations ${where} ORDER BY created, rowid`, params).map(toCalibration));
  }

  async previousCalibration(setting: CalibrationSetting): Promise<CalibrationRecord | null> {
    if (!(setting.voltageV > 0)) throw new RangeError(`voltageV must be a positive number of volts; got ${setting.voltageV}`);
    const before = setting.before === undefined ? undefined : parseDateArgument(setting.before, 'before');
    return this.#read((db) => previousIn(db, { ...setting, instrument: setting.instrument === null ? null : setting.instrument.trim(), before }));
  }

  // --- analyses -------------------------------------------------------------------------

  async addAnalysis(input: NewAnalysis): Promise<AnalysisRecord> {
    const a = parseRecord(newAnalysisSchema, input, 'analysis', this.path);
    let resultJson: string;
    try {
      resultJson = JSON.stringify(a.result);
    } catch (error) {
      throw new LabStoreError(this.path, 'invalid-record', `analysis was not saved: result: cannot be written as JSON (${(error as Error).message}); pass plain data`, { cause: error });
    }
    return this.#write((db) => {
      const created = a.created ?? this.options.now().toISOString();
      let calibration: string | null = null;
      if (a.calibration !== null) {
        const known = query(db, 'SELECT name FROM calibrations WHERE name = :name', { ':name': a.calibration });
        if (!known.length) {
          throw new LabStoreError(
            this.path,
            'unknown-reference',
            `analysis was not saved: calibration "${a.calibration}" is not in the lab store ${this.path}; save that calibration first, or record the analysis without one (annula calibrations lists those saved)`,
          );
        }
        calibration = String(known[0]!.name);
      }
      db.run(
        `INSERT INTO analyses (sample_id, operator, created, image_sha256, image_path, calibration, phase, a_a, a_sigma_a, verdict, tolerance, result_json)
         VALUES (:sample, :operator, :created, :sha, :path, :calibration, :phase, :a, :as, :verdict, :tolerance, :result)`,
        {
          ':sample': a.sampleId,
          ':operator': a.operator,
          ':created': created,
          ':sha': a.imageSha256,
          ':path': a.imagePath,
          ':calibration': calibration,
          ':phase': a.phase,
          ':a': a.aA,
          ':as': a.aSigmaA,
          ':verdict': a.verdict,
          ':tolerance': a.tolerance,
          ':result': resultJson,
        },
      );
      const id = num(db.exec('SELECT last_insert_rowid()')[0]!.values[0]![0]!);
      return {
        id,
        sampleId: a.sampleId,
        operator: a.operator,
        created,
        imageSha256: a.imageSha256,
        imagePath: a.imagePath,
        calibration,
        phase: a.phase,
        aA: a.aA,
        aSigmaA: a.aSigmaA,
        verdict: a.verdict,
        tolerance: a.tolerance,
        result: JSON.parse(resultJson),
      };
    });
  }

  async findAnalysis(id: number): Promise<AnalysisRecord | null> {
    if (!Number.isInteger(id)) throw new TypeError(`id must be an integer analysis id; got ${id}`);
    const rows = await this.#read((db) => query(db, `SELECT ${SUMMARY_COLUMNS}, result_json FROM analyses WHERE id = :id`, { ':id': id }));
    if (!rows.length) return null;
    return { ...toAnalysisSummary(rows[0]!), result: JSON.parse(String(rows[0]!.result_json)) };
  }

  async listAnalyses(filter: AnalysisFilter = {}): Promise<AnalysisSummary[]> {
    const clauses: string[] = [];
    const params: Record<string, SqlValue> = {};
    if (filter.phase !== undefined) {
      clauses.push('phase = :phase COLLATE NOCASE');
      params[':phase'] = filter.phase.trim();
    }
    if (filter.since !== undefined) {
      clauses.push('created >= :since');
      params[':since'] = parseDateArgument(filter.since, 'since');
    }
    if (filter.sampleId !== undefined) {
      clauses.push('sample_id = :sample');
      params[':sample'] = filter.sampleId.trim();
    }
    if (filter.calibration !== undefined) {
      clauses.push('calibration = :calibration COLLATE NOCASE');
      params[':calibration'] = filter.calibration.trim();
    }
    if (filter.verdict !== undefined) {
      clauses.push('verdict = :verdict');
      params[':verdict'] = filter.verdict;
    }
    const where = clauses.length ? `WHERE ${clauses.join(' AND ')}` : '';
    return this.#read((db) => query(db, `SELECT ${SUMMARY_COLUMNS} FROM analyses ${where} ORDER BY created, id`, params).map(toAnalysisSummary));
  }

  async close(): Promise<void> {
    if (this.#closed) return;
    await Promise.allSettled([...this.#inFlight]);
    this.#closed = true;
    this.#db.close();
  }
}

/** An ISO date argument normalised as stored; RangeError naming `name` otherwise. */
function parseDateArgument(value: string, name: string): string {
  const parsed = isoDate.safeParse(value);
  if (!parsed.success) throw new RangeError(`${name}: ${JSON.stringify(value)} is not an ISO 8601 date such as 2026-01-01 or 2026-01-01T08:00:00Z`);
  return parsed.data;
}

/**
 * Moves a damaged store file aside (under the lock, after checking it still holds the
 * bytes judged damaged) and returns the error to throw, naming the backup.
 */
async function setAsideDamaged(path: string, bytes: Uint8Array, detail: string, options: Options, haveLock: boolean): Promise<LabStoreError> {
  const move = async (): Promise<LabStoreError | 'changed'> => {
    const now = await readStoreBytes(path);
    if (now === null) return 'changed';
    if (!sameBytes(now, bytes)) return 'changed';
    const backup = await moveStoreAside(path, 'unreadable', options.now());
    return new LabStoreError(
      path,
      'unreadable',
      `${path}: the lab store cannot be read (${detail}); it was moved aside to ${backup}, unchanged. Keep that file: an SQLite repair tool may recover records from it. A new, empty store is created at ${path} when a record is next saved`,
      { backupPath: backup },
    );
  };
  try {
    const outcome = haveLock ? await move() : await withStoreLock(path, { timeoutMs: options.lockTimeoutMs, tool: options.tool }, move);
    if (outcome !== 'changed') return outcome;
    return new LabStoreError(path, 'unreadable', `${path}: the lab store could not be read (${detail}) and was replaced on disk meanwhile by another program; try again`);
  } catch (error) {
    const why = error instanceof LabStoreError ? error.message : String(error);
    return new LabStoreError(
      path,
      'unreadable',
      `${path}: the lab store cannot be read (${detail}); it could not be moved aside either (${why}), so it was left where it is, unchanged; move it away yourself, or choose another store with --store`,
      { cause: error },
    );
  }
}

/**
 * Opens the lab store at `path` (see the header for the policy on missing, damaged, newer
 * and foreign files).
 * @throws LabStoreError 'missing' (no file, create not asked), 'folder-missing', 'not-a-file', 'no-access',
 *   'unreadable' (moved aside: `backupPath`), 'newer-schema', 'foreign', 'locked' (creating only)
 * @throws TypeError for an empty path
 */
export async function openLabStore(path: string, options: OpenLabStoreOptions = {}): Promise<LabStore> {
  if (typeof path !== 'string' || path.trim() === '') throw new TypeError(`path must be a non-empty string; got ${JSON.stringify(path)}`);
  const file = resolve(path);
  const opts: Options = {
    lockTimeoutMs: options.lockTimeoutMs ?? DEFAULT_LOCK_TIMEOUT_MS,
    tool: options.tool ?? 'annula',
    now: options.now ?? (() => new Date()),
    onNotice: options.onNotice ?? (() => undefined),
  };
  const SQL = await loadSqlEngine();
  try {
    if ((await stat(file)).isDirectory()) {
      throw new LabStoreError(file, 'not-a-file', `${file}: this is a folder; give the store's file name, e.g. ${resolve(file, 'lab-records.sqlite')}`);
    }
  } catch (error) {
    if (error instanceof LabStoreError) throw error;
    if (errorCode(error) === 'EACCES') throw new LabStoreError(file, 'no-access', `${file}: permission to read the lab store is denied; ask for access or choose another store file with --store`, { cause: error });
    // ENOENT and the like: handled below
  }
  for (let attempt = 0; attempt < 3; attempt++) {
    const stamp = await fileStamp(file).catch(() => null);
    const bytes = await readStoreBytes(file);
    if (bytes === null) {
      if (!options.create) throw missingError(file, false);
      if (options.createFolders) await mkdir(dirname(file), { recursive: true }).catch(() => undefined);
      await createStore(file, SQL, opts);
      continue; // read back what is on disk now (ours, or one that appeared meanwhile)
    }
    const opened = openStoreBytes(SQL, bytes);
    if (opened.ok) return new SqlLabStore(file, SQL, opts, opened.db, opened.fileVersion, stamp);
    if (opened.problem.kind === 'damaged') throw await setAsideDamaged(file, bytes, opened.problem.detail, opts, false);
    throw refusal(file, opened.problem);
  }
  throw new LabStoreError(file, 'unwritable', `${file}: the lab store keeps changing on disk while being opened; try again`);
}

/** Writes a new, empty store at `file` unless a file appeared there meanwhile. */
async function createStore(file: string, SQL: SqlJsStatic, options: Options): Promise<void> {
  await withStoreLock(file, { timeoutMs: options.lockTimeoutMs, tool: options.tool }, async () => {
    if ((await readStoreBytes(file)) !== null) return;
    const db = new SQL.Database();
    try {
      applyMigrations(db);
      await writeStoreFile(file, db.export(), false);
    } finally {
      db.close();
    }
  });
}
