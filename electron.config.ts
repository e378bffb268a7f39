/**
 * Build and packaging configuration of the desktop app, for Linux, Windows and
 * macOS. The packager reads this object; the desktop main process itself
 * (app/electron/) stays thin: windows, menu, dialogs and the IPC bridge.
 *
 * The Electron binary is fetched on first launch, never during `npm ci`, so
 * build machines without outside network install and test everything else.
 */
export interface DesktopBuildConfig {
  appId: string;
  productName: string;
  directories: { output: string; buildResources: string };
  files: string[];
  /** package.json fields the packaged app gets (its entry point). */
  extraMetadata: { main: string };
  /** Protocol the OS hands to the app: none; the workspace scheme is internal (annula://workspace). */
  protocols: never[];
  linux: { target: string[]; category: string };
  win: { target: string[] };
  mac: { target: string[]; category: string; hardenedRuntime: boolean };
}

const config: DesktopBuildConfig = {
  appId: 'org.annula.desktop',
  productName: 'Annula',
  directories: { output: 'out/desktop', buildResources: 'app/electron/resources' },
  // The built renderer and main process, the bundled demo samples (opened on first launch);
  // production dependencies (zod, sql.js, mathjs, opencv-wasm...) are added by the packager.
  files: ['out/renderer/**', 'out/electron/**', 'samples/*/sample.json', 'samples/*/*.tif', 'package.json'],
  extraMetadata: { main: 'out/electron/main.js' },
  protocols: [],
  linux: { target: ['AppImage', 'deb'], category: 'Science' },
  win: { target: ['nsis'] },
  mac: { target: ['dmg'], category: 'public.app-category.education', hardenedRuntime: true },
};

export default config;
