/**
 * The PDF report rendered by an outside reader: Debian's poppler-utils
 * (pdftoppm draws every page, pdftotext extracts the text). Each page must show
 * something (its share of non-white pixels above a floor), the overlays must be
 * there in their colours, and the text must hold the sample id, the verdict,
 * the best phase and the caution sentence.
 *
 * Needs `apt-get install -y poppler-utils`. Without it the test is skipped,
 * unless ANNULA_REQUIRE_REFERENCE=1. Set ANNULA_REPORT_PAGES_DIR to keep the
 * rendered pages as PNG files for a person to look at.
 */
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildAnalysisReport, PALETTE, REPORT_CAUTIONS, type AnalysisReportInput, type Rgb } from '../../app/common/report';
import { findPhase } from '../../core/crystal';
import { calibrateOnGold, checkedTinFilm } from '../unit/app/common/report/simulated-films';
import { hasReferenceTool, readNetpbm } from './report-pages';

const hasCommand = (name: string): boolean => hasReferenceTool(name);

const available = hasCommand('pdftoppm') && hasCommand('pdftotext');

interface Page {
  width: number;
  height: number;
  rgb: Uint8Array;
}

/** A binary PPM (P6), as pdftoppm writes it. */
function readPpm(bytes: Uint8Array): Page {
  const image = readNetpbm(bytes);
  if (image.channels !== 3) throw new Error('expected a colour PPM (P6)');
  return { width: image.width, height: image.height, rgb: image.data };
}

const nonWhiteShare = (p: Page): number => {
  let n = 0;
  for (let k = 0; k < p.rgb.length; k += 3) if (p.rgb[k]! < 235 || p.rgb[k + 1]! < 235 || p.rgb[k + 2]! < 235) n++;
  return n / (p.width * p.height);
};
const countNear = (p: Page, c: Rgb, tolerance = 45): number => {
  let n = 0;
  for (let k = 0; k < p.rgb.length; k += 3) if (Math.hypot(p.rgb[k]! - c[0], p.rgb[k + 1]! - c[1], p.rgb[k + 2]! - c[2]) < tolerance) n++;
  return n;
};

interface Rendered {
  pages: Page[];
  /** Pages 1 and 2 again at 150 dpi, where thin lines keep their colours. */
  hi: Page[];
  text: string;
}

const work = mkdtempSync(join(tmpdir(), 'annula-report-'));
const keep = process.env.ANNULA_REPORT_PAGES_DIR;

function render(name: string, pdf: Uint8Array): Rendered {
  const file = join(work, `${name}.pdf`);
  writeFileSync(file, pdf);
  execFileSync('pdftoppm', ['-r', '60', file, join(work, name)]);
  const files = readdirSync(work).filter((f) => new RegExp(`^${name}-\\d+\\.ppm$`).test(f)).sort();
  const pages = files.map((f) => readPpm(new Uint8Array(readFileSync(join(work, f)))));
  const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  const hi = [1, 2].map((n) => {
    execFileSync('pdftoppm', ['-r', '150', '-f', String(n), '-l', String(n), '-singlefile', file, join(work, `${name}-hi${n}`)]);
    return readPpm(new Uint8Array(readFileSync(join(work, `${name}-hi${n}.ppm`))));
  });
  if (keep) {
    mkdirSync(keep, { recursive: true });
    copyFileSync(file, join(keep, `${name}.pdf`));
    execFileSync('pdftoppm', ['-r', '100', '-png', file, join(keep, name)]);
  }
  return { pages, hi, text };
}

const flat = (s: string): string => s.replace(/\s+/g, ' ');

