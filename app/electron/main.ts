/**
 * Electron main process entry (built to out/electron/main.js by vite.electron.config.ts).
 * Thin: it hands Electron to desktop-main.ts, which holds all the wiring.
 */
import * as electron from 'electron';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDesktopWorkspace, registerDesktopScheme } from './desktop-main';

const here = dirname(fileURLToPath(import.meta.url)); // out/electron
const root = resolve(here, '..', '..');

registerDesktopScheme(electron);
electron.app.on('window-all-closed', () => electron.app.quit());
void electron.app.whenReady().then(() =>
  openDesktopWorkspace(electron, {
    rendererDir: resolve(root, 'out', 'renderer'),
    preloadPath: resolve(here, 'preload.cjs'),
    samplesDir: resolve(root, 'samples'),
  }, process.env.ANNULA_STORE),
);
