/**
 * Summary of the accuracy benchmark over all cases, and the targets of issue 3,
 * section 5, each judged met or missed on the figures of the same run.
 *
 * Percentiles are nearest-rank: the p-th percentile of n sorted values is the
 * ceil(p n)-th smallest (common practice). Ring statistics pool the strong rings of
 * every case (evaluate-case.ts defines strong).
 */
import type { CaseEvaluation, RingComparison } from './evaluate-case';

/** The targets (issue 3, section 5). */
export const TARGETS = {
  centreMedianPx: 0.05,
  centreP95Px: 0.2,
  axisRatioMedian: 0.0005,
  strongRadiusMedianPx: 0.02,
  /** Relative d error with the camera known exactly, applied to every strong ring (the largest). */
  dRelative: 5e-4,
  top1Rate: 0.95,
} as const;

export function percentile(values: readonly number[], p: number): number {
  const finite = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  if (finite.length === 0) return Number.NaN;
  return finite[Math.min(finite.length - 1, Math.max(0, Math.ceil(p * finite.length) - 1))]!;
}

export const median = (values: readonly number[]): number => {
  const finite = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  if (finite.length === 0) return Number.NaN;
  const m = finite.length >> 1;
  return finite.length % 2 ? finite[m]! : 0.5 * (finite[m - 1]! + finite[m]!);
};

export type MatchedRing = RingComparison & { measured: NonNullable<RingComparison['measured']> };

export function strongMatched(c: CaseEvaluation): MatchedRing[] {
  return c.rings.filter((r): r is MatchedRing => r.strong && r.measured !== null);
}

/** Per-case figures for the table. */
export interface CaseFigures {
  strongCount: number;
  strongMissed: number;
  strongRadiusMedianPx: number;
  strongRadiusMaxPx: number;
  dMaxRelative: number;
  errorOverBoundMedian: number;
  sigmaOverBoundMedian: number;
  /** What this case misses, by target. */
  flags: string[];
}

export function caseFigures(c: CaseEvaluation): CaseFigures {
  const strong = c.rings.filter((r) => r.strong);
  const matched = strongMatched(c);
  const errors = matched.map((r) => Math.abs(r.measured.errorPx));
  const dMax = matched.reduce((m, r) => Math.max(m, Math.abs(r.measured.dRelativeError)), 0);
  const flags: string[] = [];
  if (c.status !== 'ok') flags.push(`status ${c.status}`);
  if (!(c.centreErrorPx <= TARGETS.centreP95Px)) flags.push('centre');
  if (!(c.axisRatioError <= TARGETS.axisRatioMedian)) flags.push('q');
  if (matched.length > 0 && !(median(errors) <= TARGETS.strongRadiusMedianPx)) flags.push('radius');
  if (matched.length > 0 && !(dMax <= TARGETS.dRelative)) flags.push('d');
  if (strong.length > matched.length) flags.push(`missed ${strong.length - matched.length} strong`);
  if (strong.length === 0) flags.push('no strong ring');
  if (!c.phaseCorrect) flags.push('phase');
  return {
    strongCount: strong.length,
    strongMissed: strong.length - matched.length,
    strongRadiusMedianPx: median(errors),
    strongRadiusMaxPx: errors.length ? Math.max(...errors) : Number.NaN,
    dMaxRelative: matched.length ? dMax : Number.NaN,
    errorOverBoundMedian: median(matched.map((r) => Math.abs(r.measured.errorPx) / r.boundPx)),
    sigmaOverBoundMedian: median(matched.map((r) => r.measured.sigmaPx / r.boundPx)),
    flags,
  };
}

export interface TargetCheck {
  name: string;
  target: string;
  measured: string;
  met: boolean;
}

export interface AccuracySummary {
  caseCount: number;
  centreMedianPx: number;
  centreP95Px: number;
  centreMaxPx: number;
  /** Median of centre error over its reported sigma. */
  centreZMedian: number;
  axisRatioMedian: number;
  axisRatioP95: number;
  axisRatioMax: number;
  angleCaseCount: number;
  angleMedianDeg: number;
  angleMaxDeg: number;
  strongRingCount: number;
  strongMissed: number;
  strongRadiusMedianPx: number;
  strongRadiusP95Px: number;
  strongRadiusMaxPx: number;
  dMedianRelative: number;
  dMaxRelative: number;
  /** Among all matched rings (strong or not), the largest relative d error. */
  dMaxRelativeAllMatched: number;
  top1Correct: number;
  top1Rate: number;
  conclusiveCount: number;
  errorOverBoundMedian: number;
  sigmaOverBoundMedian: number;
  /** The analysis's own bound over the truth's, median (1 when its noise model is right). */
  analysisBoundOverTruthMedian: number;
  /** |error| / reported sigma over strong rings: median (0.674 for honest Gaussian errors) and share within 2 sigma (0.954). */
  radiusZMedian: number;
  radiusWithin2Sigma: number;
  checks: TargetCheck[];
}

