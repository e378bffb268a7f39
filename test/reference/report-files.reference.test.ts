/**
 * The report files of a film check, as `--report <dir>` writes them
 * (app/cli/report-files.ts), read by an outside reader: Debian's poppler-utils.
 * pdftoppm draws every page: none may be blank, and the pattern picture on
 * page 1 (found as the block of rows crossed by long unbroken runs of ink)
 * must show structure: grey levels that vary, and rings, i.e. many rises and
 * falls of brightness along a line through it. pdftotext must find every
 * section the issue asks for: rings with hkl, the profile, the ring table, the
 * candidates, the calibration used, the verdict and its reasons, the cautions.
 *
 * Needs `apt-get install -y poppler-utils`; skipped without it unless
 * ANNULA_REQUIRE_REFERENCE=1. Set ANNULA_REPORT_PAGES_DIR to keep the pages as
 * PNG files for a person to look at.
 */
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkJson, writeReportFiles, type AnalysisOutput } from '../../app/cli/report-files';
import { REPORT_CAUTIONS } from '../../app/common/report';
import { findPhase } from '../../core/crystal';
import type { FilmCheck } from '../../core/qa';
import { calibrateOnGold, calibrationRecordOf, checkedTinFilm } from '../unit/app/common/report/simulated-films';
import { hasReferenceTool, readNetpbm } from './report-pages';

const available = hasReferenceTool('pdftoppm') && hasReferenceTool('pdftotext');

interface Page {
  width: number;
  height: number;
  /** Grey levels 0-255 (pdftoppm -gray), row by row. */
  grey: Float32Array;
}

function readPgm(bytes: Uint8Array): Page {
  const image = readNetpbm(bytes);
  if (image.channels !== 1) throw new Error('expected a grey PGM (P5)');
  return { width: image.width, height: image.height, grey: Float32Array.from(image.data) };
}

const inkShare = (p: Page): number => p.grey.reduce((n, v) => n + (v < 235 ? 1 : 0), 0) / p.grey.length;

/**
 * The pattern picture: the tallest block of consecutive rows whose longest run of
 * non-white pixels exceeds a third of the page width (text lines break at word
 * gaps, rules are a pixel or two tall). Returns its box, or null.
 */
function pictureBox(p: Page): { x0: number; x1: number; y0: number; y1: number } | null {
  let best: { x0: number; x1: number; y0: number; y1: number } | null = null;
  let start = -1;
  let x0 = Infinity;
  let x1 = -1;
  for (let y = 0; y <= p.height; y++) {
    let longest = 0;
    let from = 0;
    let run = 0;
    let runFrom = 0;
    if (y < p.height) {
      for (let x = 0; x < p.width; x++) {
        if (p.grey[y * p.width + x]! < 250) {
          if (run === 0) runFrom = x;
          run++;
          if (run > longest) {
            longest = run;
            from = runFrom;
          }
        } else run = 0;
      }
    }
    if (longest > p.width / 3) {
      if (start < 0) {
        start = y;
        x0 = Infinity;
        x1 = -1;
      }
      x0 = Math.min(x0, from);
      x1 = Math.max(x1, from + longest - 1);
    } else if (start >= 0) {
      if (!best || y - start > best.y1 - best.y0) best = { x0, x1, y0: start, y1: y - 1 };
      start = -1;
    }
  }
  return best;
}

/** Rises and falls of brightness along the picture's middle row, smoothed over 5 px, counting only swings above `swing` grey levels. */
function swingsAlongMiddle(p: Page, box: { x0: number; x1: number; y0: number; y1: number }, swing: number): number {
  const y = Math.round((box.y0 + box.y1) / 2);
  const line: number[] = [];
  for (let x = box.x0 + 3; x <= box.x1 - 3; x++) {
    let s = 0;
    for (let k = -2; k <= 2; k++) s += p.grey[y * p.width + x + k]!;
    line.push(s / 5);
  }
  let count = 0;
  let anchor = line[0]!;
  let direction = 0;
  for (const v of line) {
    if (direction >= 0 && v < anchor - swing) {
      count++;
      direction = -1;
      anchor = v;
    } else if (direction <= 0 && v > anchor + swing) {
      count++;
      direction = 1;
      anchor = v;
    } else if ((direction > 0 && v > anchor) || (direction < 0 && v < anchor)) anchor = v;
  }
  return count;
}

const work = mkdtempSync(join(tmpdir(), 'annula-report-files-ref-'));
const keep = process.env.ANNULA_REPORT_PAGES_DIR;
const flat = (s: string): string => s.replace(/\s+/g, ' ');

