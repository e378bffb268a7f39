/**
 * The QA batch (samples/qa-batch, fictional lab) through the command line, as
 * the lab would run it: `annula calibrate` on samples/gold-standard into a fresh
 * store, `annula check samples/qa-batch --report ...` against TiN at the
 * batch's tolerance, then `annula history --phase TiN`. Every verdict must be
 * the one batch.json and samples/README.md promise (the same verdicts
 * qa-samples.test.ts gets through core), the exit code the worst of them, and
 * every film's report files written.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { EXIT } from '../../../app/cli/exit-codes';
import { runCli } from '../app/cli/run-cli';

interface BatchFilm {
  image: string;
  sampleId: string;
  expected: { verdict: 'pass' | 'fail' | 'inconclusive' };
}
const batch = JSON.parse(readFileSync('samples/qa-batch/batch.json', 'utf8')) as { expect: { phase: string; tolerance: string }; films: BatchFilm[] };
const work = mkdtempSync(join(tmpdir(), 'annula-qa-batch-cli-'));
const store = join(work, 'lab.sqlite');
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('the QA batch through annula calibrate, check and history', () => {
  it('gives every film its expected verdict, exits with the worst (fail), and writes each report', async () => {
    const cal = await runCli('calibrate', 'samples/gold-standard', '--standard', 'Au', '--instrument', 'TEM-2 north bay', '--save', 'TEM-2 gold', '--store', store, '--json');
    expect(cal.code, cal.stderr).toBe(EXIT.ok);

    const reports = join(work, 'reports');
    const r = await runCli('check', 'samples/qa-batch', '--calibration', 'TEM-2 gold', '--expect', batch.expect.phase, '--tolerance', batch.expect.tolerance, '--report', reports, '--store', store, '--json', '--quiet');
    expect(r.code, r.stderr).toBe(EXIT.checkFail);
    const docs = JSON.parse(r.stdout) as Array<{ verdict: string; calibration: string; analysis: { image: { path: string } } }>;
    const byImage = new Map(docs.map((d) => [basename(d.analysis.image.path), d]));
    expect(byImage.size).toBe(batch.films.length);
    for (const film of batch.films) {
      const doc = byImage.get(film.image);
      expect(doc?.verdict, film.sampleId).toBe(film.expected.verdict);
      expect(doc?.calibration).toBe('TEM-2 gold');
      for (const suffix of ['report.pdf', 'rings.csv', 'check.json']) expect(existsSync(join(reports, `${film.sampleId}.${suffix}`)), `${film.sampleId}.${suffix}`).toBe(true);
    }

    const h = await runCli('history', '--phase', 'TiN', '--json', '--store', store);
    expect(h.code).toBe(EXIT.ok);
    const rows = JSON.parse(h.stdout) as Array<{ imagePath: string; verdict: string; insideBand: boolean }>;
    expect(rows.map((x) => [basename(x.imagePath), x.verdict]).sort()).toEqual(batch.films.map((f) => [f.image, f.expected.verdict]).sort());
    // Only the carbonitride film (a +1.5 %) lies outside the band; the second-phase film fails inside it.
    expect(rows.filter((x) => !x.insideBand).map((x) => basename(x.imagePath))).toEqual(['CV-TIN-0414.tif']);
  }, 180_000);
});
