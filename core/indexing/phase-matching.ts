/**
 * Phase matching: how well each known phase (library or user, any crystal
 * system) explains the measured rings, allowing an isotropic lattice scale s
 * (strain s - 1) within a window.
 *
 * For each phase the rings of predictRings (core/crystal) down to the
 * smallest measured d are the lines; Q_calc = Q_ref / s^2. Trial scales come
 * from pairing each seed ring (the three of largest d and, with intensities,
 * the three strongest) with every line that puts s inside [1 - w, 1 + w], plus
 * s = 1. From each trial the rings are assigned to their nearest line,
 * accepted within k sigma (as in cubic-indexing.ts), and 1/s^2 is refined by
 * weighted least squares (Q_j = Q_ref,j x, proportional-q-fit.ts), repeating
 * until the assignment settles; trials that leave the window are dropped.
 *
 * Score (nats; the best trial of each phase is kept):
 *   position   ring-pattern-evidence.ts with the phase's lines, the same
 *              measure lattice-only candidates get, so the two compare;
 *              with measured intensities, each line is weighted by its odds
 *              of showing in this pattern, w = 1 / (1 + (I_lim / I)^k), I its
 *              relativeIntensity, I_lim = 10 I_min / I_max (0-100 scale) a
 *              detection limit put a decade below the weakest measured ring
 *              (conservative: the weakest ring found is not the faintest the
 *              pattern could show), k = 1.702 / ln 2: the logistic
 *              approximation of Phi(ln(I / I_lim) / ln 2) (the normal CDF as
 *              logistic(1.702 x), common practice), with the factor-2
 *              intensity sigma used below. Lines down to the weakest ring
 *              seen weigh over 0.99, lines a decade below the limit 0.4 %:
 *              rings the pattern could not show do not count as predicted
 *              positions, and phases with the same observable lines (Au and
 *              Ag) score their positions alike. (A fluorite's all-even rings
 *              with h + k + l = 4n + 2, kinematically 2e-4 to 2e-2 of its
 *              strongest, otherwise ranked it below a diamond-type phase that
 *              needs a strain of 0.6 % to fit the same rings.) Without
 *              intensities every line weighs 1;
 *   strain     the phase predicts a, a bare lattice does not. With a
 *              log-uniform prior for a free lattice edge over 2-20 Å and a
 *              Gaussian prior of width tau for the strain of a known phase,
 *              the ratio of their evidence (Laplace approximation; the fit
 *              widths cancel) is
 *                ln(ln 10) - ln(sqrt(2 pi) t) - e^2 / (2 t^2),
 *                t^2 = tau^2 + c^2 + sigma_e^2
 *              (e the fitted strain, sigma_e its fit uncertainty, c the camera
 *              calibration's relative sigma): about +6 nats at e = 0 with
 *              tau = 0.3 %, below zero past e ~ 3.5 tau;
 *   intensity  (times intensityWeight, 0.5: kinematic intensities are rough
 *              guides, so they weigh less than positions)
 *              - each predicted ring in the measured range that no ring
 *                matches costs ln(1 - p), p = 0.95 I / (I + 10), I its
 *                relativeIntensity (0-100): a missing strong ring (I = 100,
 *                -2.4 nats) costs far more than a missing weak one (I = 2,
 *                -0.17 nats);
 *              - with measured intensities, each matched ring adds
 *                ln(R / (sqrt(2 pi) t_I)) - (r - <r>)^2 / (2 t_I^2),
 *                r = ln(I_obs / I_calc), t_I = ln 2 (agreement within a factor
 *                of two, common practice given dynamical scattering and
 *                texture), R = ln 1000 the spread of log intensities a
 *                phase-free model allows.
 *
 * The camera calibration moves every d together. With the scale refined it is
 * absorbed by s, so it widens the strain's uncertainty (in quadrature), not
 * the ring windows; with refineScale false (s = 1) it widens every window:
 * sigma_Q^2 + (2 c Q)^2.
 */

