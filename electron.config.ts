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
  linux: { target: string[]; category: string };
  win: { target: string[] };
  mac: { target: string[]; category: string; hardenedRuntime: boolean };
}

const config: DesktopBuildConfig = {
  appId: 'org.annula.desktop',
  productName: 'Annula',
  directories: { output: 'out/desktop', buildResources: 'app/electron/resources' },
  files: ['out/renderer/**', 'out/electron/**', 'package.json'],
  linux: { target: ['AppImage', 'deb'], category: 'Science' },
  win: { target: ['nsis'] },
  mac: { target: ['dmg'], category: 'public.app-category.education', hardenedRuntime: true },
};

export default config;
