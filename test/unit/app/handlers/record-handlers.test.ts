/** The calibration and check flows' handlers against a real lab store in a temporary folder. */
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { BACKEND_HANDLERS, findHandler, HandlerError, runHandler, type HandlerContext } from '../../../../app/handlers';
import { openLabStore } from '../../../../app/node/store';

const SHA = 'ab'.repeat(32);

function calibration(name: string, cameraLengthPx: number, created: string): Record<string, unknown> {
  return {
    name,
    instrument: 'TEM-2 north bay',
    voltageV: 200e3,
    nominalCameraLengthM: 0.8,
    pixelSizeM: 28e-6,
    created,
    standardPhaseId: 'Au',
    cameraLengthPx,
    cameraLengthSigmaPx: 0.02,
    axisRatio: 1.012,
    axisRatioSigma: 1e-4,
    angleDeg: 31,
    angleSigmaDeg: 0.2,
    residuals: [{ hkl: [1, 1, 1], dA: 2.3548, residualPpm: 12, radiusPx: 600, image: 0 }],
    imageFingerprints: [{ sha256: SHA, path: 'pattern.tif' }],
    rejectedRings: [{ hkl: null, dA: 2.1, radiusPx: 640, residualPpm: null, image: 0, reason: 'not a ring of Au' }],
  };
}

