/**
 * Response headers of the loopback server. The Content-Security-Policy allows only the
 * workspace's own files: scripts and workers from this origin ('wasm-unsafe-eval' lets the
 * worker compile OpenCV's WebAssembly, no string eval), no inline script, no other hosts,
 * no frames, no plugins, no form posts, no <base> tricks. The desktop app sends the same.
 */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'none'",
  "script-src 'self' 'wasm-unsafe-eval'",
  "worker-src 'self'",
  "style-src 'self'",
  "img-src 'self' blob: data:",
  "font-src 'self'",
  "connect-src 'self'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
  "object-src 'none'",
].join('; ');

/**
 * The analysis worker's own policy (a dedicated worker follows the policy delivered with
 * its script, not the page's). OpenCV's embind builds its function wrappers with
 * `new Function`, so the worker alone may evaluate strings ('unsafe-eval'); it has no
 * DOM, and with connect-src limited to data: URIs it cannot reach the backend or anything else.
 */
export const WORKER_CONTENT_SECURITY_POLICY = [
  "default-src 'none'",
  "script-src 'self' 'unsafe-eval' 'wasm-unsafe-eval'",
  // OpenCV fetches its embedded wasm from a data: URI (no network); anything else stays blocked.
  "connect-src data:",
  "base-uri 'none'",
].join('; ');

/** Built worker scripts (vite names them after their source: analysis-worker-<hash>.js). */
export function isWorkerScript(path: string): boolean {
  return /(^|[\\/])analysis-worker-[\w-]+\.js$/.test(path);
}

/** The headers of a static file: the worker's policy for the worker script, the page's for everything else. */
export function staticFileHeaders(path: string): Record<string, string> {
  return isWorkerScript(path) ? { ...SECURITY_HEADERS, 'Content-Security-Policy': WORKER_CONTENT_SECURITY_POLICY } : { ...SECURITY_HEADERS };
}

export const SECURITY_HEADERS: Readonly<Record<string, string>> = {
  'Content-Security-Policy': CONTENT_SECURITY_POLICY,
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Resource-Policy': 'same-origin',
  'X-Frame-Options': 'DENY',
  'Permissions-Policy': 'camera=(), microphone=(), geolocation=()',
};
