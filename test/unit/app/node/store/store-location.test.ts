import { describe, expect, it } from 'vitest';
import { resolveStorePath } from '../../../../../app/node/store';

const home = '/home/rvale';

describe('resolveStorePath', () => {
  it('takes --store first, then ANNULA_STORE, each resolved from the working directory', () => {
    const env = { ANNULA_STORE: 'records/env.sqlite', XDG_DATA_HOME: '/data' };
    expect(resolveStorePath({ option: 'mine.sqlite', env, platform: 'linux', home, cwd: '/lab' })).toEqual({ path: '/lab/mine.sqlite', source: 'option' });
    expect(resolveStorePath({ env, platform: 'linux', home, cwd: '/lab' })).toEqual({ path: '/lab/records/env.sqlite', source: 'environment' });
    expect(resolveStorePath({ env: { ANNULA_STORE: '  ' }, platform: 'linux', home, cwd: '/lab' }).source).toBe('default');
  });

  it('defaults on Linux to $XDG_DATA_HOME/annula, or ~/.local/share/annula when it is unset or relative (XDG Base Directory Specification)', () => {
    expect(resolveStorePath({ env: { XDG_DATA_HOME: '/srv/xdg' }, platform: 'linux', home })).toEqual({ path: '/srv/xdg/annula/lab-records.sqlite', source: 'default' });
    expect(resolveStorePath({ env: {}, platform: 'linux', home }).path).toBe('/home/rvale/.local/share/annula/lab-records.sqlite');
    expect(resolveStorePath({ env: { XDG_DATA_HOME: 'relative/dir' }, platform: 'freebsd', home }).path).toBe('/home/rvale/.local/share/annula/lab-records.sqlite');
  });

  it('defaults on macOS to ~/Library/Application Support/Annula', () => {
    expect(resolveStorePath({ env: { XDG_DATA_HOME: '/ignored' }, platform: 'darwin', home: '/Users/rvale' }).path).toBe('/Users/rvale/Library/Application Support/Annula/lab-records.sqlite');
  });

  it('defaults on Windows to %APPDATA%\\Annula, with Windows separators', () => {
    expect(resolveStorePath({ env: { APPDATA: 'C:\\Users\\rvale\\AppData\\Roaming' }, platform: 'win32', home: 'C:\\Users\\rvale' }).path).toBe(
      'C:\\Users\\rvale\\AppData\\Roaming\\Annula\\lab-records.sqlite',
    );
    expect(resolveStorePath({ env: {}, platform: 'win32', home: 'C:\\Users\\rvale' }).path).toBe('C:\\Users\\rvale\\AppData\\Roaming\\Annula\\lab-records.sqlite');
    expect(resolveStorePath({ option: 'lab.sqlite', env: {}, platform: 'win32', home: 'C:\\Users\\rvale', cwd: 'D:\\qa' }).path).toBe('D:\\qa\\lab.sqlite');
  });

  it('refuses an empty --store with a TypeError naming the option', () => {
    expect(() => resolveStorePath({ option: '' })).toThrow(/--store needs a file name/);
  });
});