describe('record handlers', () => {
  let dir: string;
  let context: HandlerContext;
  const written = new Set<string>();
  const call = (name: string, input: unknown) => runHandler(findHandler(name, BACKEND_HANDLERS), input, context);

  beforeEach(async () => {
    dir = await mkdtemp(join(tmpdir(), 'annula-handlers-'));
    context = { samplesDir: join(dir, 'samples'), storePath: join(dir, 'lab.sqlite'), isUserChosenPath: () => false, mayWriteChosenPath: (p) => written.has(p) };
  });
  afterEach(async () => {
    written.clear();
    await rm(dir, { recursive: true, force: true });
  });

  it('saves a calibration, creating the store, and reports no drift for the first one', async () => {
    const saved = (await call('save-calibration', { calibration: calibration('TEM-2 gold', 28630, '2026-03-02T09:00:00Z') })) as { calibration: { name: string; cameraLengthPx: number }; drift: unknown; instrumentAdded: boolean };
    expect(saved.calibration).toMatchObject({ name: 'TEM-2 gold', cameraLengthPx: 28630 });
    expect(saved.drift).toBeNull();
    expect(saved.instrumentAdded).toBe(true);
    const store = await openLabStore(context.storePath);
    expect((await store.findCalibration('TEM-2 gold'))?.residuals).toHaveLength(1);
    await store.close();
  });

  it('refuses a name already saved and keeps the saved calibration unchanged', async () => {
    await call('save-calibration', { calibration: calibration('TEM-2 gold', 28630, '2026-03-02T09:00:00Z') });
    const before = await readFile(context.storePath);
    const error = await call('save-calibration', { calibration: calibration('tem-2 GOLD', 29000, '2026-03-03T09:00:00Z') }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(HandlerError);
    expect((error as HandlerError).code).toBe('invalid-input');
    expect((error as HandlerError).message).toMatch(/already exists.*never replaced.*choose another name/);
    expect(Buffer.compare(await readFile(context.storePath), before)).toBe(0);
    const store = await openLabStore(context.storePath);
    expect((await store.findCalibration('TEM-2 gold'))?.cameraLengthPx).toBe(28630);
    await store.close();
  });

  it('names a wrong field of the calibration', async () => {
    const bad = { ...calibration('x', 28630, '2026-03-02'), axisRatio: 0.5 };
    await expect(call('save-calibration', { calibration: bad })).rejects.toThrow(/axisRatio.*>= 1/);
  });

  it('flags drift above 1 % and lists the instrument history with it', async () => {
    await call('save-calibration', { calibration: calibration('March', 28630, '2026-03-02T09:00:00Z') });
    const second = (await call('save-calibration', { calibration: calibration('April', 28630 * 1.015, '2026-04-02T09:00:00Z') })) as { drift: { flagged: boolean; relativeChange: number; previousName: string } };
    expect(second.drift.flagged).toBe(true);
    expect(second.drift.previousName).toBe('March');
    expect(second.drift.relativeChange).toBeCloseTo(0.015, 9);
    await call('save-calibration', { calibration: { ...calibration('other scope', 20000, '2026-04-03T09:00:00Z'), instrument: 'TEM-1' } });
    const history = (await call('calibration-history', { instrument: 'TEM-2 north bay' })) as { calibrations: Array<{ name: string; drift: { flagged: boolean } | null; ringsUsed: number; ringsRejected: number }> };
    expect(history.calibrations.map((c) => c.name)).toEqual(['March', 'April']);
    expect(history.calibrations[0]!.drift).toBeNull();
    expect(history.calibrations[1]!.drift?.flagged).toBe(true);
    expect(history.calibrations[0]).toMatchObject({ ringsUsed: 1, ringsRejected: 1 });
  });

  it('reads an empty history when there is no store yet, without creating one', async () => {
    const history = (await call('calibration-history', { instrument: null })) as { storeFound: boolean; calibrations: unknown[] };
    expect(history).toMatchObject({ storeFound: false, calibrations: [] });
    const phases = (await call('phase-history', { phase: 'TiN' })) as { storeFound: boolean; analyses: unknown[] };
    expect(phases).toMatchObject({ storeFound: false, analyses: [] });
    await expect(readFile(context.storePath)).rejects.toThrow(/ENOENT/);
  });

  it('records checks and lists them as the phase history, oldest first', async () => {
    await call('save-calibration', { calibration: calibration('TEM-2 gold', 28630, '2026-03-02T09:00:00Z') });
    const check = { sampleId: 'CV-TIN-0412', operator: null, imageSha256: SHA, imagePath: 'CV-TIN-0412.tif', calibration: 'TEM-2 gold', phase: 'TiN', aA: 4.245, aSigmaA: 0.0045, verdict: 'pass', tolerance: 0.005, result: { verdict: 'pass' } };
    const first = (await call('record-check', check)) as { id: number };
    const second = (await call('record-check', { ...check, sampleId: 'CV-TIN-0414', aA: 4.305, verdict: 'fail' })) as { id: number };
    expect(second.id).toBeGreaterThan(first.id);
    const history = (await call('phase-history', { phase: 'tin' })) as { analyses: Array<{ sampleId: string; verdict: string; aA: number }> };
    expect(history.analyses.map((a) => [a.sampleId, a.verdict])).toEqual([['CV-TIN-0412', 'pass'], ['CV-TIN-0414', 'fail']]);
    const store = await openLabStore(context.storePath);
    expect((await store.findAnalysis(first.id))?.result).toEqual({ verdict: 'pass' });
    await store.close();
  });

  it('refuses a check naming a calibration the store does not hold', async () => {
    const check = { sampleId: null, operator: null, imageSha256: SHA, imagePath: null, calibration: 'no such', phase: 'TiN', aA: null, aSigmaA: null, verdict: 'inconclusive', tolerance: 0.005, result: {} };
    await expect(call('record-check', check)).rejects.toThrow(/no such/);
  });

  it('writes an export only to a path chosen in the save dialog, replacing it when the dialog allowed that', async () => {
    const path = join(dir, 'report.pdf');
    await expect(call('write-report', { path, bytes: new Uint8Array([1, 2, 3]) })).rejects.toThrow(/not chosen in a save dialog/);
    written.add(path);
    await writeFile(path, 'old');
    const done = (await call('write-report', { path, bytes: new Uint8Array([37, 80, 68, 70]) })) as { byteLength: number };
    expect(done.byteLength).toBe(4);
    expect((await readFile(path)).toString()).toBe('%PDF');
  });

  it('refuses writes in browser mode (no save dialog): exports are downloads there', async () => {
    const browser: HandlerContext = { ...context, mayWriteChosenPath: undefined };
    const error = await runHandler(findHandler('write-report'), { path: join(dir, 'x.csv'), bytes: new Uint8Array([1]) }, browser).catch((e: unknown) => e);
    expect((error as HandlerError).code).toBe('not-allowed');
    expect((error as HandlerError).message).toMatch(/downloads/);
  });
});
