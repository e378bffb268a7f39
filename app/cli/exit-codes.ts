/**
 * Exit codes of the `annula` command (documented in the README; outside
 * scripts rely on them, so they never change meaning).
 */
export const EXIT = {
  /** The command did what was asked (for `check`: the film passed). */
  ok: 0,
  /** An unexpected internal error: a defect in Annula. Please report it. */
  internal: 1,
  /** The command line is wrong: unknown command or option, a missing or malformed value, a wrong unit. */
  usage: 2,
  /** An input file is missing, unreadable or invalid (image, CIF, phase description). */
  input: 3,
  /** The data were read but nothing was found: no rings in the image, or no lattice explains the rings. */
  nothingFound: 4,
  /** `check`: the film failed against the expected phase. */
  checkFail: 5,
  /** `check`: the data cannot decide pass or fail. */
  checkInconclusive: 6,
} as const;

export type ExitCode = (typeof EXIT)[keyof typeof EXIT];

/** A mistake on the command line; the message says what is wrong and what to do. */
export class UsageError extends Error {
  readonly exitCode = EXIT.usage;
  override name = 'UsageError';
}

/** An input file that cannot be used; the message names the file and the reason. */
export class InputError extends Error {
  readonly exitCode = EXIT.input;
  override name = 'InputError';
}

/** A command that ran correctly but found nothing to report. */
export class NothingFoundError extends Error {
  readonly exitCode = EXIT.nothingFound;
  override name = 'NothingFoundError';
}