import type { Hkl } from '../crystal/hkl';
import type { Phase } from '../crystal/phase';
import type { UnitCell } from '../crystal/unit-cell';
import { findSpaceGroup, predictRings } from '../crystal';
import { findAmbiguities, type Ambiguity, type AmbiguityInput } from './ambiguity';
import { deWolffM, smithSnyderF, type DeWolffFigure, type SmithSnyderFigure } from './figure-of-merit';
import { ringsHaveIntensities, validateMeasuredRings, type MeasuredRing } from './measured-ring';
import { fractionOption, integerOption, positiveOption } from './option-checks';
import { formatWithUncertainty, measuredQRange, prepareRings, type PreparedRing } from './prepared-ring';
import { fitProportionalQ, lengthFromInverseSquare, type SigmaSource } from './proportional-q-fit';
import { lowerBound, ringPatternEvidence } from './ring-pattern-evidence';

export interface PhaseMatchOptions {
  /** Relative standard uncertainty of the camera length scale (0). */
  calibrationRelativeSigma?: number;
  /** Refine an isotropic scale per phase (true); false keeps the reference cell. */
  refineScale?: boolean;
  /** Largest |strain| = |s - 1| considered (0.03). */
  strainWindow?: number;
  /** Width tau of the strain prior (0.003): a prior on film strain, not a measurement. */
  strainPriorSigma?: number;
  /** Acceptance window in combined sigmas (3). */
  windowSigmas?: number;
  /** Smallest acceptance window, relative in d (5e-4). */
  windowFloorRelative?: number;
  /** Weight of the intensity terms against the position term (0.5). */
  intensityWeight?: number;
  /** Prior fraction of spurious rings (0.2), as in indexCubic. */
  spuriousFraction?: number;
  /** Predicted rings at least this strong (relativeIntensity) are listed when missing (10). */
  strongRelativeIntensity?: number;
  /** Seed rings by d and by intensity (3 each). */
  seedRingCount?: number;
}

export const PHASE_MATCH_DEFAULTS = {
  calibrationRelativeSigma: 0,
  refineScale: true,
  strainWindow: 0.03,
  strainPriorSigma: 0.003,
  windowSigmas: 3,
  windowFloorRelative: 5e-4,
  intensityWeight: 0.5,
  spuriousFraction: 0.2,
  strongRelativeIntensity: 10,
  seedRingCount: 3,
} as const;

/** ln(ln(20 Å / 2 Å)): the log-uniform prior range of a free lattice edge (see the header). */
const LN_FREE_EDGE_RANGE = Math.log(Math.log(10));
/** Intensity agreement: a factor of 2 is one sigma in ln I; R spans three decades. */
const LN_INTENSITY_SIGMA = Math.LN2;
const LN_INTENSITY_RANGE = Math.log(1000);
/** The lines' detection weights: exponent 1.702 / ln 2, limit a decade below the weakest measured ring (see the header). */
const DETECTION_WEIGHT_EXPONENT = 1.702 / Math.LN2;
const DETECTION_LIMIT_BELOW_WEAKEST = 10;
/** Smallest d predictRings accepts, Å. */
const PREDICT_D_MIN_A = 0.25;
const MAX_CYCLES = 20;
/** Phases listed per possibly second-phase ring. */
const SECOND_PHASE_LIST = 5;
/** Runners-up closer than this to the best match are mentioned in the notes (nats). */
const CLOSE_SCORE_NATS = 2;

export interface PhaseRingAssignment {
  ringIndex: number;
  dA: number;
  dSigmaA: number;
  /** First family of the matched predicted ring. */
  hkl: Hkl;
  families: Hkl[];
  /** d of the predicted ring with the refined scale, Å. */
  dCalcA: number;
  residualA: number;
  residualSigma: number;
  /** Kinematic relativeIntensity of the predicted ring (0-100). */
  relativeIntensity: number;
}

export interface PhaseMissingRing {
  hkl: Hkl;
  families: Hkl[];
  /** With the refined scale, Å. */
  dA: number;
  relativeIntensity: number;
}

