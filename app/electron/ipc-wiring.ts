/**
 * The backend over IPC: one ipcMain.handle per channel. Before anything runs, the
 * sender must be the workspace's own top frame (annula://workspace/), and the payload
 * must pass the handler's zod schema. Every reply is an envelope, so errors arrive in
 * the renderer with what is wrong and what to do.
 */
import type { IpcMainInvokeEvent } from 'electron';
import { z } from 'zod';
import {
  findHandler,
  HandlerError,
  runHandler,
  toHandlerErrorData,
  type Handler,
  type HandlerContext,
} from '../handlers';
import type { ChosenPaths } from './chosen-paths';
import { CHOOSE_SAVE_PATH, handlerChannel, OPEN_IMAGE_DIALOG, RENDERER_HANDLERS, type IpcEnvelope } from './ipc-channels';
import { isWorkspaceUrl } from './web-contents-guards';

/** The part of ipcMain the wiring uses. */
export interface IpcMainLike {
  handle(channel: string, listener: (event: IpcMainInvokeEvent, ...args: unknown[]) => Promise<unknown>): void;
}

/** Native dialogs, injected (Electron's dialog module in the app, fakes in tests). */
export interface DesktopDialogs {
  /** The chosen image path, or null when cancelled. */
  openImage(): Promise<string | null>;
  /** The chosen path to save to, or null when cancelled. */
  saveFile(suggestedName: string, extension: string): Promise<string | null>;
}

export interface IpcWiring {
  ipcMain: IpcMainLike;
  handlers: readonly Handler[];
  /** Store and samples; the chosen-path check is added here. */
  context: Omit<HandlerContext, 'isUserChosenPath'>;
  chosenPaths: ChosenPaths;
  dialogs: DesktopDialogs;
}

const saveRequest = z.strictObject({
  suggestedName: z.string().min(1).max(200).regex(/^[^/\\]+$/, 'a file name without folders'),
  extension: z.enum(['pdf', 'csv', 'json', 'png']),
});

/** True for a message from the workspace's top frame; anything else (a subframe, another page) is refused. */
export function trustedSender(event: Pick<IpcMainInvokeEvent, 'senderFrame'>): boolean {
  const frame = event.senderFrame;
  return !!frame && frame.parent === null && isWorkspaceUrl(frame.url);
}

async function envelope<T>(event: IpcMainInvokeEvent, run: () => Promise<T>): Promise<IpcEnvelope<T>> {
  try {
    if (!trustedSender(event)) throw new HandlerError('not-allowed', 'this message did not come from the Annula workspace', 'nothing to do: it was ignored');
    return { ok: true, value: await run() };
  } catch (error) {
    return { ok: false, error: toHandlerErrorData(error) };
  }
}

/** Registers every channel; returns the channel names (for tests and for logging). */
export function wireIpc(w: IpcWiring): string[] {
  const context: HandlerContext = { ...w.context, isUserChosenPath: (path) => w.chosenPaths.mayRead(path), mayWriteChosenPath: (path) => w.chosenPaths.mayWrite(path) };
  const channels: string[] = [];
  for (const name of RENDERER_HANDLERS) {
    const handler = findHandler(name, w.handlers);
    const channel = handlerChannel(name);
    w.ipcMain.handle(channel, (event, input) => envelope(event, () => runHandler(handler, input ?? {}, context)));
    channels.push(channel);
  }
  const readChosen = findHandler('read-chosen-image', w.handlers);
  w.ipcMain.handle(OPEN_IMAGE_DIALOG, (event) =>
    envelope(event, async () => {
      const path = await w.dialogs.openImage();
      if (path === null) return null;
      w.chosenPaths.allowRead(path);
      return runHandler(readChosen, { path }, context);
    }),
  );
  channels.push(OPEN_IMAGE_DIALOG);
  w.ipcMain.handle(CHOOSE_SAVE_PATH, (event, input) =>
    envelope(event, async () => {
      const parsed = saveRequest.safeParse(input);
      if (!parsed.success) throw new HandlerError('invalid-input', `choose-save-path: ${parsed.error.issues.map((i) => `${i.path.join('.') || 'input'}: ${i.message}`).join('; ')}`, 'reload the workspace and try again');
      const path = await w.dialogs.saveFile(parsed.data.suggestedName, parsed.data.extension);
      if (path === null) return null;
      w.chosenPaths.allowWrite(path);
      return { path };
    }),
  );
  channels.push(CHOOSE_SAVE_PATH);
  return channels;
}
