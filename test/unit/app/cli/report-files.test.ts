/**
 * writeReportFiles on a real film check of a simulated TiN film (Corrie Vale
 * Coatings Laboratory, fictional; test/unit/app/common/report/simulated-films.ts):
 * the three files appear, nothing existing is replaced without `force`, the CSV
 * has a row per ring with the ring table's columns, the JSON is the check's
 * stable JSON. The pages themselves are rendered and looked at in
 * test/reference/report-files.reference.test.ts.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PDFDocument } from 'pdf-lib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UsageError } from '../../../../app/cli/exit-codes';
import { reportCalibration, reportFilePaths, reportStem, writeReportFiles, type AnalysisOutput, type ReportFilesInput } from '../../../../app/cli/report-files';
import { RING_TABLE_COLUMNS } from '../../../../app/common/report';
import type { CalibrationRecord } from '../../../../app/node/store';
import { cameraUncertaintyBudget, standardReferenceUncertainty } from '../../../../core/calibration';
import { findPhase } from '../../../../core/crystal';
import { calibrateOnGold, calibrationRecordOf, checkedTinFilm } from '../common/report/simulated-films';

const work = mkdtempSync(join(tmpdir(), 'annula-report-files-'));
let input: ReportFilesInput;
let record: CalibrationRecord;

beforeAll(() => {
  const { calibration } = calibrateOnGold();
  const film = checkedTinFilm(calibration, 7102);
  const { image, ...rest } = film.result;
  const analysis: AnalysisOutput = { image: { path: 'films/CV-TIN-0412/pattern.tif', ...image, sha256: film.sha256 }, ...rest };
  record = calibrationRecordOf(calibration);
  input = {
    analysis,
    raster: film.raster,
    mask: film.mask,
    phase: findPhase('TiN')!,
    calibration: record,
    check: film.check,
    sampleId: 'CV-TIN-0412',
    operator: 'T. Marlow (fictional)',
    date: new Date('2026-03-14T10:22:00Z'),
  };
}, 120_000);

afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('reportFilePaths, reportStem', () => {
  it('names the PDF, the ring CSV and the JSON after the stem, a check JSON as .check.json', () => {
    expect(reportFilePaths('out', 'CV-TIN-0412', true)).toEqual({ pdf: join('out', 'CV-TIN-0412.report.pdf'), csv: join('out', 'CV-TIN-0412.rings.csv'), json: join('out', 'CV-TIN-0412.check.json') });
    expect(reportFilePaths('out', 'a b/../c', false).json).toBe(join('out', 'a_b_.._c.analysis.json'));
    expect(reportStem('films/x/pattern.tif')).toBe('pattern');
    expect(reportStem('films/x/pattern.tif', 'S-104')).toBe('S-104');
  });
});

describe('reportCalibration', () => {
  it('turns a store record into the report summary with its fit details', () => {
    const r = reportCalibration(record);
    expect(r.name).toBe('TEM2-200kV-0.8m');
    expect(r.date).toBe('2026-03-02');
    expect(r.standard).toBe('Au (gold)');
    expect(r.details?.ringsUsed).toBe(record.residuals.length);
    const rms = Math.sqrt(record.residuals.reduce((s, x) => s + x.residualPpm ** 2, 0) / record.residuals.length);
    expect(r.details?.rmsResidualPpm).toBeCloseTo(rms, 9);
  });
});

describe('writeReportFiles', () => {
  it('writes the PDF, the CSV ring table and the check JSON into a new folder', async () => {
    const dir = join(work, 'new', 'reports');
    const paths = await writeReportFiles(dir, input, { annulaVersion: '0.1.0' });
    expect(readdirSync(dir).sort()).toEqual(['CV-TIN-0412.check.json', 'CV-TIN-0412.report.pdf', 'CV-TIN-0412.rings.csv']);

    const doc = await PDFDocument.load(readFileSync(paths.pdf));
    expect(doc.getPageCount()).toBeGreaterThanOrEqual(3);
    expect(doc.getTitle()).toBe('Film check: CV-TIN-0412');

    // No field needs quoting (numbers, '1 1 1', phase ids), so a plain split reads the file (RFC 4180).
    const [header, ...lines] = readFileSync(paths.csv, 'utf8').trimEnd().split('\n').map((l) => l.split(','));
    const rows = lines.map((cells) => Object.fromEntries(header!.map((h, k) => [h, cells[k]!])));
    lines.forEach((cells) => expect(cells).toHaveLength(header!.length));
    expect(rows).toHaveLength(input.analysis.rings.length);
    expect(Object.keys(rows[0]!)).toEqual([...RING_TABLE_COLUMNS]);
    rows.forEach((row, i) => {
      const ring = input.analysis.rings[i]!;
      expect(Number(row.dA)).toBe(ring.dA); // full precision, no rounding
      expect(row.hkl).toBe(ring.hkl ? ring.hkl.join(' ') : '');
    });

    const json = JSON.parse(readFileSync(paths.json, 'utf8'));
    expect(Object.keys(json)).toEqual(['verdict', 'reasons', 'expected', 'measured', 'unexplainedRings', 'missingRings', 'calibration', 'analysis']);
    expect(json.verdict).toBe(input.check!.verdict);
    expect(json.calibration).toBe('TEM2-200kV-0.8m');
    expect(json.expected.phase).toBe('TiN');
    expect(json.analysis.image.sha256).toBe(input.analysis.image.sha256);
    expect(json.analysis.rings).toHaveLength(input.analysis.rings.length);
  });

  it('refuses to replace any existing file, writing none of the three, unless forced', async () => {
    const dir = join(work, 'existing');
    const first = await writeReportFiles(dir, input, { annulaVersion: '0.1.0' });
    writeFileSync(first.csv, 'my own notes\n');
    const before = { pdf: statSync(first.pdf).mtimeMs, json: readFileSync(first.json, 'utf8') };
    await expect(writeReportFiles(dir, input, { annulaVersion: '0.1.0' })).rejects.toThrow(UsageError);
    await expect(writeReportFiles(dir, input, { annulaVersion: '0.1.0' })).rejects.toThrow(/already exists and was left unchanged; .*--force/);
    expect(readFileSync(first.csv, 'utf8')).toBe('my own notes\n');
    expect(statSync(first.pdf).mtimeMs).toBe(before.pdf);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
    // Only the CSV left: the refusal comes before the PDF and the JSON are written.
    rmSync(first.pdf);
    rmSync(first.json);
    await expect(writeReportFiles(dir, input, { annulaVersion: '0.1.0' })).rejects.toThrow(/CV-TIN-0412\.rings\.csv already exists/);
    expect(readdirSync(dir)).toEqual(['CV-TIN-0412.rings.csv']);

    await writeReportFiles(dir, input, { annulaVersion: '0.1.0', force: true });
    expect(readFileSync(first.csv, 'utf8')).not.toBe('my own notes\n');
    expect(readFileSync(first.json, 'utf8')).toBe(before.json);
    expect(readdirSync(dir).sort()).toEqual(['CV-TIN-0412.check.json', 'CV-TIN-0412.report.pdf', 'CV-TIN-0412.rings.csv']);
  });

  it('writes an analysis without a check as <stem>.analysis.json holding the analysis, named after the image', async () => {
    const dir = join(work, 'plain');
    const paths = await writeReportFiles(dir, { ...input, check: null, sampleId: null, calibration: null }, { annulaVersion: '0.1.0' });
    expect(paths.json).toBe(join(dir, 'pattern.analysis.json'));
    const json = JSON.parse(readFileSync(paths.json, 'utf8'));
    expect(json.image.path).toBe('films/CV-TIN-0412/pattern.tif');
    expect(json.candidates[0].phase).toBe('TiN');
  });

  it("prints the camera's uncertainty budget in the calibration section (text read back with poppler's pdftotext)", async (ctx) => {
    if (!existsSync('/usr/bin/pdftotext')) return ctx.skip();
    const gold = standardReferenceUncertainty({ id: 'Au', aA: 4.0786 });
    const budget = cameraUncertaintyBudget(record.cameraLengthSigmaPx / record.cameraLengthPx, gold, { relative: 0.001, source: 'default' });
    const dir = join(work, 'budget');
    const paths = await writeReportFiles(dir, { ...input, analysis: { ...input.analysis, cameraUncertainty: budget } }, { annulaVersion: '0.1.0' });
    const text = execFileSync('/usr/bin/pdftotext', ['-layout', paths.pdf, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
    expect(text).toMatch(/Budget: reference 0\.0387 %: a of Au/);
    expect(text).toMatch(/Budget: transfer 0\.1000 %, default/);
    expect(text).toMatch(new RegExp(`Budget: total ${(budget.totalRelative * 100).toFixed(4).replace('.', '\\.')} % \\(root sum of squares`));
  });

  it('says so when the report folder is a file', async () => {
    const file = join(work, 'not-a-folder');
    writeFileSync(file, 'x');
    await expect(writeReportFiles(file, input, { annulaVersion: '0.1.0' })).rejects.toThrow(/is a file, not a folder/);
  });
});
