/** Browser mode: the loopback HTTP server for the workspace (see loopback-server.ts). */
export { startLoopbackServer, MAX_JSON_BYTES } from './loopback-server';
export type { LoopbackServer, LoopbackServerOptions } from './loopback-server';
export { CONTENT_SECURITY_POLICY, SECURITY_HEADERS } from './security-headers';
export { TOKEN_COOKIE, TOKEN_HEADER, TOKEN_QUERY, hostAllowed, originAllowed } from './request-guard';
export { openInBrowser, browserCommand } from './open-browser';
export { DEFAULT_RENDERER_DIR, DEFAULT_SAMPLES_DIR } from './renderer-location';
export { rendererIndexExists } from './static-files';
