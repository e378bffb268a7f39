import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { MIGRATIONS, openLabStore, STORE_SCHEMA_VERSION } from '../../../../../app/node/store';
import { loadSqlEngine } from '../../../../../app/node/store/sql-engine';
import { applyMigrations, schemaVersionOf, STORE_APPLICATION_ID, type Migration } from '../../../../../app/node/store/store-schema';
import { analysis, fingerprint, temporaryFolder } from './store-test-records';

const folder = temporaryFolder('annula-store-migrate-');
afterAll(() => folder.remove());

/** A version-1 store file, written with the first migration only and rows in the version-1 shape. */
async function versionOneFile(path: string): Promise<Uint8Array> {
  const SQL = await loadSqlEngine();
  const db = new SQL.Database();
  expect(applyMigrations(db, MIGRATIONS.slice(0, 1))).toEqual([1]);
  db.run("INSERT INTO instruments (name, description, created) VALUES ('TEM-1 south bay', 'fictional 120 kV column', '2025-11-01T00:00:00.000Z')");
  db.run(
    `INSERT INTO calibrations (name, instrument, voltage_v, nominal_camera_length_m, pixel_size_m, created, standard_phase_id,
       camera_length_px, camera_length_sigma_px, axis_ratio, axis_ratio_sigma, angle_deg, angle_sigma_deg,
       residuals_json, image_fingerprints_json, rejected_rings_json, notes)
     VALUES ('November', 'TEM-1 south bay', 120000, 0.8, 28e-6, '2025-11-02T00:00:00.000Z', 'Au', 28571.4, 3.1, 1.004, 0.0005, 12, 7,
       '[{"hkl":[1,1,1],"dA":2.3545,"residualPpm":12,"radiusPx":null,"image":null}]', ?, '[]', 'made by an older Annula')`,
    [JSON.stringify([{ sha256: fingerprint('old gold'), path: null }])],
  );
  db.run(
    "INSERT INTO analyses (sample_id, operator, created, image_sha256, image_path, calibration, phase, a_a, a_sigma_a, verdict, tolerance, result_json) VALUES ('S-001', NULL, '2025-11-03T00:00:00.000Z', ?, NULL, 'November', 'TiN', 4.2402, 0.0011, 'pass', 0.005, '{\"old\":true}')",
    [fingerprint('film S-001')],
  );
  const bytes = db.export();
  db.close();
  mkdirSync(join(path, '..'), { recursive: true });
  writeFileSync(path, bytes);
  return bytes;
}

describe('the schema migrations', () => {
  it('MIGRATIONS are numbered 1, 2, ... and STORE_SCHEMA_VERSION is the last', () => {
    expect(MIGRATIONS.map((m) => m.version)).toEqual(MIGRATIONS.map((_, i) => i + 1));
    expect(STORE_SCHEMA_VERSION).toBe(MIGRATIONS.length);
  });

  it('applyMigrations runs all pending migrations in one transaction: a failing one leaves the database at its old version', async () => {
    const SQL = await loadSqlEngine();
    const db = new SQL.Database();
    applyMigrations(db, MIGRATIONS.slice(0, 1));
    const broken: Migration[] = [
      MIGRATIONS[0]!,
      { version: 2, description: 'adds a table', sql: 'CREATE TABLE extra (x INTEGER)' },
      { version: 3, description: 'a mistake', sql: 'ALTER TABLE no_such_table ADD COLUMN y TEXT' },
    ];
    expect(() => applyMigrations(db, broken)).toThrow(/no such table: no_such_table/);
    expect(schemaVersionOf(db)).toBe(1);
    expect(db.exec("SELECT name FROM sqlite_master WHERE name = 'extra'")).toEqual([]);
    expect(() => applyMigrations(db, [MIGRATIONS[0]!, { version: 3, description: 'skips 2', sql: '' }])).toThrow(/numbered 1, 2, 3/);
    db.close();
  });

  it('an old-version file opens, reads unchanged, and is upgraded by the first write, with a copy of the old file kept', async () => {
    const path = join(folder.dir, 'v1', 'lab.sqlite');
    const original = await versionOneFile(path);
    const notices: string[] = [];
    const store = await openLabStore(path, { now: () => new Date('2026-01-15T12:00:00Z'), onNotice: (m) => notices.push(m) });
    expect(store.fileSchemaVersion).toBe(1);
    const old = await store.findCalibration('November');
    expect(old).toMatchObject({ instrument: 'TEM-1 south bay', voltageV: 120e3, cameraLengthPx: 28571.4, notes: 'made by an older Annula' });
    expect(await store.findAnalysis(1)).toMatchObject({ sampleId: 'S-001', calibration: 'November', verdict: 'pass', result: { old: true } });
    // Reading never writes.
    expect(readFileSync(path).equals(Buffer.from(original))).toBe(true);

    const added = await store.addAnalysis(analysis({ calibration: 'november', created: '2026-01-15T12:00:00Z' }));
    expect(added.id).toBe(2);
    expect(store.fileSchemaVersion).toBe(STORE_SCHEMA_VERSION);
    const copy = `${path}.schema-1-20260115T120000Z`;
    expect(notices).toEqual([`the lab store was upgraded from schema version 1 to ${STORE_SCHEMA_VERSION}; a copy of the old file is kept at ${copy}`]);
    expect(readFileSync(copy).equals(Buffer.from(original))).toBe(true);
    await store.close();

    const SQL = await loadSqlEngine();
    const db = new SQL.Database(readFileSync(path));
    expect(schemaVersionOf(db)).toBe(STORE_SCHEMA_VERSION);
    expect(Number(db.exec('PRAGMA application_id')[0]!.values[0]![0])).toBe(STORE_APPLICATION_ID);
    expect(db.exec("SELECT name FROM sqlite_master WHERE type = 'index' AND name NOT LIKE 'sqlite_%' ORDER BY name")[0]!.values.flat()).toEqual([
      'analyses_by_phase',
      'analyses_by_sample',
      'calibrations_by_setting',
    ]);
    db.close();
    const reopened = await openLabStore(path);
    expect(reopened.fileSchemaVersion).toBe(STORE_SCHEMA_VERSION);
    expect(await reopened.findCalibration('November')).toEqual(old);
    expect((await reopened.listAnalyses()).map((a) => a.sampleId)).toEqual(['S-001', 'S-104']);
    await reopened.close();
    expect(readdirSync(join(path, '..')).sort()).toEqual(['lab.sqlite', 'lab.sqlite.schema-1-20260115T120000Z']);
  });
});
