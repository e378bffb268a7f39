import type { HandlerErrorCode, HandlerErrorData } from './contract';

/**
 * The one error handlers throw for anything the user can act on. The message reads
 * `<what is wrong>; <what to do>`, the form the CLI and core use too.
 */
export class HandlerError extends Error {
  override name = 'HandlerError';

  constructor(
    readonly code: HandlerErrorCode,
    readonly problem: string,
    readonly action: string,
    options?: { cause?: unknown },
  ) {
    super(`${problem}; ${action}`, options);
  }

  toData(): HandlerErrorData {
    return { code: this.code, problem: this.problem, action: this.action, message: this.message };
  }
}

/** Any thrown value as error data for a transport: HandlerErrors as they are, anything else as 'internal'. */
export function toHandlerErrorData(error: unknown): HandlerErrorData {
  if (error instanceof HandlerError) return error.toData();
  const detail = error instanceof Error ? error.message : String(error);
  return new HandlerError('internal', `internal error in Annula: ${detail}`, 'this is a defect; please report it with what you did').toData();
}