export interface PhaseMatch {
  phase: Phase;
  phaseId: string;
  /** Bravais symbol from the space group: 'cF', 'hP', 'tI', 'hR', ...; '' when the space group is unknown. */
  lattice: string;
  /** Structure-type label of the phase ('fcc', 'rock salt', ...), possibly ''. */
  structure: string;
  /** Isotropic scale s of all cell lengths (1 = reference cell). */
  scale: number;
  /** Standard uncertainty of s: fit and calibration in quadrature. */
  scaleSigma: number;
  /** (s - 1) in parts per million. */
  strainPpm: number;
  strainSigmaPpm: number;
  sigmaSource: SigmaSource;
  reducedChiSquare: number | null;
  referenceCell: UnitCell;
  /** The reference cell scaled by s. */
  cell: UnitCell;
  /** cell.aA and its uncertainty, Å. */
  aA: number;
  aSigmaA: number;
  assignments: PhaseRingAssignment[];
  unexplained: Array<{ ringIndex: number; dA: number }>;
  /** Predicted rings in the measured range, at least strongRelativeIntensity strong, that no ring matches. */
  missing: PhaseMissingRing[];
  explainedCount: number;
  figureOfMerit: number;
  figureOfMeritName: string;
  deWolff: DeWolffFigure | null;
  smithSnyder: SmithSnyderFigure | null;
  /** Total ranking score, nats, and its parts (see the header). */
  score: number;
  scoreParts: { position: number; strain: number; intensity: number };
  label: string;
}

/** A ring the best phase leaves unexplained, with the phases that could explain it. */
export interface SecondPhaseRing {
  ringIndex: number;
  dA: number;
  /** Ids of phases matching it (best first), from a match against the unexplained rings alone. */
  phaseIds: string[];
}

export interface PhaseMatching {
  /** Every phase that explains at least one ring, best first. */
  matches: PhaseMatch[];
  /** Rings the best phase leaves unexplained, as a possible second phase; empty when it explains all. */
  secondPhase: SecondPhaseRing[];
  /** Matches of the other phases against the unexplained rings only, best first. */
  secondPhaseMatches: PhaseMatch[];
  ambiguities: Ambiguity[];
  notes: string[];
}

interface Line {
  qRefPerA2: number;
  dRefA: number;
  hkl: Hkl;
  families: Hkl[];
  relativeIntensity: number;
}

interface Settings {
  calibration: number;
  refineScale: boolean;
  window: number;
  tau: number;
  k: number;
  floor: number;
  intensityWeight: number;
  eps: number;
  strong: number;
  seedRingCount: number;
}

function readSettings(options: PhaseMatchOptions): Settings {
  const D = PHASE_MATCH_DEFAULTS;
  const window = positiveOption('strainWindow', options.strainWindow, D.strainWindow);
  if (window >= 0.5) throw new RangeError(`options.strainWindow must be below 0.5 (a relative strain); got ${window}`);
  if (options.refineScale !== undefined && typeof options.refineScale !== 'boolean') {
    throw new TypeError(`options.refineScale must be true or false; got ${String(options.refineScale)}`);
  }
  return {
    calibration: positiveOption('calibrationRelativeSigma', options.calibrationRelativeSigma, D.calibrationRelativeSigma, true),
    refineScale: options.refineScale ?? D.refineScale,
    window,
    tau: positiveOption('strainPriorSigma', options.strainPriorSigma, D.strainPriorSigma),
    k: positiveOption('windowSigmas', options.windowSigmas, D.windowSigmas),
    floor: positiveOption('windowFloorRelative', options.windowFloorRelative, D.windowFloorRelative, true),
    intensityWeight: positiveOption('intensityWeight', options.intensityWeight, D.intensityWeight, true),
    eps: fractionOption('spuriousFraction', options.spuriousFraction, D.spuriousFraction),
    strong: positiveOption('strongRelativeIntensity', options.strongRelativeIntensity, D.strongRelativeIntensity, true),
    seedRingCount: integerOption('seedRingCount', options.seedRingCount, D.seedRingCount),
  };
}

/** Bravais symbol from the phase's space group: crystal family letter and centring letter. */
export function bravaisSymbol(spaceGroup: string): string {
  const sg = findSpaceGroup(spaceGroup);
  if (!sg) return '';
  const family: Record<string, string> = {
    triclinic: 'a', monoclinic: 'm', orthorhombic: 'o', tetragonal: 't', trigonal: 'h', hexagonal: 'h', cubic: 'c',
  };
  return `${family[sg.crystalSystem] ?? ''}${sg.centring}`;
}

