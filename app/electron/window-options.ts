/**
 * The main window's options. The renderer is untrusted web content: no Node, its own
 * JavaScript world (contextIsolation), the Chromium sandbox, no webviews, and only the
 * preload's small API (preload.ts) to reach the backend.
 */
import type { BrowserWindowConstructorOptions } from 'electron';

export function mainWindowOptions(preloadPath: string): BrowserWindowConstructorOptions {
  return {
    width: 1440,
    height: 900,
    minWidth: 1024,
    minHeight: 700,
    title: 'Annula',
    backgroundColor: '#101418',
    show: false,
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
      experimentalFeatures: false,
    },
  };
}
