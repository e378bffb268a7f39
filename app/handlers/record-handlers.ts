/**
 * The calibration and check flows' records: saving a calibration (with its drift check),
 * an instrument's calibration history, recording a film check, a phase's history for the
 * control chart, and writing an export to a path the user chose in the save dialog.
 */
import { z } from 'zod';
import { FileWriteError, writeFileSafely } from '../node/write-file-safely';
import { calibrationDrift, type CalibrationRecord } from '../node/store';
import type { AnalysisSummaryData, CalibrationHistoryEntry, CalibrationSummary } from './contract';
import { defineHandler } from './handler';
import { HandlerError } from './handler-error';
import { withExistingStore, withWritableStore } from './store-access';

export function calibrationSummary(c: CalibrationRecord): CalibrationSummary {
  return {
    name: c.name,
    instrument: c.instrument,
    voltageV: c.voltageV,
    nominalCameraLengthM: c.nominalCameraLengthM,
    pixelSizeM: c.pixelSizeM,
    created: c.created,
    standardPhaseId: c.standardPhaseId,
    cameraLengthPx: c.cameraLengthPx,
    cameraLengthSigmaPx: c.cameraLengthSigmaPx,
    axisRatio: c.axisRatio,
    angleDeg: c.angleDeg,
  };
}

/** Largest export written, bytes (a report with a 4k image is a few MB). */
export const MAX_EXPORT_BYTES = 256 * 1024 * 1024;

export const saveCalibration = defineHandler({
  name: 'save-calibration',
  summary: 'saves a new camera calibration in the lab store (a name already there is refused) and checks it for drift',
  // The calibration itself is validated by the store's own schema (newCalibrationSchema), whose messages name each field.
  input: z.strictObject({ calibration: z.record(z.string(), z.unknown()) }),
  async run({ calibration }, context) {
    return withWritableStore(context.storePath, async (store) => {
      const added = await store.addCalibration(calibration as never);
      return { calibration: calibrationSummary(added.calibration), instrumentAdded: added.instrumentAdded, drift: added.drift, storePath: store.path };
    });
  },
});

function sameSetting(a: CalibrationRecord, b: CalibrationRecord): boolean {
  const same = (x: number | null, y: number | null): boolean => (x === null || y === null ? x === y : Math.abs(x / y - 1) <= 1e-6);
  return same(a.voltageV, b.voltageV) && same(a.nominalCameraLengthM, b.nominalCameraLengthM) && same(a.pixelSizeM, b.pixelSizeM);
}

export const calibrationHistory = defineHandler({
  name: 'calibration-history',
  summary: "an instrument's calibrations, oldest first, each with its drift against the previous one at the same setting",
  input: z.strictObject({ instrument: z.string().trim().min(1).max(200).nullable(), voltageV: z.number().positive().optional() }),
  async run({ instrument, voltageV }, context) {
    return withExistingStore(context.storePath, async (store) => {
      const all = store ? await store.listCalibrations(voltageV === undefined ? {} : { voltageV }) : [];
      const key = instrument?.toLowerCase() ?? null;
      const mine = all.filter((c) => (c.instrument?.toLowerCase() ?? null) === key);
      const entries: CalibrationHistoryEntry[] = mine.map((c, i) => {
        const previous = mine.slice(0, i).reverse().find((p) => sameSetting(p, c)) ?? null;
        return {
          ...calibrationSummary(c),
          ringsUsed: c.residuals.length,
          ringsRejected: c.rejectedRings.length,
          drift: previous ? calibrationDrift(previous, c) : null,
        };
      });
      return { storePath: context.storePath, storeFound: store !== null, instrument, calibrations: entries };
    });
  },
});

const nullableText = (max: number) => z.string().trim().min(1).max(max).nullable();

export const recordCheck = defineHandler({
  name: 'record-check',
  summary: 'records a film check (verdict, a and its uncertainty, the full result) in the lab store',
  input: z.strictObject({
    sampleId: nullableText(200),
    operator: nullableText(200),
    imageSha256: z.string().regex(/^[0-9a-fA-F]{64}$/, "the image's SHA-256 (64 hex digits)"),
    imagePath: nullableText(4000),
    calibration: nullableText(200),
    phase: z.string().trim().min(1).max(200),
    aA: z.number().positive().nullable(),
    aSigmaA: z.number().min(0).nullable(),
    verdict: z.enum(['pass', 'fail', 'inconclusive']),
    tolerance: z.number().gt(0).lt(1),
    result: z.unknown().refine((v) => v !== undefined, 'the full result'),
  }),
  async run(input, context) {
    return withWritableStore(context.storePath, async (store) => {
      const added = await store.addAnalysis(input);
      return { id: added.id, created: added.created, storePath: store.path };
    });
  },
});

export const phaseHistory = defineHandler({
  name: 'phase-history',
  summary: "a phase's recorded analyses, oldest first, for its control chart",
  input: z.strictObject({ phase: z.string().trim().min(1).max(200), since: z.string().min(1).max(40).optional() }),
  async run({ phase, since }, context) {
    return withExistingStore(context.storePath, async (store) => {
      let analyses: AnalysisSummaryData[] = [];
      if (store) {
        try {
          analyses = await store.listAnalyses({ phase, ...(since ? { since } : {}) });
        } catch (error) {
          if (error instanceof RangeError) throw new HandlerError('invalid-input', `since: ${error.message}`, 'give a date such as 2026-01-01');
          throw error;
        }
      }
      return { storePath: context.storePath, storeFound: store !== null, phase, analyses };
    });
  },
});

export const writeReport = defineHandler({
  name: 'write-report',
  summary: 'writes an export (PDF, CSV, JSON, PNG) to the path the user chose in the save dialog',
  input: z.strictObject({
    path: z.string().min(1).max(4000),
    bytes: z.instanceof(Uint8Array).refine((b) => b.byteLength > 0 && b.byteLength <= MAX_EXPORT_BYTES, `a non-empty file of at most ${MAX_EXPORT_BYTES} bytes`),
  }),
  async run({ path, bytes }, context) {
    if (!context.mayWriteChosenPath?.(path)) {
      throw new HandlerError(
        'not-allowed',
        `${path} was not chosen in a save dialog`,
        context.mayWriteChosenPath ? 'export again and choose the file in the save dialog' : 'in browser mode exports are downloads: your browser saves them',
      );
    }
    try {
      // The save dialog asked before an existing file was chosen: replacing it is the user's decision.
      await writeFileSafely(path, bytes, { overwrite: true });
    } catch (error) {
      if (error instanceof FileWriteError) throw new HandlerError('unreadable', error.message, 'choose another place in the save dialog', { cause: error });
      throw error;
    }
    return { path, byteLength: bytes.byteLength };
  },
});