/** The phase's predicted rings down to dMinA as lines sorted by Q ascending. */
function phaseLines(phase: Phase, dMinA: number): Line[] {
  return predictRings(phase, { dMinA: Math.max(PREDICT_D_MIN_A, dMinA) })
    .map((r) => ({
      qRefPerA2: 1 / (r.dA * r.dA),
      dRefA: r.dA,
      hkl: r.families[0]!.hkl,
      families: r.families.map((f) => f.hkl),
      relativeIntensity: r.relativeIntensity,
    }))
    .sort((p, q) => p.qRefPerA2 - q.qRefPerA2);
}

interface Trial {
  x: number;
  xSigma: number;
  sigmaSource: SigmaSource;
  reducedChiSquare: number | null;
  accepted: Array<{ ring: PreparedRing; line: Line }>;
  rejected: PreparedRing[];
}

function assign(rings: readonly PreparedRing[], lines: readonly Line[], qRefs: readonly number[], x: number, xSigma: number, s: Settings) {
  const accepted: Array<{ ring: PreparedRing; line: Line }> = [];
  const rejected: PreparedRing[] = [];
  for (const ring of rings) {
    const qRef = ring.qPerA2 / x;
    const i = lowerBound(qRefs, qRef);
    let best = i < qRefs.length ? i : i - 1;
    if (i > 0 && i < qRefs.length && qRef - qRefs[i - 1]! < qRefs[i]! - qRef) best = i - 1;
    if (best < 0) {
      rejected.push(ring);
      continue;
    }
    const line = lines[best]!;
    const calibration = s.refineScale ? 0 : 2 * s.calibration * ring.qPerA2;
    const sigma = Math.hypot(ring.qSigmaEffPerA2, line.qRefPerA2 * xSigma, calibration);
    if (Math.abs(ring.qPerA2 - line.qRefPerA2 * x) <= s.k * sigma) accepted.push({ ring, line });
    else rejected.push(ring);
  }
  return { accepted, rejected };
}

function refine(rings: readonly PreparedRing[], lines: readonly Line[], qRefs: readonly number[], x0: number, xSigma0: number, s: Settings): Trial | null {
  let x = x0;
  let xSigma = xSigma0;
  let previousKey = '';
  let trial: Trial | null = null;
  const xLow = 1 / (1 + s.window) ** 2;
  const xHigh = 1 / (1 - s.window) ** 2;
  for (let cycle = 0; cycle < MAX_CYCLES; cycle++) {
    const { accepted, rejected } = assign(rings, lines, qRefs, x, xSigma, s);
    if (accepted.length === 0) return null;
    const key = accepted.map((a) => `${a.ring.index}:${a.line.qRefPerA2}`).join(',');
    if (key === previousKey && trial !== null) return trial;
    previousKey = key;
    if (!s.refineScale) {
      return { x: 1, xSigma: 0, sigmaSource: 'propagated', reducedChiSquare: null, accepted, rejected };
    }
    const fit = fitProportionalQ(accepted.map((a) => ({ qPerA2: a.ring.qPerA2, qSigmaPerA2: a.ring.qSigmaPerA2, coefficient: a.line.qRefPerA2 })));
    if (!(fit.x >= xLow && fit.x <= xHigh)) return null;
    x = fit.x;
    xSigma = fit.xSigma;
    trial = { x, xSigma, sigmaSource: fit.sigmaSource, reducedChiSquare: fit.reducedChiSquare, accepted, rejected };
  }
  return trial;
}

/** Probability that a predicted ring of relativeIntensity I (0-100) is seen: 0.95 I / (I + 10). */
function detectionProbability(relativeIntensity: number): number {
  return (0.95 * relativeIntensity) / (relativeIntensity + 10);
}

