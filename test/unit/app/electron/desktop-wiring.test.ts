/**
 * The desktop main process wired against fakes of Electron's modules (the binary cannot
 * be installed on build machines): window options, security settings, IPC validation
 * and the chosen-path allow-list.
 */
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ChosenPaths } from '../../../../app/electron/chosen-paths';
import { applicationMenuTemplate } from '../../../../app/electron/app-menu';
import { openDesktopWorkspace, registerDesktopScheme, type ElectronApi } from '../../../../app/electron/desktop-main';
import { workspaceResponse } from '../../../../app/electron/desktop-protocol';
import { CHOOSE_SAVE_PATH, handlerChannel, OPEN_IMAGE_DIALOG, RENDERER_HANDLERS } from '../../../../app/electron/ipc-channels';
import { trustedSender, wireIpc } from '../../../../app/electron/ipc-wiring';
import { guardWebContents } from '../../../../app/electron/web-contents-guards';
import { mainWindowOptions } from '../../../../app/electron/window-options';
import { BACKEND_HANDLERS } from '../../../../app/handlers';

const samplesDir = resolve(import.meta.dirname, '../../../../samples');
type Listener = (event: unknown, ...args: unknown[]) => Promise<unknown>;

function fakeIpcMain(): { handle(channel: string, l: Listener): void; channels: Map<string, Listener> } {
  const channels = new Map<string, Listener>();
  return { channels, handle: (channel, l) => void channels.set(channel, l) };
}

const fromWorkspace = { senderFrame: { url: 'annula://workspace/index.html', parent: null } };
const fromElsewhere = { senderFrame: { url: 'https://attacker.example/', parent: null } };
const fromSubframe = { senderFrame: { url: 'annula://workspace/index.html', parent: {} } };

describe('mainWindowOptions', () => {
  it('isolates the renderer: context isolation, sandbox, no Node, no webviews', () => {
    const w = mainWindowOptions('/app/out/electron/preload.cjs').webPreferences!;
    expect(w).toMatchObject({ preload: '/app/out/electron/preload.cjs', contextIsolation: true, sandbox: true, nodeIntegration: false, nodeIntegrationInWorker: false, nodeIntegrationInSubFrames: false, webSecurity: true, allowRunningInsecureContent: false, webviewTag: false, navigateOnDragDrop: false });
  });
});

describe('guardWebContents', () => {
  it('blocks navigation, redirects, webviews and new windows', () => {
    const handlers = new Map<string, (e: { preventDefault(): void; prevented?: boolean }) => void>();
    let openHandler: (() => { action: string }) | null = null;
    guardWebContents({ on: ((name: string, h: never) => void handlers.set(name, h)) as never, setWindowOpenHandler: ((h: never) => (openHandler = h)) as never });
    for (const name of ['will-navigate', 'will-redirect', 'will-attach-webview']) {
      const event = { prevented: false, preventDefault() { this.prevented = true; } };
      handlers.get(name)!(event);
      expect(event.prevented, name).toBe(true);
    }
    expect(openHandler!()).toEqual({ action: 'deny' });
  });
});

describe('trustedSender', () => {
  it('accepts only the workspace top frame', () => {
    expect(trustedSender(fromWorkspace as never)).toBe(true);
    expect(trustedSender(fromElsewhere as never)).toBe(false);
    expect(trustedSender(fromSubframe as never)).toBe(false);
    expect(trustedSender({ senderFrame: null } as never)).toBe(false);
    expect(trustedSender({ senderFrame: { url: 'annula://workspace.attacker/x', parent: null } } as never)).toBe(false);
  });
});

