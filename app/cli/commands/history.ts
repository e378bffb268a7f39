/**
 * `annula history --phase TiN`: a phase's lattice constant over time from the lab
 * store's analyses (a control chart), with its tolerance band and the verdicts.
 *
 * The band is the tolerance around the phase's reference lattice constant: the
 * reference a is the library's (or --reference), the tolerance the one the checks
 * recorded (or --tolerance). Deviation = a / a_ref - 1; the expanded uncertainty
 * U = k u with k = 2 (as the film check's decision rule, JCGM 106:2012).
 */
import { basename } from 'node:path';
import type { Command } from 'commander';
import { findPhase } from '../../../core/crystal';
import { parseQuantity, parseRelative } from '../../common/quantity';
import { buildControlChartSvg } from '../../common/report';
import { LabStoreError, type AnalysisSummary } from '../../node/store';
import { printJson, type CliIo } from '../cli-io';
import { InputError, UsageError } from '../exit-codes';
import { fixed, withUncertainty } from '../number-format';
import { refuseExisting, writeOutput } from '../output-files';
import { openStoreForCommand, STORE_OPTION_HELP } from '../store-access';
import { formatTable } from '../terminal-table';

interface HistoryOptions {
  phase: string;
  since?: string;
  until?: string;
  sampleId?: string;
  tolerance?: string;
  reference?: string;
  plot?: string;
  force?: boolean;
  json?: boolean;
  store?: string;
}

/** The default tolerance when no analysis recorded one and --tolerance is not given (the `check` default). */
export const DEFAULT_HISTORY_TOLERANCE = 0.005;
const COVERAGE_FACTOR = 2;

/** What the table ends with: the chart is a record of checks, not a release decision. */
export const HISTORY_CAUTION =
  "A point inside the band is not a release: each verdict, its reasons and the calibration behind it are what the lab's qualified review and quality procedures decide on.";

/** One analysis as history lists it. */
export interface HistoryRow {
  id: number;
  created: string;
  sampleId: string | null;
  operator: string | null;
  calibration: string | null;
  aA: number | null;
  aSigmaA: number | null;
  /** a / referenceAA - 1; null without a. */
  deviation: number | null;
  /** U = 2 u(a) / a; null without a or u. */
  expandedUncertainty: number | null;
  /** The tolerance the analysis recorded (relative), null when none. */
  tolerance: number | null;
  /** Whether a lies inside the band drawn (reference ± band tolerance); null without a. */
  insideBand: boolean | null;
  verdict: AnalysisSummary['verdict'];
  imagePath: string | null;
  imageSha256: string;
}

const DATE = /^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/;

/**
 * A --since / --until date as an instant (ms). A date alone is its midnight UTC for
 * --since and the end of that day for --until (so --until 2026-03-31 includes the 31st);
 * a date-time without a zone is UTC.
 */
export function parseHistoryDate(text: string, flag: '--since' | '--until'): number {
  const t = text.trim();
  if (!DATE.test(t)) throw new UsageError(`${flag}: "${text}" is not a date; write it as 2026-01-31 or 2026-01-31T14:00Z`);
  const dateOnly = t.length === 10;
  const zoned = !dateOnly && !/(Z|[+-]\d{2}:?\d{2})$/.test(t) ? `${t}Z` : t;
  const ms = Date.parse(dateOnly ? `${t}T00:00:00Z` : zoned);
  const calendarDay = Date.parse(`${t.slice(0, 10)}T00:00:00Z`);
  // Date.parse rolls 2026-02-30 over to March 2: compare the day back.
  if (!Number.isFinite(ms) || !Number.isFinite(calendarDay) || new Date(calendarDay).toISOString().slice(0, 10) !== t.slice(0, 10)) {
    throw new UsageError(`${flag}: "${text}" is not a calendar date; check the month and day`);
  }
  return dateOnly && flag === '--until' ? ms + 86_400_000 - 1 : ms;
}

/** The tolerance of the band: --tolerance, else the one recorded by the analyses (the latest when they differ), else the default. */
function chooseTolerance(rows: readonly AnalysisSummary[], option: number | undefined): { tolerance: number; origin: string } {
  if (option !== undefined) return { tolerance: option, origin: 'given with --tolerance' };
  const recorded = rows.map((r) => r.tolerance).filter((t): t is number => t !== null);
  if (recorded.length === 0) return { tolerance: DEFAULT_HISTORY_TOLERANCE, origin: 'no tolerance recorded: the check default' };
  const distinct = [...new Set(recorded)];
  const latest = recorded[recorded.length - 1]!;
  if (distinct.length === 1) return { tolerance: latest, origin: 'as recorded by the checks' };
  return { tolerance: latest, origin: `the latest recorded; the checks used ${distinct.map((t) => `${(t * 100).toFixed(3)}%`).join(', ')}: choose one with --tolerance` };
}

