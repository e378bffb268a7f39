/**
 * Guards on the window's web contents: no navigation away from the workspace (a dropped
 * file or a link cannot replace it), no new windows, no webviews, no permission
 * prompts (camera, microphone, notifications...).
 */
import type { Event, Session, WebContents } from 'electron';
import { DESKTOP_ORIGIN } from './ipc-channels';

/** The subset of WebContents the guards use (so tests can pass a fake). */
export type GuardedContents = Pick<WebContents, 'on' | 'setWindowOpenHandler'>;

export function isWorkspaceUrl(url: string): boolean {
  try {
    return new URL(url).origin === DESKTOP_ORIGIN || url.startsWith(`${DESKTOP_ORIGIN}/`);
  } catch {
    return false;
  }
}

export function guardWebContents(contents: GuardedContents): void {
  contents.on('will-navigate', (event: Event) => event.preventDefault());
  contents.on('will-redirect', (event: Event) => event.preventDefault());
  contents.on('will-attach-webview', (event: Event) => event.preventDefault());
  contents.setWindowOpenHandler(() => ({ action: 'deny' }));
}

export function denyPermissions(session: Pick<Session, 'setPermissionRequestHandler' | 'setPermissionCheckHandler'>): void {
  session.setPermissionRequestHandler((_contents, _permission, callback) => callback(false));
  session.setPermissionCheckHandler(() => false);
}