describe('wireIpc', () => {
  let dir: string;
  let image: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'annula-ipc-'));
    image = join(dir, 'film.tif');
    await writeFile(image, Buffer.from('abc'));
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  function wired(openImage: string | null = null, savePath: string | null = null) {
    const ipc = fakeIpcMain();
    const chosen = new ChosenPaths();
    const channels = wireIpc({ ipcMain: ipc as never, handlers: BACKEND_HANDLERS, context: { samplesDir, storePath: join(dir, 'none.sqlite') }, chosenPaths: chosen, dialogs: { openImage: async () => openImage, saveFile: async () => savePath } });
    return { ipc, chosen, channels };
  }

  it('registers one channel per renderer handler plus the two dialogs, and no raw file reading', () => {
    const { channels } = wired();
    expect(channels).toEqual([
      ...['list-samples', 'read-sample', 'fingerprint-image', 'list-calibrations', 'find-calibration', 'save-calibration', 'calibration-history', 'record-check', 'phase-history', 'write-report'].map(handlerChannel),
      OPEN_IMAGE_DIALOG,
      CHOOSE_SAVE_PATH,
    ]);
    expect(channels).not.toContain(handlerChannel('read-chosen-image'));
  });

  it('refuses messages from anything but the workspace', async () => {
    const { ipc } = wired();
    const r = (await ipc.channels.get(handlerChannel('list-samples'))!(fromElsewhere)) as { ok: boolean; error: { code: string } };
    expect(r.ok).toBe(false);
    expect(r.error.code).toBe('not-allowed');
  });

  it('validates every payload before use', async () => {
    const { ipc } = wired();
    const bad = (await ipc.channels.get(handlerChannel('read-sample'))!(fromWorkspace, { id: '../../../etc/passwd' })) as { ok: boolean; error: { code: string; message: string } };
    expect(bad.ok).toBe(false);
    expect(bad.error.code).toBe('invalid-input');
    expect(bad.error.message).toMatch(/^read-sample: id: /);
    const extra = (await ipc.channels.get(handlerChannel('list-samples'))!(fromWorkspace, { path: '/etc/passwd' })) as { ok: boolean };
    expect(extra.ok).toBe(false);
    const good = (await ipc.channels.get(handlerChannel('list-samples'))!(fromWorkspace, {})) as { ok: boolean; value: Array<{ id: string }> };
    expect(good.value.map((s) => s.id)).toContain('gold-standard');
  });

  it('reads a file only after the user chose it in the open dialog', async () => {
    const { ipc, chosen } = wired(image);
    expect(chosen.mayRead(image)).toBe(false);
    const r = (await ipc.channels.get(OPEN_IMAGE_DIALOG)!(fromWorkspace)) as { ok: boolean; value: { meta: { name: string; sha256: string }; bytes: Uint8Array } };
    expect(r.ok).toBe(true);
    expect(r.value.meta.name).toBe('film.tif');
    // FIPS 180-2, appendix B.1: SHA-256("abc").
    expect(r.value.meta.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(chosen.mayRead(image)).toBe(true);
    expect(chosen.mayRead(join(dir, 'other.tif'))).toBe(false);
    expect(chosen.mayRead(join(dir, 'sub', '..', 'film.tif'))).toBe(true);
  });

  it('returns null when the dialog is cancelled', async () => {
    const { ipc } = wired(null);
    expect(await ipc.channels.get(OPEN_IMAGE_DIALOG)!(fromWorkspace)).toEqual({ ok: true, value: null });
  });

  it('allows writing only to the path chosen in the save dialog, with a validated request', async () => {
    const target = join(dir, 'report.pdf');
    const { ipc, chosen } = wired(null, target);
    const bad = (await ipc.channels.get(CHOOSE_SAVE_PATH)!(fromWorkspace, { suggestedName: '../x.pdf', extension: 'pdf' })) as { ok: boolean };
    expect(bad.ok).toBe(false);
    expect(chosen.mayWrite(target)).toBe(false);
    const good = await ipc.channels.get(CHOOSE_SAVE_PATH)!(fromWorkspace, { suggestedName: 'report.pdf', extension: 'pdf' });
    expect(good).toEqual({ ok: true, value: { path: target } });
    expect(chosen.mayWrite(target)).toBe(true);
    expect(chosen.mayRead(target)).toBe(false);
  });

  it('writes an export only to the path chosen in the save dialog', async () => {
    const target = join(dir, 'chosen.csv');
    const { ipc } = wired(null, target);
    const write = ipc.channels.get(handlerChannel('write-report'))!;
    const early = (await write(fromWorkspace, { path: target, bytes: new Uint8Array([65]) })) as { ok: boolean; error: { code: string } };
    expect(early.ok).toBe(false);
    expect(early.error.code).toBe('not-allowed');
    await ipc.channels.get(CHOOSE_SAVE_PATH)!(fromWorkspace, { suggestedName: 'chosen.csv', extension: 'csv' });
    const other = (await write(fromWorkspace, { path: join(dir, 'elsewhere.csv'), bytes: new Uint8Array([65]) })) as { ok: boolean };
    expect(other.ok).toBe(false);
    const done = (await write(fromWorkspace, { path: target, bytes: new Uint8Array([65, 66]) })) as { ok: boolean; value: { byteLength: number } };
    expect(done).toEqual({ ok: true, value: { path: target, byteLength: 2 } });
    expect((await readFile(target)).toString()).toBe('AB');
  });
});

