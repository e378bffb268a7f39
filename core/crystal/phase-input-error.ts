/**
 * The error every phase reader (JSON description, CIF) throws for input it
 * cannot use. The message names the source, the place (field path, CIF line
 * or data item) and what was expected, so a surface can show it unchanged;
 * `sourceName` lets it map the failure to "an input file is invalid".
 */
export class PhaseInputError extends Error {
  override name = 'PhaseInputError';

  /**
   * @param sourceName the file or other source being read, as the caller named it
   * @param message the whole message, already naming the source and the problem
   * @param line 1-based line of the problem in a text source, when one is known
   */
  constructor(
    readonly sourceName: string,
    message: string,
    readonly line?: number,
  ) {
    super(message);
  }
}
