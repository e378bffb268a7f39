/** The desktop app's backend: the preload's named functions (app/electron/preload.ts). */
import type { BytesResult, HandlerErrorData, ImageFileMeta } from '../../handlers/contract';
import { BackendError, type Backend } from './backend';

type Envelope<T> = { ok: true; value: T } | { ok: false; error: HandlerErrorData };
type Call = (input?: unknown) => Promise<Envelope<unknown>>;

interface DesktopBridge {
  listSamples: Call;
  readSample: Call;
  fingerprintImage: Call;
  listCalibrations: Call;
  findCalibration: Call;
  saveCalibration: Call;
  calibrationHistory: Call;
  recordCheck: Call;
  phaseHistory: Call;
  writeReport: Call;
  chooseSavePath: (input: { suggestedName: string; extension: string }) => Promise<Envelope<unknown>>;
  openImageDialog: () => Promise<Envelope<unknown>>;
  onMenuCommand(listener: (command: string) => void): () => void;
}

async function unwrap<T>(p: Promise<Envelope<unknown>>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new BackendError(r.error);
  return r.value as T;
}

export function desktopBridge(): DesktopBridge | null {
  return (globalThis as { annulaDesktop?: DesktopBridge }).annulaDesktop ?? null;
}

export function desktopBackend(bridge: DesktopBridge): Backend {
  return {
    kind: 'desktop',
    listSamples: () => unwrap(bridge.listSamples()),
    readSample: (id) => unwrap(bridge.readSample({ id })),
    fingerprintImage: (name, bytes) => unwrap(bridge.fingerprintImage({ name, bytes })),
    listCalibrations: () => unwrap(bridge.listCalibrations({})),
    findCalibration: (name) => unwrap(bridge.findCalibration({ name })),
    saveCalibration: (calibration) => unwrap(bridge.saveCalibration({ calibration })),
    calibrationHistory: (instrument) => unwrap(bridge.calibrationHistory({ instrument })),
    recordCheck: (check) => unwrap(bridge.recordCheck(check)),
    phaseHistory: (phase) => unwrap(bridge.phaseHistory({ phase })),
    async saveExport(suggestedName, extension, bytes) {
      const chosen = await unwrap<{ path: string } | null>(bridge.chooseSavePath({ suggestedName, extension }));
      if (!chosen) return null;
      const written = await unwrap<{ path: string }>(bridge.writeReport({ path: chosen.path, bytes }));
      return written.path;
    },
    openImageDialog: () => unwrap<BytesResult<ImageFileMeta> | null>(bridge.openImageDialog()),
    onMenuCommand: (listener) => bridge.onMenuCommand(listener),
  };
}
