/**
 * The workspace's files in the desktop app, served on annula://workspace/ from the built
 * renderer folder, with the same Content-Security-Policy and headers as browser mode.
 * A standard, secure scheme (not file://) gives the page a real origin, so module
 * workers and fetch behave as on the web.
 */
import { SECURITY_HEADERS, staticFileHeaders } from '../server/security-headers';
import { readStaticFile, resolveStaticFile } from '../server/static-files';
import { DESKTOP_ORIGIN, DESKTOP_SCHEME } from './ipc-channels';

export const DESKTOP_SCHEME_PRIVILEGES = {
  scheme: DESKTOP_SCHEME,
  privileges: { standard: true, secure: true, supportFetchAPI: true, codeCache: true },
};

export const WORKSPACE_URL = `${DESKTOP_ORIGIN}/index.html`;

/** The response to a request on the workspace scheme: a file of the renderer, or 404. */
export async function workspaceResponse(requestUrl: string, rendererDir: string): Promise<Response> {
  let url: URL;
  try {
    url = new URL(requestUrl);
  } catch {
    return new Response('bad address', { status: 400, headers: SECURITY_HEADERS });
  }
  if (`${url.protocol}//${url.host}` !== DESKTOP_ORIGIN) return new Response('not here', { status: 404, headers: SECURITY_HEADERS });
  const file = await resolveStaticFile(rendererDir, url.pathname);
  if (!file) return new Response(`nothing at ${url.pathname}`, { status: 404, headers: SECURITY_HEADERS });
  const body = await readStaticFile(file.path);
  return new Response(new Uint8Array(body), { status: 200, headers: { ...staticFileHeaders(file.path), 'Content-Type': file.contentType } });
}
