/**
 * The IPC contract of the desktop app: channel names (all prefixed "annula:") shared by
 * the main process and the preload. Plain constants, no Electron import, so the preload
 * bundle stays small and tests need no binary.
 */
import type { HandlerErrorData, HandlerName } from '../handlers/contract';

export const CHANNEL_PREFIX = 'annula:';

/** Backend handlers the renderer may call through the preload (read-chosen-image is reached only through the open dialog). */
export const RENDERER_HANDLERS = [
  'list-samples',
  'read-sample',
  'fingerprint-image',
  'list-calibrations',
  'find-calibration',
  'save-calibration',
  'calibration-history',
  'record-check',
  'phase-history',
  'write-report',
] as const satisfies readonly HandlerName[];

export const handlerChannel = (name: string): string => `${CHANNEL_PREFIX}handler:${name}`;

/** Shows the native open dialog; the chosen file's bytes come back (null when cancelled). */
export const OPEN_IMAGE_DIALOG = `${CHANNEL_PREFIX}open-image-dialog`;
/** Shows the native save dialog; the chosen path is allowed for writing (null when cancelled). */
export const CHOOSE_SAVE_PATH = `${CHANNEL_PREFIX}choose-save-path`;
/** Main -> renderer: a menu command. */
export const MENU_COMMAND = `${CHANNEL_PREFIX}menu-command`;

export const MENU_COMMANDS = ['open-image', 'open-demo', 'toggle-theme', 'show-help', 'fit-view'] as const;
export type MenuCommand = (typeof MENU_COMMANDS)[number];

/** What every invoke resolves to: errors cross as data (Electron drops an Error's fields). */
export type IpcEnvelope<T> = { ok: true; value: T } | { ok: false; error: HandlerErrorData };

/** The custom scheme the workspace is served from in the desktop app. */
export const DESKTOP_SCHEME = 'annula';
export const DESKTOP_ORIGIN = `${DESKTOP_SCHEME}://workspace`;