describe.skipIf(!available)('the report files of a film check, rendered by poppler', () => {
  let pages: Page[] = [];
  let text = '';
  let check: FilmCheck;
  let analysis: AnalysisOutput;

  beforeAll(async () => {
    const { calibration } = calibrateOnGold();
    const film = checkedTinFilm(calibration, 7103, [{ phase: findPhase('Si')!, weight: 0.35 }]);
    check = film.check;
    const { image, ...rest } = film.result;
    analysis = { image: { path: 'films/CV-TIN-0417/pattern.tif', ...image, sha256: film.sha256 }, ...rest };
    const written = await writeReportFiles(
      join(work, 'reports'),
      {
        analysis,
        raster: film.raster,
        mask: film.mask,
        phase: findPhase('TiN')!,
        calibration: calibrationRecordOf(calibration),
        check,
        sampleId: 'CV-TIN-0417',
        operator: 'T. Marlow (fictional)',
        date: new Date('2026-03-14T10:22:00Z'),
      },
      { annulaVersion: '0.1.0' },
    );
    execFileSync('pdftoppm', ['-r', '72', '-gray', written.pdf, join(work, 'page')]);
    pages = readdirSync(work)
      .filter((f) => /^page-\d+\.pgm$/.test(f))
      .sort()
      .map((f) => readPgm(new Uint8Array(readFileSync(join(work, f)))));
    text = flat(execFileSync('pdftotext', ['-layout', written.pdf, '-'], { encoding: 'utf8' }));
    if (keep) {
      mkdirSync(keep, { recursive: true });
      copyFileSync(written.pdf, join(keep, 'report-files-check.pdf'));
      execFileSync('pdftoppm', ['-r', '110', '-png', written.pdf, join(keep, 'report-files-check')]);
    }
  }, 180_000);

  afterAll(() => rmSync(work, { recursive: true, force: true }));

  it('draws every page with ink on it (none blank)', () => {
    expect(pages.length).toBeGreaterThanOrEqual(3);
    for (const p of pages) expect(inkShare(p)).toBeGreaterThan(0.01);
  });

  it('shows the pattern on page 1 with structure: a large picture, varied grey, many rings along its middle', () => {
    const p = pages[0]!;
    const box = pictureBox(p);
    expect(box).not.toBeNull();
    const { x0, x1, y0, y1 } = box!;
    expect(x1 - x0).toBeGreaterThan(p.width * 0.45);
    expect(y1 - y0).toBeGreaterThan(p.height * 0.25);
    let s = 0;
    let s2 = 0;
    let n = 0;
    for (let y = y0; y <= y1; y++) {
      for (let x = x0; x <= x1; x++) {
        const v = p.grey[y * p.width + x]!;
        s += v;
        s2 += v * v;
        n++;
      }
    }
    const sd = Math.sqrt(s2 / n - (s / n) ** 2);
    const swings = swingsAlongMiddle(p, box!, 20);
    console.log(`page 1 picture: ${x1 - x0 + 1} x ${y1 - y0 + 1} px of ${p.width} x ${p.height} at 72 dpi; grey-level standard deviation ${sd.toFixed(1)}; ${swings} swings > 20 levels along its middle row`);
    expect(sd).toBeGreaterThan(15);
    // A TiN pattern with Si rings and overlays: well over a dozen ring crossings along the middle row.
    expect(swings).toBeGreaterThan(12);
  });

  it('(the page checks can fail: a blank page has no picture, a flat grey block has no rings)', () => {
    const width = 200;
    const height = 200;
    expect(pictureBox({ width, height, grey: new Float32Array(width * height).fill(255) })).toBeNull();
    const flatGrey: Page = { width, height, grey: new Float32Array(width * height).fill(255) };
    for (let y = 40; y < 160; y++) for (let x = 20; x < 180; x++) flatGrey.grey[y * width + x] = 128;
    const box = pictureBox(flatGrey);
    expect(box).toEqual({ x0: 20, x1: 179, y0: 40, y1: 159 });
    expect(swingsAlongMiddle(flatGrey, box!, 20)).toBe(0);
  });

  it('holds every section the issue lists, as text', () => {
    expect(text).toContain('Film check report: TiN');
    expect(text).toContain('CV-TIN-0417');
    expect(text).toContain('Radial profile');
    expect(text).toMatch(/Rings # R \(px\) d \(Å\)/);
    expect(text).toContain('Candidates');
    expect(text).toContain('Camera calibration');
    expect(text).toContain('TEM2-200kV-0.8m');
    expect(text).toMatch(/residual \(ppm of d\)/);
    expect(text).toContain(`Verdict: ${check.verdict.toUpperCase()}`);
    expect(check.verdict).toBe('fail');
    for (const reason of check.reasons) expect(text).toContain(flat(reason).slice(0, 40));
    expect(text).toContain('Rings the expected phase does not explain');
    for (const c of REPORT_CAUTIONS) expect(text).toContain(c);
  });

  it('writes the check JSON the README documents', () => {
    const json = JSON.parse(readFileSync(join(work, 'reports', 'CV-TIN-0417.check.json'), 'utf8'));
    expect(json).toEqual(JSON.parse(JSON.stringify(checkJson(check, 'TEM2-200kV-0.8m', analysis))));
  });
});
