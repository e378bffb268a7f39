/**
 * Browser mode: the workspace and the backend handlers over HTTP on 127.0.0.1 only.
 *
 *   GET  /<file>?token=<secret>   sets the token cookie and redirects to /<file> (the URL printed)
 *   GET  /<file>                  the built renderer (out/renderer), token cookie required
 *   POST /api/<handler>           JSON body -> { ok: true, value } | { ok: false, error }
 *   POST /api/raw/<handler>?name=<file name>
 *                                 the body is an uploaded file's bytes (handlers that take bytes)
 *
 * A handler result with bytes is sent as application/octet-stream with its metadata,
 * URI-encoded JSON, in the X-Annula-Meta header. Every request must name this server in
 * its Host header (DNS rebinding) and carry the token (request-guard.ts); POSTs from
 * another origin are refused; every response carries the strict CSP (security-headers.ts).
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import {
  BACKEND_HANDLERS,
  findHandler,
  HandlerError,
  MAX_IMAGE_BYTES,
  runHandler,
  toHandlerErrorData,
  type Handler,
  type HandlerContext,
  type HandlerErrorCode,
} from '../handlers';
import { hostAllowed, newSessionToken, originAllowed, sameSecret, TOKEN_HEADER, TOKEN_QUERY, tokenCookie, tokenFromCookie } from './request-guard';
import { SECURITY_HEADERS, staticFileHeaders } from './security-headers';
import { readStaticFile, resolveStaticFile } from './static-files';

/** Largest JSON request body, bytes. */
export const MAX_JSON_BYTES = 1 << 20;

export interface LoopbackServerOptions {
  /** Folder of the built renderer (index.html and its assets). */
  rendererDir: string;
  /** What the handlers may use; isUserChosenPath is always false here (uploads only). */
  context: Omit<HandlerContext, 'isUserChosenPath'>;
  /** Port to listen on; 0 (default) picks a free one. */
  port?: number;
  /** The secret; default a new random one per launch. */
  token?: string;
  handlers?: readonly Handler[];
}

export interface LoopbackServer {
  port: number;
  token: string;
  /** The address to open: http://127.0.0.1:<port>/?token=<secret>. */
  url: string;
  close(): Promise<void>;
}

const STATUS: Record<HandlerErrorCode, number> = {
  'invalid-input': 400,
  'unknown-handler': 404,
  'not-allowed': 403,
  'not-found': 404,
  unreadable: 422,
  'not-available': 501,
  internal: 500,
};

function send(res: ServerResponse, status: number, body: string | Buffer | Uint8Array, contentType: string, extra: Record<string, string> = {}, headers: Record<string, string> = SECURITY_HEADERS): void {
  res.writeHead(status, { ...headers, 'Content-Type': contentType, 'Cache-Control': 'no-store', ...extra });
  res.end(body);
}

function sendError(res: ServerResponse, error: unknown): void {
  const data = toHandlerErrorData(error);
  send(res, STATUS[data.code], JSON.stringify({ ok: false, error: data }), 'application/json');
}

function refuse(res: ServerResponse, status: number, text: string): void {
  send(res, status, text + '\n', 'text/plain; charset=utf-8');
}

/** Reads the whole body, refusing more than `limit` bytes. */
function readBody(req: IncomingMessage, limit: number): Promise<Buffer> {
  return new Promise((resolvePromise, reject) => {
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > limit) {
      reject(new HandlerError('invalid-input', `the request body has ${declared} bytes, more than the ${limit} accepted`, 'send a smaller file'));
      req.resume();
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    req.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > limit) {
        reject(new HandlerError('invalid-input', `the request body is larger than the ${limit} bytes accepted`, 'send a smaller file'));
        req.destroy();
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', () => resolvePromise(Buffer.concat(chunks)));
    req.on('error', reject);
  });
}

function isBytesResult(value: unknown): value is { meta: unknown; bytes: Uint8Array } {
  return typeof value === 'object' && value !== null && 'bytes' in value && (value as { bytes: unknown }).bytes instanceof Uint8Array && 'meta' in value;
}

