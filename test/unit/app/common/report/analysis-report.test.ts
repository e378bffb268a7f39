/**
 * buildAnalysisReport on real analyses of simulated films (simulated-films.ts):
 * the PDF opens again in pdf-lib with A4 pages and its metadata; the page images
 * and the text are checked with poppler in
 * test/reference/report-pdf.reference.test.ts.
 */
import { PDFDocument } from 'pdf-lib';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAnalysisReport, type AnalysisReportInput } from '../../../../../app/common/report';
import { NOMINAL_LP, calibrateOnGold, checkedTinFilm, measureFilm, type MeasuredFilm } from './simulated-films';
import { findPhase } from '../../../../../core/crystal';
import type { FilmCheck } from '../../../../../core/qa';

const A4 = { width: 595.28, height: 841.89 };

let film: MeasuredFilm & { check: FilmCheck };
let input: AnalysisReportInput;

beforeAll(() => {
  const { calibration, summary } = calibrateOnGold();
  film = checkedTinFilm(calibration, 7102);
  input = {
    result: film.result,
    raster: film.raster,
    mask: film.mask,
    check: film.check,
    calibration: summary,
    sampleId: 'CV-TIN-0412',
    operator: 'T. Marlow (fictional)',
    image: { path: 'films/CV-TIN-0412/pattern.tif', sha256: film.sha256 },
    annulaVersion: '0.1.0',
    date: new Date('2026-03-14T10:22:00Z'),
  };
}, 120_000);

describe('buildAnalysisReport', () => {
  it('writes a PDF that pdf-lib reads back: A4 pages, title, author, creator and dates', async () => {
    const bytes = await buildAnalysisReport(input);
    expect(new TextDecoder().decode(bytes.slice(0, 5))).toBe('%PDF-');
    const doc = await PDFDocument.load(bytes);
    expect(doc.getPageCount()).toBeGreaterThanOrEqual(3);
    for (const page of doc.getPages()) {
      expect(page.getWidth()).toBeCloseTo(A4.width, 2);
      expect(page.getHeight()).toBeCloseTo(A4.height, 2);
    }
    expect(doc.getTitle()).toBe('Film check: CV-TIN-0412');
    expect(doc.getAuthor()).toBe('T. Marlow (fictional)');
    expect(doc.getCreator()).toBe('Annula 0.1.0');
    expect(doc.getCreationDate()?.toISOString()).toBe('2026-03-14T10:22:00.000Z');
    expect(doc.getKeywords()).toContain(film.check.verdict);
  });

  it('gives the same bytes for the same input', async () => {
    const a = await buildAnalysisReport(input);
    const b = await buildAnalysisReport(input);
    expect(a.length).toBe(b.length);
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
  });

  it('reports an image without rings, with its profile and no candidates', async () => {
    // A gold film with no scattering at all: noise and background only.
    const blank = measureFilm([{ phase: findPhase('Au')!, weight: 1e-9 }], 7190, { lp: NOMINAL_LP, sigmaPx: 0, calibrated: false, source: 'nominal' }, 256);
    expect(blank.result.rings).toHaveLength(0);
    const bytes = await buildAnalysisReport({ ...input, result: blank.result, raster: blank.raster, mask: blank.mask, check: null, calibration: null });
    const doc = await PDFDocument.load(bytes);
    expect(doc.getPageCount()).toBeGreaterThanOrEqual(3);
    expect(doc.getTitle()).toBe('Ring pattern analysis: CV-TIN-0412');
  });

  it('refuses a missing sample id, a fingerprint that is not SHA-256 and a raster of another size', async () => {
    await expect(buildAnalysisReport({ ...input, sampleId: ' ' })).rejects.toThrow(/sampleId/);
    await expect(buildAnalysisReport({ ...input, image: { path: 'x.tif', sha256: 'abc' } })).rejects.toThrow(/sha256/);
    await expect(buildAnalysisReport({ ...input, raster: { width: 8, height: 8, data: new Float32Array(64) } })).rejects.toThrow(/raster is 8 x 8/);
  });
});
