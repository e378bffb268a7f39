import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { LabStoreError, openLabStore, STORE_SCHEMA_VERSION } from '../../../../../app/node/store';
import { loadSqlEngine } from '../../../../../app/node/store/sql-engine';
import { analysis, calibration, temporaryFolder } from './store-test-records';

const folder = temporaryFolder('annula-store-open-');
afterAll(() => folder.remove());

let counter = 0;
const nextPath = (): string => join(folder.dir, `case-${++counter}`, 'lab.sqlite');
const fixedClock = () => new Date('2026-03-04T05:06:07.890Z');

async function openError(path: string, options = {}): Promise<LabStoreError> {
  const error = await openLabStore(path, options).then(
    (s) => s.close().then(() => undefined),
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(LabStoreError);
  return error as LabStoreError;
}

/** A store with a calibration and `analyses` analyses (a few pages), its bytes. */
async function storeBytes(path: string, analyses: number): Promise<Buffer> {
  mkdirSync(join(path, '..'), { recursive: true });
  const store = await openLabStore(path, { create: true });
  await store.addCalibration(calibration({ name: 'kept' }));
  for (let i = 0; i < analyses; i++) await store.addAnalysis(analysis({ sampleId: `S-${i}`, result: { padding: 'x'.repeat(900), i } }));
  await store.close();
  return readFileSync(path);
}

/** Opening `path` holding `bytes` moves it aside, unchanged, and says so. */
async function expectMovedAside(path: string, bytes: Uint8Array, problem: RegExp): Promise<string> {
  mkdirSync(join(path, '..'), { recursive: true });
  writeFileSync(path, bytes);
  const error = await openError(path, { now: fixedClock });
  expect(error.reason).toBe('unreadable');
  expect(error.message).toMatch(problem);
  expect(error.backupPath).toBe(`${path}.unreadable-20260304T050607Z`);
  expect(error.message).toContain(`it was moved aside to ${error.backupPath}, unchanged`);
  expect(existsSync(path)).toBe(false);
  expect(readFileSync(error.backupPath!).equals(Buffer.from(bytes))).toBe(true);
  return error.backupPath!;
}

describe('openLabStore: a missing file', () => {
  it("is 'missing' without create, and nothing is written", async () => {
    const path = nextPath();
    mkdirSync(join(path, '..'));
    const error = await openError(path);
    expect(error.reason).toBe('missing');
    expect(error.message).toMatch(/lab\.sqlite: there is no lab store here yet; check the path \(--store or ANNULA_STORE\)/);
    expect(readdirSync(join(path, '..'))).toEqual([]);
  });

  it('with create, becomes a new empty store of the current schema, and leaves no lock or temporary file', async () => {
    const path = nextPath();
    mkdirSync(join(path, '..'));
    const store = await openLabStore(path, { create: true });
    expect(store.fileSchemaVersion).toBe(STORE_SCHEMA_VERSION);
    expect(await store.listCalibrations()).toEqual([]);
    expect(await store.listAnalyses()).toEqual([]);
    await store.close();
    expect(readdirSync(join(path, '..'))).toEqual(['lab.sqlite']);
    expect(readFileSync(path).subarray(0, 16).toString('latin1')).toBe('SQLite format 3\u0000');
  });

  it("says 'folder-missing' for a missing folder unless createFolders is given", async () => {
    const path = nextPath();
    expect((await openError(path, { create: true })).reason).toBe('folder-missing');
    const store = await openLabStore(path, { create: true, createFolders: true });
    await store.close();
    expect(existsSync(path)).toBe(true);
  });

  it("says 'not-a-file' for a folder", async () => {
    const path = nextPath();
    mkdirSync(path, { recursive: true });
    const error = await openError(path, { create: true });
    expect(error.reason).toBe('not-a-file');
    expect(error.message).toMatch(/this is a folder; give the store's file name/);
  });
});

describe('openLabStore: a file that cannot be read is moved aside, never overwritten', () => {
  it('a text file: "not an SQLite database"', async () => {
    await expectMovedAside(nextPath(), Buffer.from('sample,a\nS-1,4.24\n'), /the lab store cannot be read \(it is not an SQLite database\)/);
  });

  it('an empty file', async () => {
    await expectMovedAside(nextPath(), new Uint8Array(0), /\(the file is empty\)/);
  });

  it('a store cut short at a page boundary, mid-page, and inside the header', async () => {
    const whole = await storeBytes(nextPath(), 12);
    const pageSize = whole.readUInt16BE(16);
    expect(whole.byteLength / pageSize).toBeGreaterThan(6);
    await expectMovedAside(nextPath(), whole.subarray(0, 3 * pageSize), /the file is truncated \(12288 bytes; its header says \d+\)/);
    await expectMovedAside(nextPath(), whole.subarray(0, 3 * pageSize + 1234), /not a whole number of 4096-byte pages/);
    await expectMovedAside(nextPath(), whole.subarray(0, 60), /the file is truncated \(60 bytes, shorter than an SQLite header\)/);
  });

  it("a store whose pages were overwritten in the middle fails SQLite's check", async () => {
    const whole = await storeBytes(nextPath(), 12);
    const damaged = Buffer.from(whole);
    const pageSize = damaged.readUInt16BE(16);
    for (let page = 2; page < damaged.byteLength / pageSize; page++) damaged.fill(0xa5, page * pageSize + 8, page * pageSize + 64);
    await expectMovedAside(nextPath(), damaged, /the lab store cannot be read \((SQLite's consistency check fails|SQLite cannot read it)/);
  });

  it('a second unreadable file in the same second gets its own backup name; the first backup stays', async () => {
    const path = nextPath();
    const first = await expectMovedAside(path, Buffer.from('first unreadable content'), /not an SQLite database/);
    writeFileSync(path, 'second unreadable content');
    const error = await openError(path, { now: fixedClock });
    expect(error.backupPath).toBe(`${first}-2`);
    expect(readFileSync(first, 'utf8')).toBe('first unreadable content');
    expect(readFileSync(`${first}-2`, 'utf8')).toBe('second unreadable content');
  });

  it('is reported even with create: a new store is made only by a later open that asks for one', async () => {
    const path = nextPath();
    mkdirSync(join(path, '..'), { recursive: true });
    writeFileSync(path, 'not a database');
    const error = await openError(path, { create: true, now: fixedClock });
    expect(error.reason).toBe('unreadable');
    expect(existsSync(path)).toBe(false);
    const store = await openLabStore(path, { create: true });
    expect(await store.listCalibrations()).toEqual([]);
    await store.close();
    expect(readFileSync(error.backupPath!, 'utf8')).toBe('not a database');
  });

  it('a store damaged on disk while open is moved aside at the next read, and a write saves nothing', async () => {
    const path = nextPath();
    await storeBytes(path, 1);
    const store = await openLabStore(path, { now: fixedClock });
    writeFileSync(path, 'overwritten by another program');
    const read = await store.listCalibrations().catch((e: unknown) => e as LabStoreError);
    expect((read as LabStoreError).reason).toBe('unreadable');
    expect(readFileSync((read as LabStoreError).backupPath!, 'utf8')).toBe('overwritten by another program');
    const write = await store.addAnalysis(analysis()).catch((e: unknown) => e as LabStoreError);
    expect((write as LabStoreError).reason).toBe('missing');
    expect((write as LabStoreError).message).toMatch(/moved or deleted while Annula had it open, so nothing was saved/);
    expect(existsSync(path)).toBe(false);
    await store.close();
  });
});

describe('openLabStore: files that are refused and left untouched', () => {
  it('a store of a newer schema version: "update Annula"', async () => {
    const SQL = await loadSqlEngine();
    const path = nextPath();
    const db = new SQL.Database(await storeBytes(path, 1));
    db.run(`PRAGMA user_version = ${STORE_SCHEMA_VERSION + 5}`);
    const bytes = db.export();
    db.close();
    writeFileSync(path, bytes);
    const error = await openError(path, { create: true });
    expect(error.reason).toBe('newer-schema');
    expect(error.message).toMatch(
      new RegExp(`written by a newer version of Annula \\(schema version ${STORE_SCHEMA_VERSION + 5}; this version reads up to ${STORE_SCHEMA_VERSION}\\); update Annula to use it \\(the file was left unchanged\\)`),
    );
    expect(readFileSync(path).equals(Buffer.from(bytes))).toBe(true);
    expect(readdirSync(join(path, '..'))).toEqual(['lab.sqlite']);
  });

  it("another program's SQLite database", async () => {
    const SQL = await loadSqlEngine();
    const db = new SQL.Database();
    db.run("CREATE TABLE photos (id INTEGER PRIMARY KEY, title TEXT); INSERT INTO photos (title) VALUES ('holiday')");
    const bytes = db.export();
    db.close();
    const path = nextPath();
    mkdirSync(join(path, '..'), { recursive: true });
    writeFileSync(path, bytes);
    const error = await openError(path, { create: true });
    expect(error.reason).toBe('foreign');
    expect(error.message).toMatch(/an SQLite database of another program \(it has tables of its own\), not an Annula lab store; choose another store file with --store \(this file was left unchanged\)/);
    expect(readFileSync(path).equals(Buffer.from(bytes))).toBe(true);
  });

  it('an empty SQLite database (no tables) is taken as a new store', async () => {
    const SQL = await loadSqlEngine();
    const db = new SQL.Database();
    db.run('CREATE TABLE t (x); DROP TABLE t'); // a real file with a header, but nothing in it
    const bytes = db.export();
    db.close();
    const path = nextPath();
    mkdirSync(join(path, '..'), { recursive: true });
    writeFileSync(path, bytes);
    const store = await openLabStore(path);
    expect(store.fileSchemaVersion).toBe(0);
    await store.addCalibration(calibration({ name: 'first' }));
    expect(store.fileSchemaVersion).toBe(STORE_SCHEMA_VERSION);
    await store.close();
  });
});