function intensityTerm(trial: Trial, lines: readonly Line[], qLow: number, qHigh: number, withIntensities: boolean): number {
  const used = new Set(trial.accepted.map((a) => a.line));
  let term = 0;
  for (const line of lines) {
    const q = line.qRefPerA2 * trial.x;
    if (q >= qLow && q <= qHigh && !used.has(line)) term += Math.log(1 - detectionProbability(line.relativeIntensity));
  }
  if (withIntensities && trial.accepted.length > 0) {
    const maxObs = Math.max(...trial.accepted.map((a) => a.ring.intensity ?? 0));
    if (maxObs > 0) {
      const r = trial.accepted.map((a) => Math.log(Math.max(a.ring.intensity ?? 0, 1e-3 * maxObs)) - Math.log(Math.max(a.line.relativeIntensity, 0.1)));
      const mean = r.reduce((p, v) => p + v, 0) / r.length;
      for (const v of r) {
        term += Math.log(LN_INTENSITY_RANGE / (Math.sqrt(2 * Math.PI) * LN_INTENSITY_SIGMA)) - (v - mean) ** 2 / (2 * LN_INTENSITY_SIGMA ** 2);
      }
    }
  }
  return term;
}

/** ln of the evidence ratio "known phase with strain e" against "free lattice edge" (see the header). */
function strainTerm(strain: number, strainFitSigma: number, s: Settings): number {
  const t2 = s.tau ** 2 + s.calibration ** 2 + strainFitSigma ** 2;
  return LN_FREE_EDGE_RANGE - 0.5 * Math.log(2 * Math.PI * t2) - (strain * strain) / (2 * t2);
}

function scaleCell(cell: UnitCell, scale: number): UnitCell {
  return { ...cell, aA: cell.aA * scale, bA: cell.bA * scale, cA: cell.cA * scale };
}

interface TrialScore {
  scale: number;
  scaleFitSigma: number;
  position: number;
  strain: number;
  intensity: number;
  total: number;
}

/**
 * Weight of each line in the position term: its odds of showing in a pattern whose
 * weakest measured ring is 100 I_min / I_max (rings of positive intensity; the limit
 * I_lim a decade below it), 1 / (1 + (I_lim / I)^k) (see the header); undefined
 * (every line 1) without measured intensities.
 */
function lineDetectionWeights(lines: readonly Line[], rings: readonly PreparedRing[], withIntensities: boolean): number[] | undefined {
  if (!withIntensities) return undefined;
  let min = Infinity;
  let max = 0;
  for (const r of rings) {
    const v = r.intensity ?? 0;
    if (v > 0) { min = Math.min(min, v); max = Math.max(max, v); }
  }
  if (!(max > 0)) return undefined;
  const limit = (100 * min) / max / DETECTION_LIMIT_BELOW_WEAKEST;
  return lines.map((l) => 1 / (1 + (limit / Math.max(l.relativeIntensity, 1e-12)) ** DETECTION_WEIGHT_EXPONENT));
}

/** The three score parts of a refined trial (see the header). */
function scoreTrial(lines: readonly Line[], trial: Trial, rings: readonly PreparedRing[], s: Settings, withIntensities: boolean, lineWeights: readonly number[] | undefined): TrialScore {
  const { lengthA: scale, lengthSigmaA: scaleFitSigma } = lengthFromInverseSquare(trial.x, trial.xSigma);
  const { qLowPerA2, qHighPerA2 } = measuredQRange(rings, s.k);
  const position = ringPatternEvidence(
    rings.map((r) => ({ qPerA2: r.qPerA2, qSigmaPerA2: r.qSigmaEffPerA2 })),
    lines.map((l) => l.qRefPerA2 * trial.x),
    s.eps,
    lineWeights,
  );
  const strain = strainTerm(scale - 1, scaleFitSigma, s);
  const intensity = s.intensityWeight * intensityTerm(trial, lines, qLowPerA2, qHighPerA2, withIntensities);
  return { scale, scaleFitSigma, position, strain, intensity, total: position + strain + intensity };
}

