/**
 * A small page-flow layer over pdf-lib for the report: a cursor that runs down
 * A4 pages, wrapped paragraphs, bullet lists, tables whose header repeats on a
 * new page, and the footer every page carries. Coordinates given to callers are
 * measured from the top of the page, in points (1/72 inch); pdf-lib's own origin
 * is the bottom-left corner.
 *
 * Every string passes fitToCharset for the font it is drawn in, so text from
 * anywhere in Annula (warnings, phase names) cannot break the PDF.
 */
import { PDFDocument, PDFFont, PDFPage, rgb, StandardFonts, type Color } from 'pdf-lib';
import type { Rgb } from './palette';
import { PALETTE } from './palette';
import { fitToCharset } from './report-text';

/** A4 portrait, points (ISO 216: 210 mm x 297 mm). */
export const A4 = { width: 595.28, height: 841.89 } as const;

export interface Fonts {
  regular: PDFFont;
  bold: PDFFont;
  italic: PDFFont;
  mono: PDFFont;
}

export type FontName = keyof Fonts;

export interface TextStyle {
  size?: number;
  font?: FontName;
  colour?: Rgb;
}

export interface TableColumn {
  title: string;
  /** Width, points. */
  width: number;
  align?: 'left' | 'right' | 'center';
}

export const colour = (c: Rgb): Color => rgb(c[0] / 255, c[1] / 255, c[2] / 255);

export async function embedReportFonts(doc: PDFDocument): Promise<Fonts> {
  return {
    regular: await doc.embedFont(StandardFonts.Helvetica),
    bold: await doc.embedFont(StandardFonts.HelveticaBold),
    italic: await doc.embedFont(StandardFonts.HelveticaOblique),
    mono: await doc.embedFont(StandardFonts.Courier),
  };
}

export class ReportWriter {
  readonly margin = { left: 42, right: 42, top: 40, bottom: 58 };
  readonly pages: PDFPage[] = [];
  page!: PDFPage;
  /** Cursor, points from the top of the page. */
  y = 0;
  private readonly charsets = new Map<PDFFont, Set<number>>();

  constructor(
    readonly doc: PDFDocument,
    readonly fonts: Fonts,
  ) {}

  get contentWidth(): number {
    return A4.width - this.margin.left - this.margin.right;
  }

  get bottom(): number {
    return A4.height - this.margin.bottom;
  }

  /** Room left on the page below the cursor, points. */
  get room(): number {
    return this.bottom - this.y;
  }

  newPage(): PDFPage {
    this.page = this.doc.addPage([A4.width, A4.height]);
    this.pages.push(this.page);
    this.y = this.margin.top;
    return this.page;
  }

  /** Starts a new page unless `height` points fit below the cursor. Returns true when it did. */
  ensure(height: number): boolean {
    if (this.pages.length > 0 && this.y + height <= this.bottom) return false;
    this.newPage();
    return true;
  }

  /** Text that the font can show (see report-text.ts). */
  fit(text: string, font: FontName = 'regular'): string {
    const f = this.fonts[font];
    let set = this.charsets.get(f);
    if (!set) {
      set = new Set(f.getCharacterSet());
      this.charsets.set(f, set);
    }
    return fitToCharset(text, set);
  }

  width(text: string, style: TextStyle = {}): number {
    const font = style.font ?? 'regular';
    return this.fonts[font].widthOfTextAtSize(this.fit(text, font), style.size ?? 9);
  }

  /** Draws one line of text with its top at `top` (points from the top); returns its width. */
  text(text: string, x: number, top: number, style: TextStyle = {}, page: PDFPage = this.page): number {
    const size = style.size ?? 9;
    const font = style.font ?? 'regular';
    const t = this.fit(text, font);
    page.drawText(t, { x, y: A4.height - top - size * 0.78, size, font: this.fonts[font], color: colour(style.colour ?? PALETTE.ink) });
    return this.fonts[font].widthOfTextAtSize(t, size);
  }

  /** Text right-aligned to `right`. */
  textRight(text: string, right: number, top: number, style: TextStyle = {}, page: PDFPage = this.page): void {
    this.text(text, right - this.width(text, style), top, style, page);
  }

  /** Text shortened with an ellipsis in its middle (keeping both ends, as file paths need) to fit `width`. */
  fitWidth(text: string, width: number, style: TextStyle = {}, where: 'middle' | 'end' = 'end'): string {
    if (this.width(text, style) <= width) return text;
    let keep = text.length;
    while (keep > 1) {
      keep--;
      const cut = where === 'middle' ? `${text.slice(0, Math.ceil(keep / 2))}…${text.slice(text.length - Math.floor(keep / 2))}` : `${text.slice(0, keep)}…`;
      if (this.width(cut, style) <= width) return cut;
    }
    return '…';
  }

  /** Lines of `text` wrapped to `width`; words longer than a line are broken. */
  wrap(text: string, width: number, style: TextStyle = {}): string[] {
    const words = this.fit(text, style.font).split(/\s+/).filter((w) => w.length > 0);
    const lines: string[] = [];
    let line = '';
    for (let word of words) {
      while (this.width(word, style) > width) {
        let k = word.length - 1;
        while (k > 1 && this.width(word.slice(0, k), style) > width) k--;
        if (line) {
          lines.push(line);
          line = '';
        }
        lines.push(word.slice(0, k));
        word = word.slice(k);
      }
      const candidate = line ? `${line} ${word}` : word;
      if (this.width(candidate, style) <= width) line = candidate;
      else {
        lines.push(line);
        line = word;
      }
    }
    if (line) lines.push(line);
    return lines.length ? lines : [''];
  }

