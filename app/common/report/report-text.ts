/**
 * Text the report prints: the cautions every report carries, and the rewriting
 * of characters the PDF's standard fonts cannot show.
 *
 * The PDF uses the standard 14 fonts (Helvetica, Courier), whose text is encoded
 * in WinAnsi (Windows code page 1252, PDF 32000-1:2008 Annex D.2). It holds 'Å',
 * 'µ', '±', '×', '°', '·' and the dashes, but no Greek letters and no maths signs
 * such as '≤': those are spelled out ('lambda', 'sigma', '<='), anything else
 * outside the font's character set becomes '?', so a warning written by some
 * other part of Annula can never make the report fail.
 */

/** The cautions, printed in full on the last page; the first sentence is also in every page's footer. */
export const REPORT_CAUTIONS: readonly string[] = [
  "This report supports, and does not replace, the lab's qualified review and its quality procedures.",
  'Candidates rank how well the measured d-spacings and intensities fit: they are evidence for a phase, not proof of it.',
  'A lattice constant is only as good as the camera calibration behind it, and a library value only as good as its source.',
  'Texture, thickness and dynamical scattering change ring intensities; a ring the data lack or an unexplained ring needs a look at the image.',
];

/** The sentence in every page's footer. */
export const FOOTER_CAUTION = REPORT_CAUTIONS[0]!;

const SPELLED: Record<string, string> = {
  λ: 'lambda',
  σ: 'sigma',
  θ: 'theta',
  η: 'eta',
  χ: 'chi',
  π: 'pi',
  Δ: 'delta',
  δ: 'delta',
  α: 'alpha',
  β: 'beta',
  γ: 'gamma',
  '\u03bc': '\u00b5', // Greek mu -> micro sign (WinAnsi 0xB5)
  '\u212b': '\u00c5', // the angstrom sign -> the letter Å
  '≤': '<=',
  '≥': '>=',
  '≈': '~',
  '−': '-',
  '√': 'sqrt',
  '∞': 'inf',
  '→': '->',
  '←': '<-',
  '⁻': '-',
  '\u00a0': ' ',
  '\u2009': ' ',
  '\u202f': ' ',
};

/**
 * Rewrites `text` so that every character is in `charset` (Unicode code points
 * the font can show): known symbols are spelled out, line breaks and tabs become
 * spaces, anything else becomes '?'. Does not change text that already fits.
 */
export function fitToCharset(text: string, charset: ReadonlySet<number>): string {
  let out = '';
  for (const ch of text) {
    const cp = ch.codePointAt(0)!;
    if (charset.has(cp)) {
      out += ch;
      continue;
    }
    if (ch === '\n' || ch === '\r' || ch === '\t') {
      out += ' ';
      continue;
    }
    const spelled = SPELLED[ch] ?? (ch.normalize('NFD').charAt(0) !== ch ? ch.normalize('NFD').charAt(0) : undefined);
    out += spelled !== undefined && [...spelled].every((c) => charset.has(c.codePointAt(0)!)) ? spelled : '?';
  }
  return out;
}