describe('workspaceResponse', () => {
  it('serves renderer files with the CSP and nothing outside', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'annula-proto-'));
    await writeFile(join(dir, 'index.html'), '<title>w</title>');
    try {
      const ok = await workspaceResponse('annula://workspace/index.html', dir);
      expect(ok.status).toBe(200);
      expect(ok.headers.get('content-security-policy')).toContain("default-src 'none'");
      expect((await workspaceResponse('annula://workspace/../../etc/passwd', dir)).status).toBe(404);
      expect((await workspaceResponse('annula://other/index.html', dir)).status).toBe(404);
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });
});

describe('openDesktopWorkspace', () => {
  it('builds one guarded window on the workspace scheme, the menu and the IPC channels', async () => {
    const log: string[] = [];
    const ipc = fakeIpcMain();
    let windowOptions: unknown = null;
    class FakeWindow {
      webContents = { on: (name: string) => log.push(`on ${name}`), setWindowOpenHandler: () => log.push('window-open handler'), send: () => {} };
      constructor(options: unknown) {
        windowOptions = options;
      }
      once() {}
      show() {}
      async loadURL(url: string) {
        log.push(`load ${url}`);
      }
    }
    const electron = {
      app: {},
      BrowserWindow: FakeWindow,
      Menu: { buildFromTemplate: (t: unknown[]) => ({ items: t.length }), setApplicationMenu: (m: { items: number }) => log.push(`menu ${m.items}`) },
      dialog: {},
      ipcMain: ipc,
      protocol: { handle: (scheme: string) => log.push(`protocol ${scheme}`), registerSchemesAsPrivileged: (s: Array<{ scheme: string; privileges: object }>) => log.push(`privileged ${JSON.stringify(s)}`) },
      session: { defaultSession: { setPermissionRequestHandler: () => log.push('permissions denied'), setPermissionCheckHandler: () => log.push('permission checks denied') } },
    } as unknown as ElectronApi;
    registerDesktopScheme(electron);
    await openDesktopWorkspace(electron, { rendererDir: '/r', preloadPath: '/p/preload.cjs', samplesDir });
    expect(log).toContain('privileged [{"scheme":"annula","privileges":{"standard":true,"secure":true,"supportFetchAPI":true,"codeCache":true}}]');
    expect(log).toContain('protocol annula');
    expect(log).toEqual(expect.arrayContaining(['permissions denied', 'on will-navigate', 'on will-redirect', 'on will-attach-webview', 'window-open handler', 'menu 3', 'load annula://workspace/index.html']));
    expect((windowOptions as { webPreferences: { sandbox: boolean } }).webPreferences.sandbox).toBe(true);
    expect(ipc.channels.size).toBe(RENDERER_HANDLERS.length + 2);
  });
});

describe('applicationMenuTemplate', () => {
  it('sends the menu commands the workspace knows, with their shortcuts', () => {
    const sent: string[] = [];
    const menu = applicationMenuTemplate((c) => sent.push(c), 'linux');
    const items = menu.flatMap((m) => (m.submenu as Array<{ label?: string; accelerator?: string; click?: () => void }>) ?? []);
    for (const item of items) item.click?.();
    expect(sent).toEqual(['open-image', 'open-demo', 'fit-view', 'toggle-theme', 'show-help']);
    expect(items.find((i) => i.label === 'Open image…')?.accelerator).toBe('CmdOrCtrl+O');
  });
});
