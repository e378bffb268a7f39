/**
 * The report's colours, shared by the pattern image, the PDF and the control
 * chart, so a ring means the same colour everywhere.
 *
 * Chosen to read on a dark screen in a microscope room and on white paper: every
 * overlay on the pattern image is drawn in a light, saturated colour over a dark
 * casing (an outline), so it stands out from any grey level of the image; the
 * plots on white paper use the deeper `onPaper` shade of the same hue. The hues
 * (amber, cyan, raspberry) stay apart for the common red-green colour
 * deficiencies, and every distinction is also made without colour (solid against
 * dashed lines, marker shapes, words).
 */

/** An sRGB colour, 0-255 per channel. */
export type Rgb = readonly [r: number, g: number, b: number];

export interface OverlayColour {
  /** On the pattern image (over its dark casing). */
  onImage: Rgb;
  /** On white paper (plots, tables). */
  onPaper: Rgb;
}

export const PALETTE = {
  /** A ring the analysis fitted and indexed. */
  fittedRing: { onImage: [255, 184, 28], onPaper: [196, 116, 0] },
  /** A fitted ring the best candidate does not explain (a possible second phase). */
  unexplainedRing: { onImage: [255, 92, 150], onPaper: [192, 24, 92] },
  /** Rings predicted for the chosen phase. */
  predictedRing: { onImage: [96, 214, 240], onPaper: [18, 118, 158] },
  /** The pattern centre. */
  centre: { onImage: [246, 246, 246], onPaper: [30, 30, 30] },
  /** Tint laid over masked pixels (saturated, hot, beam stop, user regions). */
  mask: { onImage: [70, 110, 255], onPaper: [70, 110, 255] },
  /** The dark casing under every overlay line and the label chips. */
  casing: [16, 18, 24] as Rgb,
  /** Text and axes on paper. */
  ink: [27, 31, 36] as Rgb,
  muted: [96, 104, 114] as Rgb,
  rule: [200, 205, 212] as Rgb,
  shade: [240, 242, 245] as Rgb,
  /** Data and background curves on paper. */
  data: [40, 44, 52] as Rgb,
  background: [104, 112, 200] as Rgb,
  /** Verdicts: green, red, amber-brown (also told apart by words and marker shapes). */
  pass: [22, 128, 82] as Rgb,
  fail: [196, 40, 40] as Rgb,
  inconclusive: [176, 112, 10] as Rgb,
  noVerdict: [110, 116, 124] as Rgb,
  /** Tolerance band of the control chart. */
  band: [212, 236, 222] as Rgb,
} as const satisfies Record<string, OverlayColour | Rgb>;

/** "#rrggbb" of a colour. */
export function hexColour(c: Rgb): string {
  return `#${c.map((v) => Math.round(v).toString(16).padStart(2, '0')).join('')}`;
}
