/** The readable report of indexing candidates, shared by `index` and `analyze`. */
import { formatHkl } from '../../core/crystal';
import type { RingIndexing } from '../../core/indexing';
import type { CliIo } from './cli-io';
import { fixed, withUncertainty } from './number-format';
import { formatTable } from './terminal-table';

export const CAUTION =
  'Candidates rank how well the measured d-spacings (and intensities) fit; they are evidence for, not proof of, a phase. ' +
  "Confirm against the lab's own procedures before a release decision.";

/** Candidate table, the best candidate's ring assignments, equivalences, second-phase rings and notes. */
export function printCandidates(io: CliIo, ringCount: number, result: Pick<RingIndexing, 'candidates' | 'ambiguities' | 'secondPhase' | 'conclusion' | 'notes'>): void {
  const best = result.candidates[0];
  io.out(
    formatTable(
      ['#', 'candidate', 'lattice', 'a (Å)', 'strain', 'FOM', 'explained', 'unexplained d (Å)'],
      result.candidates.map((c, i) => [
        String(i + 1),
        c.phase ? `${c.phase} (${c.phaseName})` : `${c.structure} lattice`,
        c.lattice,
        withUncertainty(c.aA, c.aSigmaA),
        c.strainPpm === undefined ? '' : `${fixed(c.strainPpm / 1e4, 2)}%`,
        `${c.figureOfMeritName.split(' ').pop()} ${fixed(c.figureOfMerit, 1)}`,
        `${c.explainedCount}/${ringCount}`,
        c.unexplained.map((d) => d.toFixed(4)).join(', '),
      ]),
      ['right', 'left', 'left', 'right', 'right', 'left', 'right', 'left'],
    ),
  );
  if (best) {
    io.out(`\n${result.conclusion.conclusive ? 'Best' : 'Best of weak candidates (not an answer)'}: ${best.label}`);
    io.out(
      formatTable(
        ['d obs (Å)', 'hkl', 'd calc (Å)', 'residual/sigma'],
        best.assignments.map((a) => [a.dA.toFixed(4), formatHkl(a.hkl), a.dCalcA.toFixed(4), fixed(a.residualSigma, 2)]),
        ['right', 'left', 'right', 'right'],
      ),
    );
    if (best.missing.length > 0) io.out(`Predicted but not observed: ${best.missing.map((m) => `${formatHkl(m.hkl)} (${m.dA.toFixed(4)} Å)`).join(', ')}`);
  }
  if (!result.conclusion.conclusive) io.out(`No convincing answer: ${result.conclusion.reason}`);
  for (const a of result.ambiguities) io.out(`Equivalent on these data: #${a.candidates[0] + 1} and #${a.candidates[1] + 1}: ${a.reason}`);
  for (const s of result.secondPhase) io.out(`Possible second phase: ring at ${s.dA.toFixed(4)} Å could be ${s.phaseIds.join(', ') || 'none of the library phases'}`);
  for (const n of result.notes) io.out(`Note: ${n}`);
}

export function printCaution(io: CliIo): void {
  io.out(`\nCaution: ${CAUTION}`);
}