function buildMatch(phase: Phase, lattice: string, lines: readonly Line[], trial: Trial, score: TrialScore, rings: readonly PreparedRing[], s: Settings): PhaseMatch {
  const { scale, scaleFitSigma } = score;
  const scaleSigma = Math.hypot(scaleFitSigma, s.calibration * scale);
  const strain = scale - 1;
  const { qLowPerA2, qHighPerA2 } = measuredQRange(rings, s.k);
  const assignments: PhaseRingAssignment[] = trial.accepted
    .map(({ ring, line }) => {
      const dCalcA = line.dRefA * scale;
      return {
        ringIndex: ring.index,
        dA: ring.dA,
        dSigmaA: ring.dSigmaA,
        hkl: line.hkl,
        families: line.families,
        dCalcA,
        residualA: ring.dA - dCalcA,
        residualSigma: (ring.dA - dCalcA) / ring.dSigmaA,
        relativeIntensity: line.relativeIntensity,
      };
    })
    .sort((p, q) => q.dA - p.dA);
  const used = new Set(trial.accepted.map((a) => a.line));
  const missing = lines
    .filter((l) => !used.has(l) && l.relativeIntensity >= s.strong && l.qRefPerA2 * trial.x >= qLowPerA2 && l.qRefPerA2 * trial.x <= qHighPerA2)
    .map((l) => ({ hkl: l.hkl, families: l.families, dA: l.dRefA * scale, relativeIntensity: l.relativeIntensity }))
    .sort((p, q) => q.dA - p.dA);
  const indexed = trial.accepted.map((a) => ({ qObsPerA2: a.ring.qPerA2, qCalcPerA2: a.line.qRefPerA2 * trial.x }));
  const linesQ = lines.map((l) => l.qRefPerA2 * trial.x);
  const deWolff = deWolffM(indexed, linesQ);
  const smithSnyder = smithSnyderF(indexed, linesQ);
  const aA = phase.cell.aA * scale;
  const aSigmaA = phase.cell.aA * scaleSigma;
  const strainPpm = strain * 1e6;
  return {
    phase,
    phaseId: phase.id,
    lattice,
    structure: phase.structureType,
    scale,
    scaleSigma,
    strainPpm,
    strainSigmaPpm: scaleSigma * 1e6,
    sigmaSource: trial.sigmaSource,
    reducedChiSquare: trial.reducedChiSquare,
    referenceCell: phase.cell,
    cell: scaleCell(phase.cell, scale),
    aA,
    aSigmaA,
    assignments,
    unexplained: trial.rejected.map((r) => ({ ringIndex: r.index, dA: r.dA })).sort((p, q) => q.dA - p.dA),
    missing,
    explainedCount: assignments.length,
    figureOfMerit: deWolff?.value ?? 0,
    figureOfMeritName: deWolff ? `de Wolff M${deWolff.n}` : 'de Wolff M (fewer than 2 rings indexed)',
    deWolff,
    smithSnyder,
    score: score.total,
    scoreParts: { position: score.position, strain: score.strain, intensity: score.intensity },
    label: `${phase.id} (${lattice || phase.spaceGroup}) a = ${formatWithUncertainty(aA, aSigmaA)} Å, strain ${Math.round(strainPpm)}(${Math.round(scaleSigma * 1e6)}) ppm`,
  };
}

/** Lines of a phase for rings down to dMinObs, predicted once per phase and call. */
type LineCache = Map<Phase, Line[]>;

function linesFor(phase: Phase, rings: readonly PreparedRing[], s: Settings, cache: LineCache): Line[] {
  let lines = cache.get(phase);
  if (!lines) {
    const dMinObs = Math.min(...rings.map((r) => r.dA));
    lines = phaseLines(phase, dMinObs * (1 - s.window) * (1 - 6 * s.floor) - 6 * Math.max(...rings.map((r) => r.dSigmaA)));
    cache.set(phase, lines);
  }
  return lines;
}