/** `annula history`: one phase's lattice constant over time, with its tolerance band and the verdicts. */
export function registerHistory(program: Command, io: CliIo): void {
  program
    .command('history')
    .description("a phase's lattice constant over time from the lab store's analyses, with its tolerance band and the verdicts (a control chart)")
    .requiredOption('--phase <id>', 'the phase, e.g. TiN (library id; case ignored)')
    .option('--since <date>', 'only analyses made on or after this date, e.g. 2026-01-01 (UTC)')
    .option('--until <date>', 'only analyses made on or before this date (a date alone includes that whole day, UTC)')
    .option('--sample-id <id>', 'only analyses of this sample')
    .option('--tolerance <value>', 'the tolerance band around the reference a, e.g. 0.5% (default: the one the checks recorded)')
    .option('--reference <a>', "the reference lattice constant, e.g. 4.2417Å (default: the library's value for the phase)")
    .option('--plot <file.svg>', 'also write the control chart as an SVG file (never over an existing file unless --force)')
    .option('--force', 'with --plot, replace a file of the same name')
    .option('--json', 'print JSON: an array of rows, oldest first: { id, created, sampleId, operator, calibration, aA, aSigmaA, deviation, expandedUncertainty, tolerance, insideBand, verdict, imagePath, imageSha256 }')
    .option('--store <file>', STORE_OPTION_HELP)
    .addHelpText(
      'after',
      '\nThe band is the tolerance around the reference lattice constant; error bars and U are expanded\n' +
        'uncertainties (k = 2). Analyses without a lattice constant are listed but not plotted.\n\n' +
        'Example:\n  annula history --phase TiN --since 2026-01-01 --plot tin-2026.svg',
    )
    .action(async (opts: HistoryOptions) => {
      if (opts.phase.trim() === '') throw new UsageError('--phase needs a phase id, e.g. --phase TiN');
      const since = opts.since === undefined ? undefined : parseHistoryDate(opts.since, '--since');
      const until = opts.until === undefined ? undefined : parseHistoryDate(opts.until, '--until');
      if (since !== undefined && until !== undefined && until < since) throw new UsageError(`--until (${opts.until}) is before --since (${opts.since}); swap them`);
      if (opts.sampleId !== undefined && opts.sampleId.trim() === '') throw new UsageError('--sample-id needs an id, e.g. --sample-id S-104');
      const toleranceOption = opts.tolerance === undefined ? undefined : parseRelative(opts.tolerance, '--tolerance');
      if (toleranceOption !== undefined && !(toleranceOption > 0 && toleranceOption < 0.5)) throw new UsageError(`--tolerance: "${opts.tolerance}" must be between 0 and 50%, e.g. 0.5%`);
      const phase = findPhase(opts.phase.trim());
      let referenceAA: number;
      let referenceOrigin: string;
      if (opts.reference !== undefined) {
        referenceAA = parseQuantity(opts.reference, 'length', '--reference') * 1e10;
        referenceOrigin = 'given with --reference';
      } else if (phase) {
        referenceAA = phase.cell.aA;
        referenceOrigin = `library: ${phase.source}`;
      } else {
        throw new UsageError(`--phase: "${opts.phase}" is not in the phase library, so its reference lattice constant is unknown; give it with --reference, e.g. --reference 4.2417Å`);
      }
      const phaseId = phase?.id ?? opts.phase.trim();
      if (opts.plot && !opts.force) await refuseExisting([opts.plot], '--plot');

      const { store, location } = await openStoreForCommand(opts.store, { create: false, io });
      let summaries: AnalysisSummary[] = [];
      if (store !== null) {
        try {
          summaries = await store.listAnalyses({
            phase: phaseId,
            ...(since !== undefined ? { since: new Date(since).toISOString() } : {}),
            ...(opts.sampleId !== undefined ? { sampleId: opts.sampleId } : {}),
          });
        } catch (error) {
          if (error instanceof LabStoreError) throw new InputError(error.message);
          throw error;
        } finally {
          await store.close();
        }
      }
      if (until !== undefined) summaries = summaries.filter((s) => Date.parse(s.created) <= until);

      const band = chooseTolerance(summaries, toleranceOption);
      const rows: HistoryRow[] = summaries.map((s) => {
        const deviation = s.aA === null ? null : s.aA / referenceAA - 1;
        return {
          id: s.id,
          created: s.created,
          sampleId: s.sampleId,
          operator: s.operator,
          calibration: s.calibration,
          aA: s.aA,
          aSigmaA: s.aSigmaA,
          deviation,
          expandedUncertainty: s.aA !== null && s.aSigmaA !== null ? (COVERAGE_FACTOR * s.aSigmaA) / s.aA : null,
          tolerance: s.tolerance,
          insideBand: deviation === null ? null : Math.abs(deviation) <= band.tolerance,
          verdict: s.verdict,
          imagePath: s.imagePath,
          imageSha256: s.imageSha256,
        };
      });

      if (opts.plot) {
        const svg = buildControlChartSvg(
          rows.filter((r) => r.aA !== null).map((r) => ({ date: r.created, aA: r.aA!, aSigmaA: r.aSigmaA ?? 0, verdict: r.verdict, ...(r.sampleId ? { sampleId: r.sampleId } : {}) })),
          { phase: phaseId, referenceAA, tolerance: band.tolerance, coverageFactor: COVERAGE_FACTOR },
        );
        await writeOutput(opts.plot, svg, opts.force ?? false);
      }
      if (opts.json) {
        printJson(io, rows);
        return;
      }
      if (store === null) io.out(`No analyses yet: there is no lab store at ${location.path}. Analyses are recorded there by annula check.`);
      else if (rows.length === 0) io.out(`No analyses of ${phaseId}${describeFilters(opts)} in ${location.path}.`);
      else printHistory(io, rows, { phaseId, referenceAA, referenceOrigin, band, storePath: location.path });
      if (opts.plot) io.out(`wrote ${opts.plot}`);
    });
}