  lineHeight(style: TextStyle = {}): number {
    return (style.size ?? 9) * 1.32;
  }

  /** A wrapped paragraph at the cursor (moving to a new page line by line as needed). */
  paragraph(text: string, style: TextStyle = {}, indent = 0, width = this.contentWidth - indent): void {
    const lh = this.lineHeight(style);
    for (const line of this.wrap(text, width, style)) {
      this.ensure(lh);
      this.text(line, this.margin.left + indent, this.y, style);
      this.y += lh;
    }
  }

  /** A heading, kept with at least `keep` points of what follows. */
  heading(text: string, keep = 40): void {
    const size = 11.5;
    if (this.y > this.margin.top) this.y += 8;
    this.ensure(size * 1.6 + keep);
    this.text(text, this.margin.left, this.y, { size, font: 'bold' });
    this.y += size * 1.25;
    this.rule(this.margin.left, this.y, this.contentWidth, PALETTE.rule, 0.6);
    this.y += 5;
  }

  /** Bullet list, each item wrapped under its bullet. */
  bullets(items: readonly string[], style: TextStyle = {}, indent = 0, bulletColour: Rgb = PALETTE.muted): void {
    const lh = this.lineHeight(style);
    for (const item of items) {
      const lines = this.wrap(item, this.contentWidth - indent - 11, style);
      lines.forEach((line, k) => {
        this.ensure(lh);
        if (k === 0) this.text('•', this.margin.left + indent + 1, this.y, { ...style, colour: bulletColour });
        this.text(line, this.margin.left + indent + 11, this.y, style);
        this.y += lh;
      });
      this.y += 1.5;
    }
  }

  rule(x: number, top: number, width: number, c: Rgb = PALETTE.rule, thickness = 0.5, page: PDFPage = this.page): void {
    page.drawLine({ start: { x, y: A4.height - top }, end: { x: x + width, y: A4.height - top }, thickness, color: colour(c) });
  }

  /** A rectangle by its top-left corner (points from the top). */
  rect(x: number, top: number, width: number, height: number, opts: { fill?: Rgb; border?: Rgb; borderWidth?: number; opacity?: number } = {}, page: PDFPage = this.page): void {
    page.drawRectangle({
      x,
      y: A4.height - top - height,
      width,
      height,
      ...(opts.fill ? { color: colour(opts.fill) } : {}),
      ...(opts.border ? { borderColor: colour(opts.border), borderWidth: opts.borderWidth ?? 0.75 } : {}),
      ...(opts.opacity !== undefined ? { opacity: opts.opacity } : {}),
    });
  }

  /**
   * A table at the cursor: a shaded header row (repeated after a page break), rows
   * with thin rules; cells are one line, shortened with an ellipsis when too long.
   */
  table(columns: readonly TableColumn[], rows: readonly (readonly string[])[], style: TextStyle = { size: 8 }): void {
    const size = style.size ?? 8;
    const rowH = size * 1.55;
    const pad = 3;
    const x0 = this.margin.left;
    const total = columns.reduce((s, c) => s + c.width, 0);
    const header = (): void => {
      this.rect(x0, this.y, total, rowH, { fill: PALETTE.shade });
      let x = x0;
      for (const c of columns) {
        const t = this.fitWidth(c.title, c.width - 2 * pad, { size, font: 'bold' });
        const w = this.width(t, { size, font: 'bold' });
        const tx = c.align === 'right' ? x + c.width - pad - w : c.align === 'center' ? x + (c.width - w) / 2 : x + pad;
        this.text(t, tx, this.y + (rowH - size) / 2, { size, font: 'bold' });
        x += c.width;
      }
      this.y += rowH;
    };
    this.ensure(2 * rowH);
    header();
    for (const row of rows) {
      if (this.ensure(rowH)) header();
      let x = x0;
      columns.forEach((c, k) => {
        const cellStyle: TextStyle = { ...style, size };
        const t = this.fitWidth(row[k] ?? '', c.width - 2 * pad, cellStyle);
        const w = this.width(t, cellStyle);
        const tx = c.align === 'right' ? x + c.width - pad - w : c.align === 'center' ? x + (c.width - w) / 2 : x + pad;
        this.text(t, tx, this.y + (rowH - size) / 2, cellStyle);
        x += c.width;
      });
      this.y += rowH;
      this.rule(x0, this.y, total, PALETTE.rule, 0.35);
    }
    this.y += 4;
  }

  /** Draws `lines` at the foot of every page, with 'page i of n' at the right of the first. */
  footers(lines: readonly [string, string]): void {
    const n = this.pages.length;
    this.pages.forEach((page, i) => {
      const top = A4.height - this.margin.bottom + 16;
      this.rule(this.margin.left, top - 4, this.contentWidth, PALETTE.rule, 0.5, page);
      const right = A4.width - this.margin.right;
      const pageText = `page ${i + 1} of ${n}`;
      this.textRight(pageText, right, top, { size: 7.5, font: 'bold', colour: PALETTE.muted }, page);
      const room = this.contentWidth - this.width(pageText, { size: 7.5, font: 'bold' }) - 12;
      this.text(this.fitWidth(lines[0], room, { size: 7.5 }), this.margin.left, top, { size: 7.5, colour: PALETTE.muted }, page);
      this.text(this.fitWidth(lines[1], this.contentWidth, { size: 7.5, font: 'italic' }), this.margin.left, top + 10, { size: 7.5, font: 'italic', colour: PALETTE.muted }, page);
    });
  }
}
