/** The lab's calibrations, read (saving one is record-handlers.ts's save-calibration). */
import { z } from 'zod';
import { defineHandler } from './handler';
import { HandlerError } from './handler-error';
import { calibrationSummary as summary } from './record-handlers';
import { withExistingStore as withStore } from './store-access';

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
