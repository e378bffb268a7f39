/**
 * Pure helpers of the calibration, check and export flows: file names, the CSV ring
 * table, the check JSON (as `annula check --json` writes it), the control chart's points.
 */
import type { AnalysisResult } from '../../../core/pipeline';
import type { FilmCheck } from '../../../core/qa';
import { ringTableRows, RING_TABLE_COLUMNS, type ControlChartPoint } from '../../common/report';
import type { AnalysisSummaryData } from '../../handlers/contract';

/** A file-name stem from a sample id or an image name: letters, digits, dots, dashes. */
export function fileStem(name: string): string {
  const base = name.replace(/\.(tiff?|png|jpe?g)$/i, '');
  return base.replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80) || 'pattern';
}

let lastStamp = '';
let repeat = 0;

/** A fresh export name: `<stem>.<what>-<yyyymmdd-hhmmss-mmm>[-n].<ext>` (downloads never reuse a name). */
export function exportName(stem: string, what: string, extension: string, now: Date = new Date()): string {
  const iso = now.toISOString().replace(/[-:]/g, '').replace('T', '-');
  let t = `${iso.slice(0, 15)}-${iso.slice(16, 19)}`;
  repeat = t === lastStamp ? repeat + 1 : 0;
  lastStamp = t;
  if (repeat) t += `-${repeat}`;
  return `${stem}.${what}-${t}.${extension}`;
}

function csvField(v: string | number | null): string {
  if (v === null) return '';
  const s = typeof v === 'number' ? String(v) : v;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The ring table as CSV (RFC 4180): a header row, then one row per measured ring. */
export function ringTableCsv(result: AnalysisResult): string {
  const rows = ringTableRows(result);
  const lines = [RING_TABLE_COLUMNS.join(','), ...rows.map((r) => RING_TABLE_COLUMNS.map((c) => csvField(r[c])).join(','))];
  return lines.join('\r\n') + '\r\n';
}

/** The check's JSON in `annula check --json`'s stable keys. */
export function checkJson(check: FilmCheck, calibration: string | null, analysis: AnalysisResult): Record<string, unknown> {
  return {
    verdict: check.verdict,
    reasons: check.reasons,
    expected: check.expected,
    measured: check.measured ? { aA: check.measured.aA, aSigmaA: check.measured.aSigmaA } : null,
    unexplainedRings: check.unexplainedRings.map((u) => ({ dA: u.dA, candidates: u.candidates })),
    calibration,
    analysis,
  };
}

/** The control chart's points: every recorded analysis with a lattice constant. */
export function chartPoints(analyses: readonly AnalysisSummaryData[]): ControlChartPoint[] {
  return analyses.filter((a) => a.aA !== null && a.aA > 0).map((a) => ({ date: a.created, aA: a.aA!, aSigmaA: a.aSigmaA ?? 0, verdict: a.verdict, ...(a.sampleId ? { sampleId: a.sampleId } : {}) }));
}
