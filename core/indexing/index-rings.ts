/**
 * The combined entry point: cubic lattices and known phases scored against the
 * same rings, in one list, best first, with the equivalences the data leave open.
 *
 * Ordering. Every candidate carries a score in nats whose first part is the
 * same for both kinds: the ring-position evidence of ring-pattern-evidence.ts.
 * A phase candidate adds (phase-matching.ts) the evidence for its lattice
 * constant - positive, about +6 nats, when its strain is small against the
 * strain prior and the calibration, negative beyond about 3.5 prior widths -
 * and, at half weight, its intensity terms, which charge every missing ring in
 * the measured range by its predicted strength. So:
 *  - a phase that explains the rings of a lattice candidate with a small strain
 *    ranks above that bare lattice;
 *  - a phase that needs a large strain, or whose strong rings are missing,
 *    ranks below it;
 *  - a phase that explains fewer rings than a lattice loses about 1.6 nats per
 *    unexplained ring plus that ring's position evidence.
 * Scores within 1e-6 nats tie; ties go to more explained rings, then the
 * smaller primitive cell, then phase before lattice.
 *
 * At most `maxCandidates` (10) are returned; the best lattice-only candidate is
 * always among them, so the bare-lattice reading stays visible.
 *
 * Equivalences are found on the final list (ambiguity.ts). Pairs of phases are
 * kept only when their lattice constants cannot decide either (both strains
 * consistent with zero within the measurement and calibration uncertainty);
 * a phase and the cubic lattice it belongs to (same Bravais symbol and a) are
 * the same answer at two levels of detail, not an ambiguity.
 */

import type { Hkl } from '../crystal/hkl';
import type { Phase } from '../crystal/phase';
import { cellVolumeA3, type UnitCell } from '../crystal/unit-cell';
import { findAmbiguities, type Ambiguity, type AmbiguityInput } from './ambiguity';
import { cubicAmbiguityInput, indexCubic, type CubicCandidate, type CubicIndexingOptions } from './cubic-indexing';
import { validateMeasuredRings, type MeasuredRing } from './measured-ring';
import { duplicateRingNotes, judgeIndexing, type IndexingConclusion } from './indexing-conclusion';
import { integerOption } from './option-checks';
import {
  matchPhases,
  phaseAmbiguityInput,
  phasePairReason,
  phasePairUndecided,
  type PhaseMatch,
  type PhaseMatchOptions,
  type SecondPhaseRing,
} from './phase-matching';

export interface IndexRingsOptions extends CubicIndexingOptions, PhaseMatchOptions {
  /** Phases to match (library and user phases); none: lattice candidates only. */
  phases?: readonly Phase[];
}

export interface IndexCandidateAssignment {
  ringIndex: number;
  dA: number;
  hkl: Hkl;
  dCalcA: number;
  residualSigma: number;
}

export interface IndexCandidateMissing {
  hkl: Hkl;
  dA: number;
  /** Kinematic relativeIntensity (0-100); phase candidates only. */
  relativeIntensity?: number;
}

/** One answer, in the JSON shape the command line prints. */
export interface IndexCandidate {
  kind: 'phase' | 'lattice';
  /** Bravais symbol: 'cP' | 'cI' | 'cF' for lattices; from the space group for phases ('hP', 'tP', ...). */
  lattice: string;
  /** 'primitive' | 'bcc' | 'fcc' | 'diamond' for lattices; the phase's structure-type label otherwise. */
  structure: string;
  /** Cubic edge (lattices) or the scaled cell's a (phases), Å, with its standard uncertainty. */
  aA: number;
  aSigmaA: number;
  /** Phase id, or null for a lattice-only candidate. */
  phase: string | null;
  phaseName: string | null;
  figureOfMerit: number;
  figureOfMeritName: string;
  assignments: IndexCandidateAssignment[];
  /** d of the rings the candidate does not explain, Å. */
  unexplained: number[];
  missing: IndexCandidateMissing[];
  /** Strain against the phase's reference cell, ppm (phases only). */
  strainPpm?: number;
  strainSigmaPpm?: number;
  /** Isotropic scale and the scaled cell (phases only). */
  scale?: number;
  cell?: UnitCell;
  explainedCount: number;
  primitiveVolumeA3: number;
  /** Ranking score, nats (see the header). */
  score: number;
  label: string;
}

export interface RingIndexing {
  candidates: IndexCandidate[];
  ambiguities: Ambiguity[];
  /** Rings the best phase leaves unexplained, with phases that could explain each (empty without phases). */
  secondPhase: SecondPhaseRing[];
  /** Whether the best candidate is an answer at all (indexing-conclusion.ts). */
  conclusion: IndexingConclusion;
  notes: string[];
}

const SCORE_TIE_NATS = 1e-6;

/** Lattice points per cell for a centring letter (R: the hexagonal setting's three). */
function pointsPerCell(centring: string): number {
  return ({ P: 1, A: 2, B: 2, C: 2, I: 2, F: 4, R: 3 } as Record<string, number>)[centring] ?? 1;
}

function fromLattice(c: CubicCandidate): IndexCandidate {
  return {
    kind: 'lattice',
    lattice: c.lattice,
    structure: c.structure,
    aA: c.aA,
    aSigmaA: c.aSigmaA,
    phase: null,
    phaseName: null,
    figureOfMerit: c.figureOfMerit,
    figureOfMeritName: c.figureOfMeritName,
    assignments: c.assignments.map((a) => ({ ringIndex: a.ringIndex, dA: a.dA, hkl: a.hkl, dCalcA: a.dCalcA, residualSigma: a.residualSigma })),
    unexplained: c.unexplained.map((u) => u.dA),
    missing: c.missing.map((m) => ({ hkl: m.hkl, dA: m.dA })),
    explainedCount: c.explainedCount,
    primitiveVolumeA3: c.primitiveVolumeA3,
    score: c.score,
    label: c.label,
  };
}

