/**
 * The desktop app's composition: one window on annula://workspace/, the menu, the
 * dialogs and the IPC wiring. It takes the Electron module as a parameter, so the whole
 * start-up runs in tests against fakes (the binary cannot be installed on build machines).
 */
import type * as ElectronModule from 'electron';
import { BACKEND_HANDLERS } from '../handlers';
import { resolveStorePath } from '../node/store';
import { applicationMenuTemplate } from './app-menu';
import { ChosenPaths } from './chosen-paths';
import { DESKTOP_SCHEME_PRIVILEGES, WORKSPACE_URL, workspaceResponse } from './desktop-protocol';
import { DESKTOP_SCHEME, MENU_COMMAND, type MenuCommand } from './ipc-channels';
import { wireIpc, type DesktopDialogs } from './ipc-wiring';
import { denyPermissions, guardWebContents } from './web-contents-guards';
import { mainWindowOptions } from './window-options';

export type ElectronApi = Pick<typeof ElectronModule, 'app' | 'BrowserWindow' | 'Menu' | 'dialog' | 'ipcMain' | 'protocol' | 'session'>;

export interface DesktopPaths {
  rendererDir: string;
  preloadPath: string;
  samplesDir: string;
}

const IMAGE_FILTERS = [
  { name: 'Diffraction images', extensions: ['tif', 'tiff', 'png', 'jpg', 'jpeg'] },
  { name: 'All files', extensions: ['*'] },
];

/** Call before the app is ready: the workspace scheme must be registered first. */
export function registerDesktopScheme(electron: Pick<ElectronApi, 'protocol'>): void {
  electron.protocol.registerSchemesAsPrivileged([DESKTOP_SCHEME_PRIVILEGES]);
}

/** Once the app is ready: the protocol, the IPC channels, the menu and the window. */
export async function openDesktopWorkspace(electron: ElectronApi, paths: DesktopPaths, storeOption?: string): Promise<ElectronModule.BrowserWindow> {
  const { BrowserWindow, Menu, dialog, ipcMain, protocol, session } = electron;
  protocol.handle(DESKTOP_SCHEME, (request) => workspaceResponse(request.url, paths.rendererDir));
  denyPermissions(session.defaultSession);

  const window = new BrowserWindow(mainWindowOptions(paths.preloadPath));
  guardWebContents(window.webContents);
  const send = (command: MenuCommand): void => window.webContents.send(MENU_COMMAND, command);
  Menu.setApplicationMenu(Menu.buildFromTemplate(applicationMenuTemplate(send, process.platform)));

  const dialogs: DesktopDialogs = {
    async openImage() {
      const r = await dialog.showOpenDialog(window, { title: 'Open a diffraction pattern', properties: ['openFile'], filters: IMAGE_FILTERS });
      return r.canceled || r.filePaths.length === 0 ? null : r.filePaths[0]!;
    },
    async saveFile(suggestedName, extension) {
      const r = await dialog.showSaveDialog(window, { defaultPath: suggestedName, filters: [{ name: extension.toUpperCase(), extensions: [extension] }], properties: ['showOverwriteConfirmation', 'createDirectory'] });
      return r.canceled || !r.filePath ? null : r.filePath;
    },
  };
  wireIpc({
    ipcMain,
    handlers: BACKEND_HANDLERS,
    context: { samplesDir: paths.samplesDir, storePath: resolveStorePath({ option: storeOption }).path },
    chosenPaths: new ChosenPaths(),
    dialogs,
  });
  window.once('ready-to-show', () => window.show());
  await window.loadURL(WORKSPACE_URL);
  return window;
}
