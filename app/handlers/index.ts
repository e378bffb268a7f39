/**
 * The backend handlers, written once and served by app/server (loopback HTTP) and
 * app/electron (IPC). Add a handler here and both transports serve it.
 *
 * A name in PLANNED_HANDLERS (none now) is answered with 'not-available' and the CLI
 * command that does the job.
 */
import { findCalibration, listCalibrations } from './calibration-handlers';
import type { HandlerName } from './contract';
import type { Handler } from './handler';
import { HandlerError } from './handler-error';
import { fingerprintImage, readChosenImage } from './image-handlers';
import { listSamples, readSample } from './sample-handlers';
import { calibrationHistory, phaseHistory, recordCheck, saveCalibration, writeReport } from './record-handlers';
import { PLANNED_HANDLERS } from './contract';

export type { HandlerContext, Handler } from './handler';
export { defineHandler, parseHandlerInput, runHandler } from './handler';
export { HandlerError, toHandlerErrorData } from './handler-error';
export { MAX_IMAGE_BYTES } from './image-handlers';
export { MAX_EXPORT_BYTES } from './record-handlers';
export * from './contract';

export const BACKEND_HANDLERS: readonly Handler[] = [
  listSamples,
  readSample,
  readChosenImage,
  fingerprintImage,
  listCalibrations,
  findCalibration,
  saveCalibration,
  calibrationHistory,
  recordCheck,
  phaseHistory,
  writeReport,
] as unknown as Handler[];

/**
 * The handler called `name`.
 * @throws HandlerError 'not-available' for a planned handler, 'unknown-handler' otherwise
 */
export function findHandler(name: string, handlers: readonly Handler[] = BACKEND_HANDLERS): Handler {
  const found = handlers.find((h) => h.name === name);
  if (found) return found;
  const planned = PLANNED_HANDLERS[name];
  if (planned) throw new HandlerError('not-available', `${name} is not in this version of the workspace yet`, `use the command line for now: ${planned}`);
  throw new HandlerError('unknown-handler', `there is no backend function "${name.slice(0, 60)}"`, `the workspace and the backend are from different versions: reload (known: ${handlers.map((h) => h.name).join(', ')})`);
}

export type { HandlerName };
