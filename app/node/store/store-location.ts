/**
 * Where the lab store lives: `--store <file>` first, then the environment variable
 * ANNULA_STORE, then a file in the user's data directory:
 *
 * | platform | default store file |
 * | --- | --- |
 * | Linux and other Unix | `$XDG_DATA_HOME/annula/lab-records.sqlite`, XDG_DATA_HOME defaulting to `~/.local/share` (XDG Base Directory Specification 0.8: a relative XDG_DATA_HOME is ignored) |
 * | macOS | `~/Library/Application Support/Annula/lab-records.sqlite` |
 * | Windows | `%APPDATA%\Annula\lab-records.sqlite`, APPDATA defaulting to `<home>\AppData\Roaming` |
 *
 * Every surface (the CLI, the desktop app) resolves the store with this one function, so
 * they find the same file.
 */
import { homedir } from 'node:os';
import { posix, resolve, win32 } from 'node:path';

/** The environment variable naming the store file. */
export const STORE_ENV_VARIABLE = 'ANNULA_STORE';

/** The store file's name inside the data directory. */
export const STORE_FILE_NAME = 'lab-records.sqlite';

/** Where the path came from: the command-line option, the environment variable, or the platform default. */
export type StoreLocationSource = 'option' | 'environment' | 'default';

export interface StoreLocation {
  /** Absolute path of the store file. */
  path: string;
  source: StoreLocationSource;
}

export interface ResolveStorePathOptions {
  /** The `--store` value, if given (relative paths are taken from the working directory). */
  option?: string | undefined;
  /** Default process.env. */
  env?: Record<string, string | undefined>;
  /** Default process.platform. */
  platform?: NodeJS.Platform;
  /** Default os.homedir(). */
  home?: string;
  /** Default process.cwd(), for relative `--store` and ANNULA_STORE values. */
  cwd?: string;
}

/**
 * Resolves the store file's path.
 * @throws TypeError when `option` is given but empty
 */
export function resolveStorePath(options: ResolveStorePathOptions = {}): StoreLocation {
  const env = options.env ?? process.env;
  const platform = options.platform ?? process.platform;
  const home = options.home ?? homedir();
  const cwd = options.cwd ?? process.cwd();
  const windows = platform === 'win32';
  const absolute = (p: string): string => (windows ? win32.resolve(cwd, p) : resolve(cwd, p));
  if (options.option !== undefined) {
    if (options.option.trim() === '') throw new TypeError('--store needs a file name, e.g. --store lab.sqlite');
    return { path: absolute(options.option), source: 'option' };
  }
  const fromEnv = env[STORE_ENV_VARIABLE];
  if (fromEnv !== undefined && fromEnv.trim() !== '') return { path: absolute(fromEnv), source: 'environment' };
  if (windows) {
    const appData = env.APPDATA && win32.isAbsolute(env.APPDATA) ? env.APPDATA : win32.join(home, 'AppData', 'Roaming');
    return { path: win32.join(appData, 'Annula', STORE_FILE_NAME), source: 'default' };
  }
  if (platform === 'darwin') {
    return { path: posix.join(home, 'Library', 'Application Support', 'Annula', STORE_FILE_NAME), source: 'default' };
  }
  const xdg = env.XDG_DATA_HOME;
  const dataHome = xdg && posix.isAbsolute(xdg) ? xdg : posix.join(home, '.local', 'share');
  return { path: posix.join(dataHome, 'annula', STORE_FILE_NAME), source: 'default' };
}
