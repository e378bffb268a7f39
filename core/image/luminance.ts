/**
 * How Annula reduces colour to one channel: the luminance weights of ITU-R
 * Recommendation BT.709-6 (2015), item 3.2 "Derivation of luminance signal"
 * (from memory):
 *
 *   Y = 0.2126 R + 0.7152 G + 0.0722 B
 *
 * They belong to the BT.709 primaries, which sRGB shares. Applied to gamma-encoded
 * (display-referred) values, as every RGB image file holds, the result is luma, not
 * linear luminance: a convention for turning display pictures into one channel, not
 * a measurement. A camera's own counts are single-channel; an RGB file is a picture
 * someone exported, so the reader says so in info.warnings.
 *
 * Where R = G = B (a gray picture stored as RGB) the value is taken as it is, so a
 * gray picture exported as RGB reads back exactly.
 */
export const LUMINANCE_WEIGHTS_BT709 = { r: 0.2126, g: 0.7152, b: 0.0722 } as const;

/** Y from one RGB triple on its stored scale, in double precision; R when R = G = B. */
export function luminance(r: number, g: number, b: number): number {
  if (r === g && g === b) return r;
  return LUMINANCE_WEIGHTS_BT709.r * r + LUMINANCE_WEIGHTS_BT709.g * g + LUMINANCE_WEIGHTS_BT709.b * b;
}

/** The warning a reader adds when it reduced colour with `luminance`. */
export function luminanceWarning(what: string, allEqual: boolean): string {
  return allEqual
    ? `${what}: R = G = B at every pixel, read as gray`
    : `${what} reduced to one channel as Y = 0.2126 R + 0.7152 G + 0.0722 B (ITU-R BT.709 weights; ` +
        'a convention for display-referred colour, not a measurement); prefer the camera\'s single-channel export';
}