/** The best match of one phase, or null when no trial explains a ring within the window. */
function matchOnePhase(phase: Phase, rings: readonly PreparedRing[], s: Settings, withIntensities: boolean, cache: LineCache): PhaseMatch | null {
  const lines = linesFor(phase, rings, s, cache);
  if (lines.length === 0) return null;
  const qRefs = lines.map((l) => l.qRefPerA2);

  const trials: Array<{ x: number; xSigma: number }> = [{ x: 1, xSigma: 0 }];
  if (s.refineScale) {
    const byD = [...rings].sort((p, q) => q.dA - p.dA).slice(0, s.seedRingCount);
    const seeds = new Set(byD);
    if (withIntensities) for (const r of [...rings].sort((p, q) => (q.intensity ?? 0) - (p.intensity ?? 0)).slice(0, s.seedRingCount)) seeds.add(r);
    for (const seed of seeds) {
      // Lines that put s = d_seed / d_ref inside [1 - w, 1 + w].
      for (const line of lines) {
        const scale = seed.dA / line.dRefA;
        if (Math.abs(scale - 1) <= s.window) trials.push({ x: 1 / (scale * scale), xSigma: seed.qSigmaEffPerA2 / line.qRefPerA2 });
      }
    }
  }
  const lineWeights = lineDetectionWeights(lines, rings, withIntensities);
  let best: { trial: Trial; score: TrialScore } | null = null;
  const seen = new Set<string>();
  for (const t of trials) {
    const trial = refine(rings, lines, qRefs, t.x, t.xSigma, s);
    if (!trial) continue;
    const key = trial.accepted.map((a) => `${a.ring.index}:${a.line.qRefPerA2}`).join(',');
    if (seen.has(key)) continue;
    seen.add(key);
    const score = scoreTrial(lines, trial, rings, s, withIntensities, lineWeights);
    if (!best || score.total > best.score.total) best = { trial, score };
  }
  return best ? buildMatch(phase, bravaisSymbol(phase.spaceGroup), lines, best.trial, best.score, rings, s) : null;
}

/** Ambiguity input for a phase match: its rings at the refined scale, predicted as far as needed. */
export function phaseAmbiguityInput(m: PhaseMatch): AmbiguityInput {
  let cache: { dMinA: number; q: number[] } | undefined;
  return {
    label: m.label,
    explainedRingIndices: m.assignments.map((a) => a.ringIndex),
    linesQ: (qMax) => {
      const dMinA = Math.max(PREDICT_D_MIN_A, (m.scale / Math.sqrt(qMax)) * 0.999);
      if (!cache || cache.dMinA > dMinA) {
        cache = { dMinA, q: phaseLines(m.phase, dMinA).map((l) => l.qRefPerA2 / (m.scale * m.scale)) };
      }
      return cache.q.filter((q) => q <= qMax);
    },
    relativeSigma: m.scaleSigma / m.scale,
  };
}

/**
 * Keeps a phase-phase equivalence only when the lattice constants cannot decide
 * either: both strains consistent with zero within 3 times their measurement
 * uncertainty (fit and calibration). Otherwise a decides, and the pair is not
 * reported as equivalent.
 */
export function phasePairUndecided(p: PhaseMatch, q: PhaseMatch, k = 3): boolean {
  return Math.abs(p.strainPpm) <= k * p.strainSigmaPpm && Math.abs(q.strainPpm) <= k * q.strainSigmaPpm;
}

/** Reason text added to a phase-phase ambiguity. */
export function phasePairReason(p: PhaseMatch, q: PhaseMatch): string {
  const diff = (100 * (q.referenceCell.aA - p.referenceCell.aA)) / p.referenceCell.aA;
  return (
    ` Their reference lattice constants differ by ${diff.toFixed(2)} %, within what the measurement and camera calibration resolve ` +
    `(strains ${Math.round(p.strainPpm)} +- ${Math.round(p.strainSigmaPpm)} and ${Math.round(q.strainPpm)} +- ${Math.round(q.strainSigmaPpm)} ppm): ` +
    'a tighter calibration on a standard, or the ring intensities, would decide.'
  );
}

export function comparePhaseMatches(p: PhaseMatch, q: PhaseMatch): number {
  return q.score - p.score || q.explainedCount - p.explainedCount || p.phaseId.localeCompare(q.phaseId);
}

function checkPhases(phases: readonly Phase[]): void {
  if (!Array.isArray(phases)) throw new TypeError(`phases must be an array of Phase objects; got ${typeof phases}`);
  phases.forEach((p, i) => {
    if (p === null || typeof p !== 'object' || typeof p.id !== 'string' || typeof p.cell !== 'object' || !Array.isArray(p.symmetryOperations)) {
      throw new TypeError(`phases[${i}] is not a Phase (id, cell, symmetryOperations, sites); read phases with the phase library or the JSON/CIF readers`);
    }
  });
}

