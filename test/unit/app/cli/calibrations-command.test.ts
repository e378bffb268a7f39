import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { openLabStore, STORE_SCHEMA_VERSION } from '../../../../app/node/store';
import { loadSqlEngine } from '../../../../app/node/store/sql-engine';
import { calibration, temporaryFolder } from '../node/store/store-test-records';
import { runCli } from './run-cli';

const folder = temporaryFolder('annula-cli-calibrations-');
const storePath = join(folder.dir, 'lab.sqlite');
const savedEnv = { ANNULA_STORE: process.env.ANNULA_STORE, XDG_DATA_HOME: process.env.XDG_DATA_HOME };

beforeAll(async () => {
  const store = await openLabStore(storePath, { create: true });
  await store.addCalibration(calibration({ name: 'TEM-2 January', created: '2026-01-12T08:00:00Z', cameraLengthPx: 71_000, cameraLengthSigmaPx: 6 }));
  await store.addCalibration(calibration({ name: 'TEM-2 March', created: '2026-03-02T08:00:00Z', cameraLengthPx: 72_000, cameraLengthSigmaPx: 7.5 }));
  await store.addCalibration(calibration({ name: 'TEM-2 April', created: '2026-04-06T08:00:00Z', cameraLengthPx: 72_100, cameraLengthSigmaPx: 5 }));
  await store.addCalibration(calibration({ name: 'TEM-2 300 kV', created: '2026-02-01T08:00:00Z', voltageV: 300e3, nominalCameraLengthM: 0.8, cameraLengthPx: 56_000 }));
  await store.addCalibration(calibration({ name: 'TEM-1 first', instrument: 'TEM-1 south bay', created: '2026-02-03T08:00:00Z', voltageV: 120e3, cameraLengthPx: 40_000 }));
  await store.close();
});
afterEach(() => {
  for (const [k, v] of Object.entries(savedEnv)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
});
afterAll(() => folder.remove());

describe('annula calibrations', () => {
  it('--store <file> lists every calibration oldest first with L/p ± sigma and flags a change above 1% as possible drift', async () => {
    const r = await runCli('calibrations', '--store', storePath);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^name\s+instrument\s+kV\s+nominal L \(m\)\s+L\/p \(px\)\s+axis ratio\s+date\s+standard\s+drift$/);
    expect(lines.slice(1, 6).map((l) => l.split(/\s{2,}/)[0])).toEqual(['TEM-2 January', 'TEM-2 300 kV', 'TEM-1 first', 'TEM-2 March', 'TEM-2 April']);
    expect(r.stdout).toMatch(/TEM-2 January\s+TEM-2 north bay\s+200\s+1\.000\s+71000\.0 ± 6\.0\s+1\.01200 ± 0\.00080\s+2026-01-12\s+Au\s*\n/);
    // 72000 / 71000 - 1 = +1.41%: flagged; 72100 / 72000 - 1 = +0.14%: not.
    expect(r.stdout).toMatch(/TEM-2 March\s+.*72000\.0 ± 7\.5\s+.*2026-03-02\s+Au\s+\+1\.41% POSSIBLE DRIFT/);
    expect(r.stdout).toMatch(/TEM-2 April\s+.*72100\.0 ± 5\.0\s+.*\+0\.14%\n/);
    expect(r.stdout).toContain(`5 calibrations in ${storePath}.`);
    expect(r.stderr).toBe(
      'warning: "TEM-2 March": camera length 1.41% above "TEM-2 January" (2026-01-12), more than 1%: possible drift; check the microscope\'s settings (lens currents, specimen height, detector) before using it\n',
    );
  });

  it('--json gives the full records with "drift" (null for the first at a setting)', async () => {
    const r = await runCli('calibrations', '--store', storePath, '--json');
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.stdout) as Array<Record<string, unknown> & { drift: { previousName: string; relativeChange: number; flagged: boolean } | null }>;
    expect(rows.map((c) => c.name)).toEqual(['TEM-2 January', 'TEM-2 300 kV', 'TEM-1 first', 'TEM-2 March', 'TEM-2 April']);
    expect(rows[0]).toMatchObject({ instrument: 'TEM-2 north bay', voltageV: 200000, nominalCameraLengthM: 1, cameraLengthPx: 71000, standardPhaseId: 'Au', drift: null });
    expect(rows[0]!.residuals).toHaveLength(3);
    expect(rows[3]!.drift).toMatchObject({ previousName: 'TEM-2 January', flagged: true });
    expect(rows[3]!.drift!.relativeChange).toBeCloseTo(1000 / 71000, 12);
    expect(rows[4]!.drift).toMatchObject({ previousName: 'TEM-2 March', flagged: false });
    expect(rows[1]!.drift).toBeNull();
  });

  it('--instrument (case ignored) and --voltage filter the list; the drift is still against the previous calibration', async () => {
    const r = await runCli('calibrations', '--store', storePath, '--instrument', 'tem-2 north BAY', '--voltage', '200kV', '--json');
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.stdout) as Array<{ name: string; drift: { previousName: string } | null }>;
    expect(rows.map((c) => c.name)).toEqual(['TEM-2 January', 'TEM-2 March', 'TEM-2 April']);
    const none = await runCli('calibrations', '--store', storePath, '--instrument', 'TEM-9');
    expect(none.code).toBe(0);
    expect(none.stdout).toContain(`No calibrations for instrument "TEM-9" in ${storePath}.`);
  });

  it('reads the store named by ANNULA_STORE', async () => {
    process.env.ANNULA_STORE = storePath;
    const r = await runCli('calibrations', '--voltage', '120 kV', '--json');
    expect(r.code).toBe(0);
    expect((JSON.parse(r.stdout) as Array<{ name: string }>).map((c) => c.name)).toEqual(['TEM-1 first']);
  });

  it('with no store yet at the default location says so and exits 0 (JSON: [])', async () => {
    delete process.env.ANNULA_STORE;
    process.env.XDG_DATA_HOME = join(folder.dir, 'fresh-data-home');
    const r = await runCli('calibrations');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(`No calibrations yet: there is no lab store at ${join(folder.dir, 'fresh-data-home', 'annula', 'lab-records.sqlite')}.`);
    expect((await runCli('calibrations', '--json')).stdout.trim()).toBe('[]');
    expect(existsSync(join(folder.dir, 'fresh-data-home'))).toBe(false);
  });

  it('exits 3 for a missing store named with --store, and 2 for a voltage without a unit', async () => {
    const missing = await runCli('calibrations', '--store', join(folder.dir, 'typo.sqlite'));
    expect(missing.code).toBe(3);
    expect(missing.stderr).toMatch(/^annula: .*typo\.sqlite: there is no lab store here yet; check the path/);
    const usage = await runCli('calibrations', '--store', storePath, '--voltage', '200');
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/--voltage: "200" has no unit/);
  });

  it('exits 3 for an unreadable store, naming the backup it was moved to (the bytes kept)', async () => {
    const damaged = join(folder.dir, 'damaged', 'lab.sqlite');
    mkdirSync(join(damaged, '..'));
    writeFileSync(damaged, 'these are not the records you are looking for');
    const r = await runCli('calibrations', '--store', damaged);
    expect(r.code).toBe(3);
    const backup = /moved aside to (\S+\.unreadable-\d{8}T\d{6}Z), unchanged/.exec(r.stderr)?.[1];
    expect(backup, r.stderr).toBeDefined();
    expect(r.stderr).toMatch(/^annula: .*lab\.sqlite: the lab store cannot be read \(it is not an SQLite database\)/);
    expect(readFileSync(backup!, 'utf8')).toBe('these are not the records you are looking for');
    expect(existsSync(damaged)).toBe(false);
  });

  it('exits 3 for a store of a newer schema, asking to update Annula and leaving it untouched', async () => {
    const SQL = await loadSqlEngine();
    const db = new SQL.Database(readFileSync(storePath));
    db.run(`PRAGMA user_version = ${STORE_SCHEMA_VERSION + 1}`);
    const newer = join(folder.dir, 'newer.sqlite');
    const bytes = db.export();
    db.close();
    writeFileSync(newer, bytes);
    const r = await runCli('calibrations', '--store', newer);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/written by a newer version of Annula .*; update Annula to use it \(the file was left unchanged\)/);
    expect(readFileSync(newer).equals(Buffer.from(bytes))).toBe(true);
  });

  it('has --help naming its options', async () => {
    const help = await runCli('calibrations', '--help');
    expect(help.code).toBe(0);
    expect(help.stdout).toMatch(/--instrument <name>/);
    expect(help.stdout).toMatch(/--store <file>\s+the lab store file \(default: \$ANNULA_STORE/);
  });
});