function fromPhase(m: PhaseMatch): IndexCandidate {
  const centring = m.lattice.slice(1) || 'P';
  return {
    kind: 'phase',
    lattice: m.lattice,
    structure: m.structure,
    aA: m.aA,
    aSigmaA: m.aSigmaA,
    phase: m.phaseId,
    phaseName: m.phase.name,
    figureOfMerit: m.figureOfMerit,
    figureOfMeritName: m.figureOfMeritName,
    assignments: m.assignments.map((a) => ({ ringIndex: a.ringIndex, dA: a.dA, hkl: a.hkl, dCalcA: a.dCalcA, residualSigma: a.residualSigma })),
    unexplained: m.unexplained.map((u) => u.dA),
    missing: m.missing.map((x) => ({ hkl: x.hkl, dA: x.dA, relativeIntensity: x.relativeIntensity })),
    strainPpm: m.strainPpm,
    strainSigmaPpm: m.strainSigmaPpm,
    scale: m.scale,
    cell: m.cell,
    explainedCount: m.explainedCount,
    primitiveVolumeA3: cellVolumeA3(m.cell) / pointsPerCell(centring),
    score: m.score,
    label: m.label,
  };
}

/** Ordering of the combined list (see the header). */
export function compareIndexCandidates(p: IndexCandidate, q: IndexCandidate): number {
  const ds = q.score - p.score;
  if (Math.abs(ds) > SCORE_TIE_NATS) return ds;
  if (p.explainedCount !== q.explainedCount) return q.explainedCount - p.explainedCount;
  const dv = p.primitiveVolumeA3 - q.primitiveVolumeA3;
  if (Math.abs(dv) > 1e-9 * Math.max(p.primitiveVolumeA3, q.primitiveVolumeA3)) return dv;
  if (p.kind !== q.kind) return p.kind === 'phase' ? -1 : 1;
  return p.label.localeCompare(q.label);
}

/** A cubic phase and the bare lattice of the same Bravais symbol and edge: one answer, two levels of detail. */
function isOwnLattice(m: PhaseMatch, c: CubicCandidate, k: number): boolean {
  return m.lattice === c.lattice && Math.abs(m.aA - c.aA) <= k * Math.hypot(m.aSigmaA, c.aSigmaA) + 1e-9 * c.aA;
}

/**
 * Indexes rings against cubic lattices and, when given, known phases.
 * @param rings at least 2 rings (d in Å with standard uncertainties, optional intensities); not mutated
 * @param options phases plus the options of indexCubic and matchPhases (shared names mean the same)
 * @returns candidates best first (IndexCandidate: the command line's JSON shape), ambiguities
 *   (indices into candidates), rings for a possible second phase, and notes
 * @throws TypeError/RangeError for malformed rings, phases or options, naming the field
 * @example indexRings(rings, { phases: phaseLibrary() }).candidates[0] // { lattice: 'cF', structure: 'fcc', phase: 'Au', ... }
 */
export function indexRings(rings: readonly MeasuredRing[], options: IndexRingsOptions = {}): RingIndexing {
  validateMeasuredRings(rings, 2, 'index rings');
  const { phases, ...rest } = options;
  const maxCandidates = integerOption('maxCandidates', rest.maxCandidates, 10);
  const cubic = indexCubic(rings, rest);
  const phaseResult = phases && phases.length > 0 ? matchPhases(rings, phases, rest) : null;

  type Entry = { candidate: IndexCandidate; lattice?: CubicCandidate; match?: PhaseMatch };
  const entries: Entry[] = [
    ...cubic.candidates.map((c) => ({ candidate: fromLattice(c), lattice: c })),
    ...(phaseResult?.matches ?? []).filter((m) => m.explainedCount >= 2).map((m) => ({ candidate: fromPhase(m), match: m })),
  ];
  entries.sort((p, q) => compareIndexCandidates(p.candidate, q.candidate));
  const kept = entries.slice(0, maxCandidates);
  const bestLattice = entries.find((e) => e.lattice);
  if (bestLattice && !kept.includes(bestLattice)) kept[kept.length - 1] = bestLattice;

  const k = rest.windowSigmas ?? 3;
  const qMax = Math.max(...rings.map((r) => 1 / (r.dA * r.dA)));
  const inputs: AmbiguityInput[] = kept.map((e) => (e.lattice ? cubicAmbiguityInput(e.lattice) : phaseAmbiguityInput(e.match!)));
  const ambiguities = findAmbiguities(inputs, qMax, {
    toleranceSigmas: k,
    ...(rest.windowFloorRelative !== undefined ? { floorRelative: rest.windowFloorRelative } : {}),
  }).flatMap((a) => {
    const [p, q] = [kept[a.candidates[0]]!, kept[a.candidates[1]]!];
    if (p.match && q.match) {
      return phasePairUndecided(p.match, q.match) ? [{ ...a, reason: a.reason + phasePairReason(p.match, q.match) }] : [];
    }
    if (p.match && q.lattice && isOwnLattice(p.match, q.lattice, k)) return [];
    if (q.match && p.lattice && isOwnLattice(q.match, p.lattice, k)) return [];
    return [a];
  });

  return {
    candidates: kept.map((e) => e.candidate),
    ambiguities,
    secondPhase: phaseResult?.secondPhase ?? [],
    conclusion: judgeIndexing(rings, kept[0]?.candidate.explainedCount ?? null),
    notes: [...duplicateRingNotes(rings), ...cubic.notes, ...(phaseResult?.notes ?? [])],
  };
}