/**
 * Scores every phase against the rings.
 * @param rings at least 1 ring (d in Å with standard uncertainties); not mutated
 * @param phases phases of any crystal system; not mutated
 * @returns matches best first, the unexplained rings as a possible second phase, ambiguities, notes
 * @throws TypeError/RangeError for malformed rings, phases or options
 */
export function matchPhases(rings: readonly MeasuredRing[], phases: readonly Phase[], options: PhaseMatchOptions = {}): PhaseMatching {
  validateMeasuredRings(rings, 1, 'match phases');
  checkPhases(phases);
  const s = readSettings(options);
  const prepared = prepareRings(rings, s.k, s.floor);
  const withIntensities = ringsHaveIntensities(rings);
  // The second-phase pass reuses the lines: they reach the smallest d of all rings.
  const cache: LineCache = new Map();

  const matches = phases
    .map((phase) => matchOnePhase(phase, prepared, s, withIntensities, cache))
    .filter((m): m is PhaseMatch => m !== null)
    .sort(comparePhaseMatches);

  const notes: string[] = [];
  const best = matches[0];
  let secondPhase: SecondPhaseRing[] = [];
  let secondPhaseMatches: PhaseMatch[] = [];
  if (best && best.unexplained.length > 0) {
    const left = best.unexplained.map((u) => prepared[u.ringIndex]!);
    secondPhaseMatches = phases
      .filter((p) => p !== best.phase)
      .map((phase) => matchOnePhase(phase, left, s, withIntensities, cache))
      .filter((m): m is PhaseMatch => m !== null && m.score > 0)
      .sort(comparePhaseMatches);
    secondPhase = best.unexplained.map((u) => ({
      ringIndex: u.ringIndex,
      dA: u.dA,
      phaseIds: secondPhaseMatches
        .filter((m) => m.assignments.some((a) => a.ringIndex === u.ringIndex))
        .slice(0, SECOND_PHASE_LIST)
        .map((m) => m.phaseId),
    }));
    notes.push(
      `${best.phaseId} leaves ${best.unexplained.length} of ${rings.length} rings unexplained (d = ${best.unexplained.map((u) => u.dA.toFixed(4)).join(', ')} Å): ` +
        (secondPhaseMatches.length > 0
          ? `a possible second phase; best candidates for them: ${secondPhaseMatches.slice(0, 3).map((m) => m.phaseId).join(', ')}.`
          : 'no phase given explains them.'),
    );
  }
  if (best) {
    // Close runners-up that explain the same rings: say that only a (or intensities) separates them.
    const same = (m: PhaseMatch) => m.assignments.map((a) => a.ringIndex).join(',') === best.assignments.map((a) => a.ringIndex).join(',');
    for (const m of matches.slice(1, 4)) {
      if (best.score - m.score < CLOSE_SCORE_NATS && same(m)) {
        notes.push(
          `${m.phaseId} explains the same rings as ${best.phaseId} with a strain of ${Math.round(m.strainPpm)} ppm against ${Math.round(best.strainPpm)} ppm ` +
            `(scores ${m.score.toFixed(1)} and ${best.score.toFixed(1)} nats): the lattice constant separates them only as far as the film's strain is known to be small.`,
        );
      }
    }
  }
  if (!best) notes.push(`none of the ${phases.length} phases explains any ring within the ${s.window * 100} % strain window`);

  const top = matches.slice(0, 10);
  const qMax = Math.max(...prepared.map((r) => r.qPerA2));
  const ambiguities = findAmbiguities(top.map(phaseAmbiguityInput), qMax, { toleranceSigmas: s.k, floorRelative: s.floor })
    .filter((a) => phasePairUndecided(top[a.candidates[0]]!, top[a.candidates[1]]!))
    .map((a) => ({ ...a, reason: a.reason + phasePairReason(top[a.candidates[0]]!, top[a.candidates[1]]!) }));
  return { matches, secondPhase, secondPhaseMatches, ambiguities, notes };
}
