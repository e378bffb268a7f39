/**
 * Why an image could not be read:
 * - 'not-an-image'  the bytes are no image format at all (text, archive, PDF, empty file);
 * - 'unsupported'   an image, but a format or variant Annula does not read (GIF, JPEG-in-TIFF,
 *                   CCITT fax, 1-bit, half floats, arithmetic-coded JPEG, ...);
 * - 'too-large'     the declared size is above the pixel limit (refused before allocation);
 * - 'empty'         the image declares zero width or height;
 * - 'truncated'     the file ends before the data it declares;
 * - 'corrupt'       the data are inconsistent (bad checksum, impossible code, bad offsets);
 * - 'no-such-page'  the page asked for is not in the file.
 */
export type ImageDecodeReason =
  | 'not-an-image'
  | 'unsupported'
  | 'too-large'
  | 'empty'
  | 'truncated'
  | 'corrupt'
  | 'no-such-page';

/**
 * The one error every image decoder in core/image throws for a file it cannot use.
 * The message names the file, says what is wrong and what to do, in the form
 * `<name>: <what is wrong>; <what to do>`, so a surface can show it unchanged.
 * Surfaces map the class to their "input error" (the CLI's exit code 3).
 */
export class ImageDecodeError extends Error {
  override name = 'ImageDecodeError';

  /**
   * @param sourceName the file (or other source) as the caller named it
   * @param reason machine-readable cause, see ImageDecodeReason
   * @param problem what is wrong, without the file name
   * @param advice what the user can do about it
   */
  constructor(
    readonly sourceName: string,
    readonly reason: ImageDecodeReason,
    problem: string,
    advice: string,
  ) {
    super(`${sourceName}: ${problem}; ${advice}`);
  }
}
