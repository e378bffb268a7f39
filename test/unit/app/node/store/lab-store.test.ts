import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { LabStoreError, openLabStore, type LabStore } from '../../../../../app/node/store';
import { analysis, calibration, fingerprint, temporaryFolder } from './store-test-records';

const folder = temporaryFolder('annula-store-');
afterAll(() => folder.remove());

let counter = 0;
async function freshStore(): Promise<{ store: LabStore; path: string }> {
  const path = join(folder.dir, `store-${++counter}.sqlite`);
  return { store: await openLabStore(path, { create: true }), path };
}

async function refusal(promise: Promise<unknown>): Promise<LabStoreError> {
  const error = await promise.then(
    () => undefined,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(LabStoreError);
  return error as LabStoreError;
}

describe('store.addInstrument / findInstrument / listInstruments', () => {
  it('records an instrument and refuses a second of the same name (ASCII case ignored), leaving the first unchanged', async () => {
    const { store, path } = await freshStore();
    const added = await store.addInstrument({ name: 'TEM-2 north bay', description: '200 kV field-emission column, fictional' });
    expect(added).toMatchObject({ name: 'TEM-2 north bay', description: '200 kV field-emission column, fictional' });
    const before = readFileSync(path);
    const error = await refusal(store.addInstrument({ name: 'tem-2 NORTH bay', description: 'replacement' }));
    expect(error.reason).toBe('duplicate');
    expect(error.message).toMatch(/instrument "tem-2 NORTH bay" was not saved: an instrument of that name is already recorded as "TEM-2 north bay".*records are never replaced/);
    expect(readFileSync(path).equals(before)).toBe(true);
    expect(await store.findInstrument('tem-2 north BAY')).toEqual(added);
    expect(await store.listInstruments()).toEqual([added]);
    await store.close();
  });
});

describe('store.addCalibration / findCalibration', () => {
  it('keeps every field as given and gives it back after reopening the file', async () => {
    const { store, path } = await freshStore();
    const input = calibration({ name: 'TEM-2 200kV 2026-03-02' });
    const added = await store.addCalibration(input);
    expect(added.instrumentAdded).toBe(true);
    expect(added.previous).toBeNull();
    expect(added.drift).toBeNull();
    const expected = {
      ...input,
      created: '2026-03-02T09:15:00.000Z',
      residuals: input.residuals.map((r) => ({ ...r, radiusPx: null, image: null })),
      imageFingerprints: [{ sha256: fingerprint('gold film 1'), path: 'standards/gold-1.tif' }],
      rejectedRings: [{ hkl: [3, 1, 1], dA: 1.2297, residualPpm: 910, reason: 'residual above 3 sigma', radiusPx: null, image: null }],
    };
    expect(added.calibration).toEqual(expected);
    await store.close();
    const again = await openLabStore(path);
    expect(await again.findCalibration('tem-2 200KV 2026-03-02')).toEqual(expected);
    expect(await again.findCalibration('no such calibration')).toBeNull();
    expect((await again.findInstrument('TEM-2 north bay'))?.description).toBe('');
    await again.close();
  });

  it('refuses a duplicate name with a clear error and never replaces the saved calibration', async () => {
    const { store, path } = await freshStore();
    await store.addCalibration(calibration({ name: 'March standard' }));
    const bytes = readFileSync(path);
    const error = await refusal(store.addCalibration(calibration({ name: 'march STANDARD', cameraLengthPx: 99_999 })));
    expect(error.reason).toBe('duplicate');
    expect(error.message).toMatch(/calibration "march STANDARD" was not saved: a calibration of that name already exists as "March standard" \(saved 2026-03-02T09:15:00.000Z\); records are never replaced: choose another name/);
    expect(readFileSync(path).equals(bytes)).toBe(true);
    expect((await store.findCalibration('March standard'))?.cameraLengthPx).toBe(71_000);
    await store.close();
  });

  it('names each wrong field in one message and saves nothing', async () => {
    const { store, path } = await freshStore();
    const bytes = readFileSync(path);
    const bad = {
      ...calibration({ name: 'bad one' }),
      voltageV: -200e3,
      axisRatio: 0.97,
      angleDeg: 180,
      imageFingerprints: [{ sha256: 'abc' }],
      residuals: [{ hkl: [1, 1], dA: 2.35, residualPpm: 3 }],
      colour: 'blue',
    } as unknown as Parameters<LabStore['addCalibration']>[0];
    const { cameraLengthPx: _dropped, ...missing } = calibration({ name: 'no camera length' });
    const error = await refusal(store.addCalibration(bad));
    expect(error.reason).toBe('invalid-record');
    expect(error.message).toMatch(/^calibration "bad one" was not saved: /);
    expect(error.message).toMatch(/voltageV: expected the accelerating voltage in V: a number > 0; got -200000/);
    expect(error.message).toMatch(/axisRatio: expected the axis ratio major\/minor >= 1; got 0\.97/);
    expect(error.message).toMatch(/angleDeg: expected the major-axis angle in degrees, in \[0, 180\); got 180/);
    expect(error.message).toMatch(/imageFingerprints\[0\]\.sha256: expected a SHA-256 fingerprint \(64 hex digits\); got "abc"/);
    expect(error.message).toMatch(/residuals\[0\]\.hkl: expected Miller indices \[h, k, l\] \(three integers\)/);
    expect(error.message).toMatch(/unknown field "colour"/);
    expect(error.message).toMatch(/correct these fields and save again$/);
    const second = await refusal(store.addCalibration(missing as Parameters<LabStore['addCalibration']>[0]));
    expect(second.message).toMatch(/cameraLengthPx: is missing/);
    expect(readFileSync(path).equals(bytes)).toBe(true);
    await store.close();
  });
});

describe('store.listCalibrations / previousCalibration and the drift check on add', () => {
  it('lists oldest first, filters by instrument (case ignored) and voltage, and finds the previous calibration at the same setting', async () => {
    const { store } = await freshStore();
    await store.addCalibration(calibration({ name: 'jan', created: '2026-01-10T08:00:00Z', cameraLengthPx: 71_000 }));
    await store.addCalibration(calibration({ name: 'mar', created: '2026-03-10T08:00:00Z', cameraLengthPx: 71_120 }));
    await store.addCalibration(calibration({ name: '300kV', created: '2026-02-01T08:00:00Z', voltageV: 300e3, cameraLengthPx: 70_000 }));
    await store.addCalibration(calibration({ name: 'other column', instrument: 'TEM-1 south bay', created: '2026-02-02T08:00:00Z' }));
    await store.addCalibration(calibration({ name: 'no instrument', instrument: null, nominalCameraLengthM: null, created: '2026-02-03T08:00:00Z' }));
    // Backdated: saved last, but made before "mar".
    const feb = await store.addCalibration(calibration({ name: 'feb', created: '2026-02-10T08:00:00Z', cameraLengthPx: 71_800 }));
    expect(feb.previous?.name).toBe('jan');
    expect(feb.drift?.flagged).toBe(true);
    expect(feb.drift?.relativeChange).toBeCloseTo(800 / 71_000, 12);

    expect((await store.listCalibrations()).map((c) => c.name)).toEqual(['jan', '300kV', 'other column', 'no instrument', 'feb', 'mar']);
    expect((await store.listCalibrations({ instrument: 'tem-2 NORTH bay' })).map((c) => c.name)).toEqual(['jan', '300kV', 'feb', 'mar']);
    expect((await store.listCalibrations({ instrument: 'TEM-2 north bay', voltageV: 200e3 })).map((c) => c.name)).toEqual(['jan', 'feb', 'mar']);
    expect((await store.listCalibrations({ voltageV: 300e3 })).map((c) => c.name)).toEqual(['300kV']);

    const setting = { instrument: 'TEM-2 north bay', voltageV: 200e3, nominalCameraLengthM: 1 };
    expect((await store.previousCalibration(setting))?.name).toBe('mar');
    expect((await store.previousCalibration({ ...setting, before: '2026-03-01' }))?.name).toBe('feb');
    expect((await store.previousCalibration({ ...setting, before: '2026-01-10T08:00:00Z' }))).toBeNull();
    expect((await store.previousCalibration({ ...setting, pixelSizeM: 28e-6 }))).toBeNull();
    expect((await store.previousCalibration({ ...setting, nominalCameraLengthM: 1.2 }))).toBeNull();
    expect((await store.previousCalibration({ instrument: null, voltageV: 200e3, nominalCameraLengthM: null }))?.name).toBe('no instrument');
    await expect(store.previousCalibration({ ...setting, before: 'last week' })).rejects.toThrow(/before: "last week" is not an ISO 8601 date/);
    await store.close();
  });

  it('addCalibration reports a change within 1% as no drift', async () => {
    const { store } = await freshStore();
    await store.addCalibration(calibration({ name: 'a', created: '2026-01-10T08:00:00Z', cameraLengthPx: 71_000 }));
    const b = await store.addCalibration(calibration({ name: 'b', created: '2026-02-10T08:00:00Z', cameraLengthPx: 71_000 * 0.995 }));
    expect(b.previous?.name).toBe('a');
    expect(b.drift).toMatchObject({ previousName: 'a', flagged: false });
    expect(b.drift!.relativeChange).toBeCloseTo(-0.005, 12);
    await store.close();
  });
});

describe('store.addAnalysis / findAnalysis / listAnalyses', () => {
  it('assigns ids 1, 2, 3, keeps the full result, and links the calibration by its saved name', async () => {
    const { store } = await freshStore();
    await store.addCalibration(calibration({ name: 'TEM-2 March' }));
    const first = await store.addAnalysis(analysis({ calibration: 'tem-2 march' }));
    const second = await store.addAnalysis(analysis({ sampleId: 'S-105', created: '2026-03-05T10:00:00Z', aA: 4.262, verdict: 'fail' }));
    const third = await store.addAnalysis(analysis({ sampleId: null, phase: null, aA: null, aSigmaA: null, verdict: null, tolerance: null, created: '2026-04-01' }));
    expect([first.id, second.id, third.id]).toEqual([1, 2, 3]);
    expect(first.calibration).toBe('TEM-2 March');
    expect(await store.findAnalysis(1)).toEqual(first);
    expect((await store.findAnalysis(1))?.result).toEqual({ rings: [{ dA: 2.449, hkl: [1, 1, 1] }], status: 'ok' });
    expect(await store.findAnalysis(99)).toBeNull();

    const { result: _r, ...summary } = first;
    expect(await store.listAnalyses({ sampleId: 'S-104' })).toEqual([summary]);
    expect((await store.listAnalyses({ phase: 'tin' })).map((a) => a.id)).toEqual([1, 2]);
    expect((await store.listAnalyses({ since: '2026-03-04' })).map((a) => a.id)).toEqual([2, 3]);
    expect((await store.listAnalyses({ verdict: 'fail' })).map((a) => a.sampleId)).toEqual(['S-105']);
    expect((await store.listAnalyses({ calibration: 'TEM-2 MARCH' })).map((a) => a.id)).toEqual([1]);
    expect((await store.listAnalyses()).map((a) => a.created)).toEqual(['2026-03-03T10:00:00.000Z', '2026-03-05T10:00:00.000Z', '2026-04-01T00:00:00.000Z']);
    await expect(store.listAnalyses({ since: '03/04/2026' })).rejects.toThrow(RangeError);
    await store.close();
  });

  it('refuses an analysis naming a calibration the store does not hold, and bad fields by name', async () => {
    const { store, path } = await freshStore();
    const bytes = readFileSync(path);
    const unknown = await refusal(store.addAnalysis(analysis({ calibration: 'never saved' })));
    expect(unknown.reason).toBe('unknown-reference');
    expect(unknown.message).toMatch(/analysis was not saved: calibration "never saved" is not in the lab store .*; save that calibration first/);
    const bad = await refusal(store.addAnalysis(analysis({ verdict: 'maybe' as never, tolerance: 5 })));
    expect(bad.reason).toBe('invalid-record');
    expect(bad.message).toMatch(/verdict: expected the verdict 'pass', 'fail' or 'inconclusive' \(or null\)/);
    expect(bad.message).toMatch(/tolerance: expected the tolerance as a fraction in \(0, 1\), e\.g\. 0\.005 for 0\.5%; got 5/);
    const orphan = await refusal(store.addAnalysis(analysis({ aA: null, aSigmaA: 0.001 })));
    expect(orphan.message).toMatch(/aSigmaA: an uncertainty needs its value: give aA too/);
    const cyclic: Record<string, unknown> = {};
    cyclic.self = cyclic;
    expect((await refusal(store.addAnalysis(analysis({ result: cyclic })))).message).toMatch(/result: cannot be written as JSON/);
    expect(readFileSync(path).equals(bytes)).toBe(true);
    await store.close();
  });

  it('queues concurrent adds on one store in order: 20 at once give ids 1 to 20, all kept', async () => {
    const { store, path } = await freshStore();
    const added = await Promise.all(Array.from({ length: 20 }, (_, i) => store.addAnalysis(analysis({ sampleId: `S-${200 + i}` }))));
    expect(added.map((a) => a.id).sort((x, y) => x - y)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    await store.close();
    const again = await openLabStore(path);
    expect((await again.listAnalyses()).map((a) => a.sampleId).sort()).toEqual(Array.from({ length: 20 }, (_, i) => `S-${200 + i}`));
    await again.close();
  });
});

describe('two store objects on one file (the CLI and the app)', () => {
  it('each sees the other one\'s records, and neither loses any when they take turns', async () => {
    const { store: a, path } = await freshStore();
    const b = await openLabStore(path);
    await a.addCalibration(calibration({ name: 'from the app' }));
    expect((await b.findCalibration('from the app'))?.name).toBe('from the app');
    await b.addAnalysis(analysis({ sampleId: 'from the CLI', calibration: 'from the app' }));
    await a.addAnalysis(analysis({ sampleId: 'from the app again' }));
    await b.addCalibration(calibration({ name: 'from the CLI', created: '2026-03-09T00:00:00Z' }));
    for (const store of [a, b]) {
      expect((await store.listCalibrations()).map((c) => c.name)).toEqual(['from the app', 'from the CLI']);
      expect((await store.listAnalyses()).map((x) => [x.id, x.sampleId])).toEqual([
        [1, 'from the CLI'],
        [2, 'from the app again'],
      ]);
    }
    await a.close();
    await b.close();
  });

  it('reads and writes interleaved on both objects at once all succeed, each read seeing a consistent list', async () => {
    const { store: a, path } = await freshStore();
    const b = await openLabStore(path);
    const work: Array<Promise<unknown>> = [];
    for (let i = 0; i < 15; i++) {
      work.push((i % 2 ? a : b).addAnalysis(analysis({ sampleId: `S-${300 + i}` })));
      work.push(a.listAnalyses(), b.listAnalyses(), b.findAnalysis(1));
    }
    const results = await Promise.all(work);
    for (const r of results.filter(Array.isArray) as Array<Array<{ id: number }>>) {
      expect(r.map((x) => x.id)).toEqual(Array.from({ length: r.length }, (_, k) => k + 1));
    }
    expect((await a.listAnalyses()).length).toBe(15);
    expect((await b.listAnalyses()).length).toBe(15);
    await a.close();
    await b.close();
  });

  it('refuses use after close', async () => {
    const { store } = await freshStore();
    await store.close();
    expect((await refusal(store.listCalibrations())).reason).toBe('closed');
    expect((await refusal(store.addAnalysis(analysis()))).reason).toBe('closed');
  });
});
