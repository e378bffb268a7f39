/**
 * Why a file could not be read from disk (before any decoding):
 * 'missing' no such file; 'directory' the path is a folder; 'unreadable' no permission
 * or another I/O failure; 'too-large' bigger than the reader accepts.
 */
export type FileReadReason = 'missing' | 'directory' | 'unreadable' | 'too-large';

/**
 * A file the program could not read. The message names the path, says what is wrong and
 * what to do (`<path>: <what is wrong>; <what to do>`); surfaces map the class to their
 * "input error" (the CLI's exit code 3), as they do ImageDecodeError.
 */
export class FileReadError extends Error {
  override name = 'FileReadError';

  constructor(
    readonly path: string,
    readonly reason: FileReadReason,
    problem: string,
    advice: string,
    options?: { cause?: unknown },
  ) {
    super(`${path}: ${problem}; ${advice}`, options);
  }
}
