/**
 * A backend handler: a name, a zod schema for its input and an async function. Written
 * once, served by every transport (app/server over loopback HTTP, app/electron over IPC).
 */
import type { z } from 'zod';
import type { HandlerMap, HandlerName } from './contract';
import { HandlerError } from './handler-error';

/** What a handler may use besides its input; each transport builds one. */
export interface HandlerContext {
  /** Absolute path of the folder holding the bundled samples (samples/<id>/sample.json). */
  samplesDir: string;
  /** The lab store file's absolute path (see app/node/store resolveStorePath). */
  storePath: string;
  /**
   * Whether the user chose this file in this session (an open dialog in the desktop app).
   * Browser mode never allows a path: files arrive as uploaded bytes.
   */
  isUserChosenPath(path: string): boolean;
  /**
   * Whether the user chose this path in a save dialog this session (desktop only). Left
   * out in browser mode, where exports are downloads and the backend writes no file.
   */
  mayWriteChosenPath?(path: string): boolean;
}

export interface Handler<N extends HandlerName = HandlerName> {
  name: N;
  /** One line for people (the server's error for an unknown name lists these). */
  summary: string;
  input: z.ZodType<HandlerMap[N]['input']>;
  /** True when the input carries a `bytes` field (HTTP: the raw-bytes route). */
  takesBytes?: boolean;
  run(input: HandlerMap[N]['input'], context: HandlerContext): Promise<HandlerMap[N]['output']>;
}

/** Identity helper that keeps a handler's name and types together. */
export function defineHandler<N extends HandlerName>(handler: Handler<N>): Handler<N> {
  return handler;
}

function formatPath(path: readonly PropertyKey[]): string {
  return path.length === 0 ? 'the request' : path.map((p) => (typeof p === 'number' ? `[${p}]` : String(p))).join('.');
}

/**
 * Validates `raw` against the handler's schema.
 * @throws HandlerError 'invalid-input' naming each wrong field and what was expected
 */
export function parseHandlerInput<N extends HandlerName>(handler: Handler<N>, raw: unknown): HandlerMap[N]['input'] {
  const parsed = handler.input.safeParse(raw);
  if (parsed.success) return parsed.data;
  const problems = parsed.error.issues.map((issue) => `${formatPath(issue.path)}: ${issue.message}`);
  throw new HandlerError('invalid-input', `${handler.name}: ${problems.join('; ')}`, 'this request came from the workspace itself: reload it, and report the problem if it stays');
}

/** Validates and runs: the one call both transports make. */
export async function runHandler<N extends HandlerName>(handler: Handler<N>, raw: unknown, context: HandlerContext): Promise<HandlerMap[N]['output']> {
  return handler.run(parseHandlerInput(handler, raw), context);
}