const px = (v: number, digits = 4) => `${v.toFixed(digits)} px`;

export function summarise(cases: readonly CaseEvaluation[]): AccuracySummary {
  const centre = cases.map((c) => c.centreErrorPx);
  const q = cases.map((c) => c.axisRatioError);
  const angles = cases.flatMap((c) => (c.angleErrorDeg === null ? [] : [Math.abs(c.angleErrorDeg)]));
  const strongAll = cases.flatMap((c) => c.rings.filter((r) => r.strong));
  const strong = cases.flatMap(strongMatched);
  const radius = strong.map((r) => Math.abs(r.measured.errorPx));
  const d = strong.map((r) => Math.abs(r.measured.dRelativeError));
  const allMatched = cases.flatMap((c) => c.rings.flatMap((r) => (r.measured ? [Math.abs(r.measured.dRelativeError)] : [])));
  const top1Correct = cases.filter((c) => c.phaseCorrect).length;
  const s = {
    caseCount: cases.length,
    centreMedianPx: median(centre),
    centreP95Px: percentile(centre, 0.95),
    centreMaxPx: Math.max(...centre),
    centreZMedian: median(cases.map((c) => c.centreErrorPx / c.centreSigmaPx)),
    axisRatioMedian: median(q),
    axisRatioP95: percentile(q, 0.95),
    axisRatioMax: Math.max(...q),
    angleCaseCount: angles.length,
    angleMedianDeg: median(angles),
    angleMaxDeg: angles.length ? Math.max(...angles) : Number.NaN,
    strongRingCount: strongAll.length,
    strongMissed: strongAll.length - strong.length,
    strongRadiusMedianPx: median(radius),
    strongRadiusP95Px: percentile(radius, 0.95),
    strongRadiusMaxPx: radius.length ? Math.max(...radius) : Number.NaN,
    dMedianRelative: median(d),
    dMaxRelative: d.length ? Math.max(...d) : Number.NaN,
    dMaxRelativeAllMatched: allMatched.length ? Math.max(...allMatched) : Number.NaN,
    top1Correct,
    top1Rate: top1Correct / cases.length,
    conclusiveCount: cases.filter((c) => c.conclusive).length,
    errorOverBoundMedian: median(strong.map((r) => Math.abs(r.measured.errorPx) / r.boundPx)),
    sigmaOverBoundMedian: median(strong.map((r) => r.measured.sigmaPx / r.boundPx)),
    analysisBoundOverTruthMedian: median(strong.flatMap((r) => (r.measured.analysisBoundPx === null ? [] : [r.measured.analysisBoundPx / r.boundPx]))),
    radiusZMedian: median(strong.map((r) => Math.abs(r.measured.errorPx) / r.measured.sigmaPx)),
    radiusWithin2Sigma: strong.length ? strong.filter((r) => Math.abs(r.measured.errorPx) <= 2 * r.measured.sigmaPx).length / strong.length : Number.NaN,
  };
  const checks: TargetCheck[] = [
    { name: 'centre error, median', target: `<= ${px(TARGETS.centreMedianPx, 2)}`, measured: px(s.centreMedianPx), met: s.centreMedianPx <= TARGETS.centreMedianPx },
    { name: 'centre error, 95th percentile', target: `<= ${px(TARGETS.centreP95Px, 1)}`, measured: px(s.centreP95Px), met: s.centreP95Px <= TARGETS.centreP95Px },
    { name: 'axis-ratio error, median', target: `<= ${TARGETS.axisRatioMedian}`, measured: s.axisRatioMedian.toExponential(2), met: s.axisRatioMedian <= TARGETS.axisRatioMedian },
    { name: 'strong-ring radius error, median', target: `<= ${px(TARGETS.strongRadiusMedianPx, 2)}`, measured: px(s.strongRadiusMedianPx), met: s.strongRadiusMedianPx <= TARGETS.strongRadiusMedianPx },
    {
      name: 'relative d error, every strong ring (camera exact)',
      target: `<= ${(TARGETS.dRelative * 100).toFixed(2)} %`,
      measured: `max ${(s.dMaxRelative * 100).toFixed(4)} %, median ${(s.dMedianRelative * 100).toFixed(4)} %`,
      met: s.dMaxRelative <= TARGETS.dRelative,
    },
    { name: 'top-1 phase correct', target: `>= ${TARGETS.top1Rate * 100} %`, measured: `${(s.top1Rate * 100).toFixed(1)} % (${top1Correct}/${cases.length})`, met: s.top1Rate >= TARGETS.top1Rate },
    {
      name: 'every strong ring found',
      target: 'all',
      measured: `${strong.length}/${strongAll.length}`,
      met: s.strongMissed === 0,
    },
  ];
  return { ...s, checks };
}