async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL, handlers: readonly Handler[], context: HandlerContext): Promise<void> {
  if (req.method !== 'POST') {
    refuse(res, 405, 'the backend functions take POST requests');
    return;
  }
  const raw = url.pathname.startsWith('/api/raw/');
  const name = decodeURIComponent(url.pathname.slice(raw ? '/api/raw/'.length : '/api/'.length));
  try {
    const handler = findHandler(name, handlers);
    let input: unknown;
    if (raw) {
      if (!handler.takesBytes) throw new HandlerError('invalid-input', `${name} does not take uploaded bytes`, `post JSON to /api/${name}`);
      const body = await readBody(req, MAX_IMAGE_BYTES);
      input = { name: url.searchParams.get('name') ?? 'upload', bytes: new Uint8Array(body.buffer, body.byteOffset, body.byteLength) };
    } else {
      const type = String(req.headers['content-type'] ?? '');
      if (!/^application\/json\b/i.test(type)) {
        throw new HandlerError('invalid-input', `the request is ${type || 'without a content type'}, not application/json`, 'send the input as JSON');
      }
      const body = await readBody(req, MAX_JSON_BYTES);
      try {
        input = body.length === 0 ? {} : JSON.parse(body.toString('utf8'));
      } catch (e) {
        throw new HandlerError('invalid-input', `the request body is not valid JSON (${(e as Error).message})`, 'send the input as JSON');
      }
    }
    const value = await runHandler(handler, input, context);
    if (isBytesResult(value)) {
      send(res, 200, value.bytes, 'application/octet-stream', { 'X-Annula-Meta': encodeURIComponent(JSON.stringify(value.meta)) });
    } else {
      send(res, 200, JSON.stringify({ ok: true, value }), 'application/json');
    }
  } catch (error) {
    sendError(res, error);
  }
}

async function handleStatic(req: IncomingMessage, res: ServerResponse, url: URL, rendererDir: string): Promise<void> {
  if (req.method !== 'GET' && req.method !== 'HEAD') {
    refuse(res, 405, 'only GET here');
    return;
  }
  const file = await resolveStaticFile(rendererDir, url.pathname);
  if (!file) {
    refuse(res, 404, `nothing at ${url.pathname}`);
    return;
  }
  const body = await readStaticFile(file.path);
  send(res, 200, req.method === 'HEAD' ? '' : body, file.contentType, {}, staticFileHeaders(file.path));
}

/** Starts the server on 127.0.0.1 and resolves once it listens. */
export async function startLoopbackServer(options: LoopbackServerOptions): Promise<LoopbackServer> {
  const token = options.token ?? newSessionToken();
  const handlers = options.handlers ?? BACKEND_HANDLERS;
  // No path is ever chosen in browser mode: files arrive as uploads, exports leave as downloads.
  const context: HandlerContext = { samplesDir: options.context.samplesDir, storePath: options.context.storePath, isUserChosenPath: () => false };
  let port = options.port ?? 0;

  const server: Server = createServer((req, res) => {
    void (async () => {
      if (!hostAllowed(req.headers.host, port)) {
        refuse(res, 421, `this server answers only to 127.0.0.1:${port} and localhost:${port}`);
        return;
      }
      const url = new URL(req.url ?? '/', `http://127.0.0.1:${port}`);
      const queryToken = url.searchParams.get(TOKEN_QUERY);
      if (queryToken !== null && (req.method === 'GET' || req.method === 'HEAD')) {
        if (!sameSecret(queryToken, token)) {
          refuse(res, 401, 'this address carries a token from another launch; open the address annula serve printed this time');
          return;
        }
        url.searchParams.delete(TOKEN_QUERY);
        send(res, 303, '', 'text/plain', { Location: url.pathname + url.search, 'Set-Cookie': tokenCookie(token) });
        return;
      }
      const given = (req.headers[TOKEN_HEADER] as string | undefined) ?? tokenFromCookie(req.headers.cookie);
      if (!sameSecret(given, token)) {
        refuse(res, 401, 'open the address that annula serve printed: it carries this launch\'s secret token');
        return;
      }
      if (!originAllowed(req.headers.origin, port)) {
        refuse(res, 403, 'requests from other sites are refused');
        return;
      }
      try {
        if (url.pathname.startsWith('/api/')) await handleApi(req, res, url, handlers, context);
        else await handleStatic(req, res, url, options.rendererDir);
      } catch (error) {
        if (!res.headersSent) sendError(res, error);
        else res.destroy();
      }
    })();
  });

  await new Promise<void>((resolvePromise, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      resolvePromise();
    });
  });
  port = (server.address() as AddressInfo).port;
  return {
    port,
    token,
    url: `http://127.0.0.1:${port}/?${TOKEN_QUERY}=${token}`,
    close: () =>
      new Promise<void>((resolvePromise) => {
        server.closeAllConnections();
        server.close(() => resolvePromise());
      }),
  };
}
