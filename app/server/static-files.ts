/** Serving the built renderer (out/renderer) without ever leaving its folder. */
import { readFile, stat } from 'node:fs/promises';
import { extname, join, normalize, resolve, sep } from 'node:path';

const CONTENT_TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.wasm': 'application/wasm',
  '.woff2': 'font/woff2',
  '.ico': 'image/x-icon',
};

/**
 * The file under `root` that a URL path names ('/' is index.html), or null when the path
 * leaves root, is not a file, or is hidden (a segment starting with '.').
 */
export async function resolveStaticFile(root: string, urlPath: string): Promise<{ path: string; contentType: string } | null> {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath);
  } catch {
    return null;
  }
  if (decoded.includes('\0')) return null;
  const relative = decoded === '/' ? 'index.html' : decoded.replace(/^\/+/, '');
  if (relative.split(/[\\/]/).some((s) => s.startsWith('.'))) return null;
  const base = resolve(root);
  const path = resolve(base, normalize(relative));
  if (path !== base && !path.startsWith(base + sep)) return null;
  try {
    if (!(await stat(path)).isFile()) return null;
  } catch {
    return null;
  }
  return { path, contentType: CONTENT_TYPES[extname(path).toLowerCase()] ?? 'application/octet-stream' };
}

export async function readStaticFile(path: string): Promise<Buffer> {
  return readFile(path);
}

export function rendererIndexExists(root: string): Promise<boolean> {
  return stat(join(root, 'index.html')).then((s) => s.isFile(), () => false);
}
