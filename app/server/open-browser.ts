/** Opens a URL in the user's default browser (xdg-open, open, or start), without waiting for it. */
import { spawn } from 'node:child_process';

export function browserCommand(platform: NodeJS.Platform, url: string): { command: string; args: string[] } {
  if (platform === 'darwin') return { command: 'open', args: [url] };
  if (platform === 'win32') return { command: 'cmd', args: ['/c', 'start', '""', url] };
  return { command: 'xdg-open', args: [url] };
}

/** Starts the browser; resolves false (never throws) when no opener could be started. */
export function openInBrowser(url: string, platform: NodeJS.Platform = process.platform): Promise<boolean> {
  const { command, args } = browserCommand(platform, url);
  return new Promise((resolvePromise) => {
    try {
      const child = spawn(command, args, { stdio: 'ignore', detached: true });
      child.once('error', () => resolvePromise(false));
      child.once('spawn', () => {
        child.unref();
        resolvePromise(true);
      });
    } catch {
      resolvePromise(false);
    }
  });
}