describe.skipIf(!available)('the PDF report, rendered by poppler', () => {
  let passing: Rendered;
  let failing: Rendered;
  let passInput: AnalysisReportInput;
  let failInput: AnalysisReportInput;

  beforeAll(async () => {
    const { calibration, summary } = calibrateOnGold();
    const base = { calibration: summary, operator: 'T. Marlow (fictional)', annulaVersion: '0.1.0', date: new Date('2026-03-14T10:22:00Z') };
    const a = checkedTinFilm(calibration, 7102);
    passInput = { ...base, result: a.result, raster: a.raster, mask: a.mask, check: a.check, sampleId: 'CV-TIN-0412', image: { path: 'films/CV-TIN-0412/pattern.tif', sha256: a.sha256 } };
    const b = checkedTinFilm(calibration, 7103, [{ phase: findPhase('Si')!, weight: 0.35 }]);
    failInput = { ...base, result: b.result, raster: b.raster, mask: b.mask, check: b.check, sampleId: 'CV-TIN-0417', image: { path: 'films/CV-TIN-0417/pattern.tif', sha256: b.sha256 } };
    passing = render('report-pass', await buildAnalysisReport(passInput));
    failing = render('report-second-phase', await buildAnalysisReport(failInput));
  }, 180_000);

  afterAll(() => rmSync(work, { recursive: true, force: true }));

  it('renders every page, none blank: the image page mostly ink, the others with plots or tables', () => {
    for (const r of [passing, failing]) {
      expect(r.pages.length).toBeGreaterThanOrEqual(3);
      for (const p of r.pages) {
        expect(Math.abs(p.width - (595.28 / 72) * 60)).toBeLessThan(1.5); // A4 at 60 dpi
        expect(nonWhiteShare(p)).toBeGreaterThan(0.01);
      }
      expect(nonWhiteShare(r.pages[0]!)).toBeGreaterThan(0.2); // the pattern image
      expect(nonWhiteShare(r.pages[1]!)).toBeGreaterThan(0.02); // the profile plots
    }
  });

  it('shows the overlays in their colours: fitted rings on the image, peaks in the profile, a second phase in raspberry', () => {
    expect(countNear(passing.hi[0]!, PALETTE.fittedRing.onImage)).toBeGreaterThan(1000);
    expect(countNear(passing.hi[0]!, PALETTE.predictedRing.onImage)).toBeGreaterThan(200);
    expect(countNear(passing.hi[1]!, PALETTE.fittedRing.onPaper, 60)).toBeGreaterThan(300);
    expect(countNear(passing.hi[0]!, PALETTE.unexplainedRing.onImage)).toBeLessThan(50);
    expect(countNear(failing.hi[0]!, PALETTE.unexplainedRing.onImage)).toBeGreaterThan(1000);
  });

  it('holds the sample id, the verdict, the best phase, the fingerprint and the caution sentence as text', () => {
    const t = flat(passing.text);
    expect(t).toContain('CV-TIN-0412');
    expect(t).toContain('Verdict: PASS');
    expect(t).toMatch(/Best candidate TiN \(titanium nitride\)/);
    expect(t).toContain(passInput.image.sha256);
    expect(t).toContain('TEM2-200kV-0.8m');
    expect(t).toContain(REPORT_CAUTIONS[0]);
    expect(t).toMatch(new RegExp(`page 1 of ${passing.pages.length}`));
    expect(t).not.toContain('NOMINAL CAMERA');
    const f = flat(failing.text);
    expect(f).toContain('CV-TIN-0417');
    expect(f).toContain('Verdict: FAIL');
    expect(f).toContain('Rings the expected phase does not explain');
    expect(f).toMatch(/\bSi\b/);
    expect(f).toContain(REPORT_CAUTIONS[0]);
  });

  it('says prominently when the camera is nominal, not calibrated', async () => {
    const nominal = render(
      'report-nominal',
      await buildAnalysisReport({ ...passInput, calibration: null, check: null, result: { ...passInput.result, camera: { ...passInput.result.camera, calibrated: false, source: 'nominal: camera length 0.8 m, pixel 28 µm' } } }),
    );
    const t = flat(nominal.text);
    expect(t).toContain('NOMINAL CAMERA, NOT CALIBRATED');
    expect(t).toContain('nominal: camera length 0.8 m, pixel 28 µm');
    expect(t).toContain('Ring pattern analysis report');
  });
});