function describeFilters(opts: HistoryOptions): string {
  return [opts.sampleId !== undefined ? ` of sample ${opts.sampleId}` : '', opts.since !== undefined ? ` since ${opts.since}` : '', opts.until !== undefined ? ` until ${opts.until}` : ''].join('');
}

function percent(fraction: number | null, decimals = 3): string {
  if (fraction === null || !Number.isFinite(fraction)) return '-';
  return `${fraction >= 0 ? '+' : ''}${(fraction * 100).toFixed(decimals)}%`;
}

function printHistory(
  io: CliIo,
  rows: readonly HistoryRow[],
  c: { phaseId: string; referenceAA: number; referenceOrigin: string; band: { tolerance: number; origin: string }; storePath: string },
): void {
  io.out(
    formatTable(
      ['date', 'sample', 'image', 'a (Å)', 'deviation', 'U (k=2)', 'band', 'verdict', 'calibration', 'operator'],
      rows.map((r) => [
        r.created.slice(0, 16).replace('T', ' '),
        r.sampleId ?? '-',
        r.imagePath ? basename(r.imagePath) : '-',
        r.aA === null ? '-' : r.aSigmaA === null ? fixed(r.aA, 5) : withUncertainty(r.aA, r.aSigmaA),
        percent(r.deviation),
        r.expandedUncertainty === null ? '-' : `${(r.expandedUncertainty * 100).toFixed(3)}%`,
        r.insideBand === null ? '-' : r.insideBand ? 'inside' : 'OUTSIDE',
        r.verdict ?? '-',
        r.calibration ?? '-',
        r.operator ?? '-',
      ]),
      ['left', 'left', 'left', 'right', 'right', 'right', 'left', 'left', 'left', 'left'],
    ),
  );
  const T = c.band.tolerance;
  const count = (v: HistoryRow['verdict']): number => rows.filter((r) => r.verdict === v).length;
  io.out('');
  io.out(`${rows.length} analys${rows.length === 1 ? 'is' : 'es'} of ${c.phaseId} from ${rows[0]!.created.slice(0, 10)} to ${rows[rows.length - 1]!.created.slice(0, 10)} in ${c.storePath}.`);
  io.out(`Reference a = ${c.referenceAA} Å (${c.referenceOrigin}).`);
  io.out(`Band: ± ${(T * 100).toFixed(3)}% (${c.band.origin}) = ${(c.referenceAA * (1 - T)).toFixed(5)} to ${(c.referenceAA * (1 + T)).toFixed(5)} Å.`);
  io.out(`Verdicts: ${count('pass')} pass, ${count('fail')} fail, ${count('inconclusive')} inconclusive, ${count(null)} without a verdict.`);
  io.out(`\nCaution: ${HISTORY_CAUTION}`);
}
