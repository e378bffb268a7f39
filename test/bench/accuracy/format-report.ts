/**
 * The accuracy benchmark's tables: one row per case and the summary with the
 * targets, as fixed-width text for the terminal and as Markdown for last-run.md.
 * Both come from the same rows, so the file and the terminal always agree.
 */
import { caseFigures, type AccuracySummary } from './accuracy-summary';
import { ANGLE_MIN_AXIS_RATIO, ISOLATION_FWHM, NEIGHBOUR_HEIGHT_FRACTION, STRONG_BOUND_PX, type CaseEvaluation } from './evaluate-case';

type Table = { header: string[]; rows: string[][]; rightAlign: boolean[] };

const f = (v: number, digits: number) => (Number.isFinite(v) ? v.toFixed(digits) : '-');
const ppm = (v: number) => (Number.isFinite(v) ? (v * 1e6).toFixed(0) : '-');

export function caseTable(cases: readonly CaseEvaluation[]): Table {
  const header = ['case', 'size', 'kV', 'q', 'angle', 'peak e/px', 'features', 'centre err px', 'centre sigma px', 'q err', 'angle err deg', 'rings (strong)', 'strong |dR| med px', 'strong |dR| max px', 'max |d err| ppm', '|dR|/bound med', 'sigma/bound med', 'top-1', 'misses', 'time s'];
  const rows = cases.map((c) => {
    const fig = caseFigures(c);
    return [
      c.id,
      `${c.widthPx}x${c.heightPx}`,
      f(c.voltageKv, 0),
      f(c.trueAxisRatio, 3),
      c.trueAxisRatio > 1 ? f(c.trueAngleDeg, 0) : '-',
      f(c.peakCounts, 0),
      c.features.join(', ') || '-',
      f(c.centreErrorPx, 4),
      f(c.centreSigmaPx, 4),
      c.axisRatioError.toExponential(1),
      c.angleErrorDeg === null ? '-' : f(c.angleErrorDeg, 2),
      `${c.analysedRingCount} (${fig.strongCount - fig.strongMissed}/${fig.strongCount})`,
      f(fig.strongRadiusMedianPx, 4),
      f(fig.strongRadiusMaxPx, 4),
      ppm(fig.dMaxRelative),
      f(fig.errorOverBoundMedian, 1),
      f(fig.sigmaOverBoundMedian, 1),
      `${c.top1Phase ?? 'none'}${c.phaseCorrect ? '' : ` (truth ${c.phaseId})`}`,
      fig.flags.join('; ') || '-',
      f((c.simulateMs + c.analyzeMs) / 1000, 1),
    ];
  });
  const rightAlign = header.map((_, k) => k >= 2 && k !== 6 && k !== 17 && k !== 18);
  return { header, rows, rightAlign };
}

export function summaryTable(s: AccuracySummary): Table {
  const rows: string[][] = [
    ['cases', `${s.caseCount}`],
    ['centre error: median / 95th percentile / max', `${f(s.centreMedianPx, 4)} / ${f(s.centreP95Px, 4)} / ${f(s.centreMaxPx, 4)} px`],
    ['centre error over its reported sigma, median', f(s.centreZMedian, 2)],
    ['axis-ratio error: median / 95th percentile / max', `${s.axisRatioMedian.toExponential(2)} / ${s.axisRatioP95.toExponential(2)} / ${s.axisRatioMax.toExponential(2)}`],
    [`angle error (${s.angleCaseCount} cases with q >= ${ANGLE_MIN_AXIS_RATIO}): median / max |.|`, `${f(s.angleMedianDeg, 3)} / ${f(s.angleMaxDeg, 3)} deg`],
    ['strong rings: matched / defined', `${s.strongRingCount - s.strongMissed} / ${s.strongRingCount}`],
    ['strong-ring |radius error|: median / 95th percentile / max', `${f(s.strongRadiusMedianPx, 4)} / ${f(s.strongRadiusP95Px, 4)} / ${f(s.strongRadiusMaxPx, 4)} px`],
    ['strong-ring |relative d error|: median / max', `${ppm(s.dMedianRelative)} / ${ppm(s.dMaxRelative)} ppm`],
    ['any matched ring: max |relative d error|', `${ppm(s.dMaxRelativeAllMatched)} ppm`],
    ['top-1 phase correct', `${s.top1Correct}/${s.caseCount} (${f(100 * s.top1Rate, 1)} %); conclusive ${s.conclusiveCount}/${s.caseCount}`],
    ['strong rings: |radius error| / truth bound, median', f(s.errorOverBoundMedian, 2)],
    ['strong rings: reported radiusSigmaPx / truth bound, median', f(s.sigmaOverBoundMedian, 2)],
    ["strong rings: analysis's radiusBoundPx / truth bound, median", f(s.analysisBoundOverTruthMedian, 2)],
    ['strong rings: |radius error| / reported sigma, median (0.67 if honest) and share within 2 sigma (0.95 if honest)', `${f(s.radiusZMedian, 2)}, ${f(100 * s.radiusWithin2Sigma, 1)} %`],
  ];
  return { header: ['figure', 'value'], rows, rightAlign: [false, false] };
}

export function targetTable(s: AccuracySummary): Table {
  return { header: ['target', 'wanted', 'measured', 'met'], rows: s.checks.map((c) => [c.name, c.target, c.measured, c.met ? 'met' : 'MISSED']), rightAlign: [false, false, false, false] };
}

export function definitionsText(): string[] {
  return [
    'centre error: distance from the true centre, px. q err: |q - q_true|. angle err: only when q_true >= 1.005, wrapped into [-90, 90) deg.',
    'rings (strong): rings the analysis reported (strong rings matched / strong rings the truth defines). Each analysed ring is matched to the nearest true ring within one FWHM.',
    `strong ring: a true ring whose photon-counting bound from the TRUTH (radius-precision-bound.ts with the ring's expected counts over its visible part, FWHM, eta, the background and other rings under it, the read noise) is <= ${STRONG_BOUND_PX} px, and with no other ring of >= ${NEIGHBOUR_HEIGHT_FRACTION * 100} % of its height within ${ISOLATION_FWHM} FWHM.`,
    'bound: that truth bound (the limit of the continuous profile given the frame; pixels and frame errors add to it). The analysis reports its own estimate, radiusBoundPx, compared in the summary.',
    'd err: (d - d_true) / d_true with the camera length exact, over the strong rings. top-1: the first candidate\'s phase (truth in brackets when wrong).',
    'misses: targets this case misses on its own (centre > 0.2 px, q err > 5e-4, median strong |dR| > 0.02 px, a strong ring with |d err| > 500 ppm, strong rings not found, wrong phase). time: simulation + analysis.',
  ];
}

export function renderText(t: Table): string {
  const widths = t.header.map((h, k) => Math.max(h.length, ...t.rows.map((r) => r[k]!.length)));
  const line = (cells: string[]) => cells.map((c, k) => (t.rightAlign[k] ? c.padStart(widths[k]!) : c.padEnd(widths[k]!))).join('  ');
  return [line(t.header), widths.map((w) => '-'.repeat(w)).join('  '), ...t.rows.map(line)].join('\n');
}

export function renderMarkdown(t: Table): string {
  const esc = (s: string) => s.replace(/\|/g, '\\|');
  return [
    `| ${t.header.map(esc).join(' | ')} |`,
    `| ${t.rightAlign.map((r) => (r ? '---:' : '---')).join(' | ')} |`,
    ...t.rows.map((r) => `| ${r.map(esc).join(' | ')} |`),
  ].join('\n');
}
