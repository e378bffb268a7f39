import { ImageDecodeError } from './image-decode-error';

/**
 * Default ceiling on width x height: 20000 x 20000 = 4e8 pixels, 1.6 GB as Float32.
 * Well above any camera in use (16 megapixels is large for a TEM camera), low enough
 * that a damaged or hostile header cannot make the reader ask for tens of gigabytes.
 */
export const DEFAULT_MAX_PIXELS = 20_000 * 20_000;

/**
 * Checks a declared image size before anything is allocated for it.
 * Throws ImageDecodeError 'empty' for a zero width or height and 'too-large' above
 * `maxPixels`.
 *
 * @param what the format as the message should name it ('TIFF', 'PNG', 'JPEG')
 */
export function checkDeclaredSize(name: string, what: string, width: number, height: number, maxPixels: number): void {
  if (width === 0 || height === 0) {
    throw new ImageDecodeError(name, 'empty', `the ${what} declares a ${width} x ${height} image, which has no pixels`, 'export the image again; a camera image has at least one row and column');
  }
  const pixels = width * height;
  if (pixels > maxPixels) {
    throw new ImageDecodeError(
      name,
      'too-large',
      `the ${what} declares ${width} x ${height} = ${pixels.toExponential(2)} pixels, above the limit of ${maxPixels.toExponential(2)}`,
      'bin or crop the image before loading it, or raise the pixel limit if the machine has the memory (4 bytes a pixel)',
    );
  }
}
