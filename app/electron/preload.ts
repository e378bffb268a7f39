/**
 * The preload: the renderer's only door to the backend, one object of named async
 * functions (never raw IPC). Each resolves to an envelope { ok, value | error }.
 * Built as CommonJS (out/electron/preload.cjs), as sandboxed preloads must be.
 */
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import { CHOOSE_SAVE_PATH, handlerChannel, MENU_COMMAND, MENU_COMMANDS, OPEN_IMAGE_DIALOG, type MenuCommand } from './ipc-channels';

const call = (name: string) => (input?: unknown) => ipcRenderer.invoke(handlerChannel(name), input ?? {});

const desktopApi = {
  listSamples: call('list-samples'),
  readSample: call('read-sample'),
  fingerprintImage: call('fingerprint-image'),
  listCalibrations: call('list-calibrations'),
  findCalibration: call('find-calibration'),
  saveCalibration: call('save-calibration'),
  calibrationHistory: call('calibration-history'),
  recordCheck: call('record-check'),
  phaseHistory: call('phase-history'),
  writeReport: call('write-report'),
  openImageDialog: () => ipcRenderer.invoke(OPEN_IMAGE_DIALOG),
  chooseSavePath: (input: { suggestedName: string; extension: string }) => ipcRenderer.invoke(CHOOSE_SAVE_PATH, input),
  onMenuCommand(listener: (command: MenuCommand) => void): () => void {
    const wrapped = (_event: IpcRendererEvent, command: unknown): void => {
      if ((MENU_COMMANDS as readonly unknown[]).includes(command)) listener(command as MenuCommand);
    };
    ipcRenderer.on(MENU_COMMAND, wrapped);
    return () => ipcRenderer.off(MENU_COMMAND, wrapped);
  },
};

export type DesktopApi = typeof desktopApi;

contextBridge.exposeInMainWorld('annulaDesktop', desktopApi);
