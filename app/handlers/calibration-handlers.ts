/** The lab's calibrations, read-only (saving one is issue 4's save-calibration, wired in later). */
import { z } from 'zod';
import { LabStoreError, openLabStore, type CalibrationRecord, type LabStore } from '../node/store';
import type { CalibrationSummary } from './contract';
import { defineHandler } from './handler';
import { HandlerError } from './handler-error';

function summary(c: CalibrationRecord): CalibrationSummary {
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

/** Opens the store without creating it; null when there is no file yet (nothing saved). */
async function openExistingStore(path: string): Promise<LabStore | null> {
  try {
    return await openLabStore(path, { create: false, tool: 'annula workspace' });
  } catch (error) {
    if (error instanceof LabStoreError) {
      if (error.reason === 'missing') return null;
      throw new HandlerError('unreadable', error.message, 'see the message; the workspace keeps working without the store', { cause: error });
    }
    throw error;
  }
}

async function withStore<T>(path: string, use: (store: LabStore | null) => Promise<T>): Promise<T> {
  const store = await openExistingStore(path);
  try {
    return await use(store);
  } finally {
    await store?.close();
  }
}

export const listCalibrations = defineHandler({
  name: 'list-calibrations',
  summary: "the lab store's camera calibrations, newest last",
  input: z.strictObject({ instrument: z.string().min(1).optional(), voltageV: z.number().positive().optional() }),
  async run(filter, context) {
    return withStore(context.storePath, async (store) => ({
      storePath: context.storePath,
      storeFound: store !== null,
      calibrations: store ? (await store.listCalibrations(filter)).map(summary) : [],
    }));
  },
});

export const findCalibration = defineHandler({
  name: 'find-calibration',
  summary: 'one calibration by name',
  input: z.strictObject({ name: z.string().min(1) }),
  async run({ name }, context) {
    return withStore(context.storePath, async (store) => {
      const found = store ? await store.findCalibration(name) : null;
      if (!found) throw new HandlerError('not-found', `there is no calibration named "${name}" in ${context.storePath}`, 'choose one from the list, or calibrate on a standard (annula calibrate)');
      return summary(found);
    });
  },
});
