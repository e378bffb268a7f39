import type { Command } from 'commander';
import { formatHkl } from '../../../core/crystal';
import { indexRings, type MeasuredRing } from '../../../core/indexing';
import { parseLengthWithDefault, parseRelative } from '../../common/quantity';
import { printJson, type CliIo } from '../cli-io';
import { NothingFoundError, UsageError } from '../exit-codes';
import { collectPhases } from '../phase-sources';
import { fixed, withUncertainty } from '../number-format';
import { formatTable } from '../terminal-table';

interface IndexOptions {
  d: string;
  sigma: string;
  intensity?: string;
  calibrationSigma?: string;
  phases?: string[];
  library: boolean;
  json?: boolean;
}

const CAUTION =
  'Candidates rank how well the measured d-spacings (and intensities) fit; they are evidence for, not proof of, a phase. ' +
  "Confirm against the lab's own procedures before a release decision.";

function splitList(text: string): string[] {
  return text.split(',').map((s) => s.trim()).filter((s) => s !== '');
}

/** Reads --d, --sigma and --intensity into measured rings. */
export function readMeasuredRings(opts: Pick<IndexOptions, 'd' | 'sigma' | 'intensity'>): MeasuredRing[] {
  const ds = splitList(opts.d).map((t, i) => parseLengthWithDefault(t, 'angstrom', `--d (value ${i + 1})`) / 1e-10);
  if (ds.length < 2) throw new UsageError(`--d needs at least 2 d-spacings separated by commas, e.g. --d 2.355,2.039,1.442; got ${ds.length}`);
  let sigmaOf: (dA: number) => number;
  const sigmaText = opts.sigma.trim();
  if (/%|ppm/.test(sigmaText)) {
    const rel = parseRelative(sigmaText, '--sigma');
    sigmaOf = (dA) => dA * rel;
  } else {
    const absA = parseLengthWithDefault(sigmaText, 'angstrom', '--sigma') / 1e-10;
    sigmaOf = () => absA;
  }
  let intensities: number[] | undefined;
  if (opts.intensity !== undefined) {
    intensities = splitList(opts.intensity).map((t, i) => {
      const v = Number(t);
      if (!Number.isFinite(v) || v < 0) throw new UsageError(`--intensity (value ${i + 1}): "${t}" is not a number >= 0`);
      return v;
    });
    if (intensities.length !== ds.length) {
      throw new UsageError(`--intensity has ${intensities.length} values but --d has ${ds.length}; give one intensity per ring`);
    }
  }
  return ds.map((dA, i) => ({ dA, dSigmaA: sigmaOf(dA), ...(intensities ? { intensity: intensities[i]! } : {}) }));
}

/** `annula index`: cubic lattices and library phases for a list of d-spacings. */
export function registerIndex(program: Command, io: CliIo): void {
  program
    .command('index')
    .description('index measured d-spacings against cubic lattices and the phase library')
    .requiredOption('--d <list>', 'd-spacings separated by commas; plain numbers are Å (e.g. 2.355,2.039,1.442,1.230)')
    .option('--sigma <value>', 'standard uncertainty of each d: relative (0.3%, 500ppm) or a length (0.005Å)', '0.3%')
    .option('--intensity <list>', 'measured ring intensities, one per d, any consistent unit')
    .option('--calibration-sigma <value>', 'relative standard uncertainty of the camera calibration, e.g. 0.1%')
    .option('--phases <files...>', 'add phases from CIF or JSON phase-description files')
    .option('--no-library', 'index against lattices only (and --phases, if given), not the built-in library')
    .option('--json', 'print JSON: { candidates: [...], ambiguities: [...], secondPhase: [...], notes: [...] }, best candidate first')
    .addHelpText(
      'after',
      '\nThe default --sigma of 0.3% is a typical uncertainty of d from a calibrated ring pattern (common practice);\n' +
        'give your own measurement uncertainty when you know it.\n\nExample:\n  annula index --d 2.355,2.039,1.442,1.230 --sigma 0.3%',
    )
    .action((opts: IndexOptions) => {
      const rings = readMeasuredRings(opts);
      const notes: string[] = [];
      const all = collectPhases(opts.phases ?? [], notes);
      const phases = opts.library ? all : all.filter((p) => p.origin !== 'library');
      const calibrationRelativeSigma = opts.calibrationSigma === undefined ? undefined : parseRelative(opts.calibrationSigma, '--calibration-sigma');
      const result = indexRings(rings, { phases, ...(calibrationRelativeSigma === undefined ? {} : { calibrationRelativeSigma }) });
      const output = { ...result, notes: [...notes, ...result.notes] };
      if (opts.json) {
        printJson(io, output);
      } else {
        printReadable(io, rings, output);
      }
      if (!result.conclusion.conclusive) {
        throw new NothingFoundError(`no convincing answer: ${result.conclusion.reason}`);
      }
    });
}

function printReadable(io: CliIo, rings: MeasuredRing[], result: ReturnType<typeof indexRings>): void {
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
        `${c.explainedCount}/${rings.length}`,
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
  for (const a of result.ambiguities) io.out(`Equivalent on these data: #${a.candidates[0] + 1} and #${a.candidates[1] + 1}: ${a.reason}`);
  for (const s of result.secondPhase) io.out(`Possible second phase: ring at ${s.dA.toFixed(4)} Å could be ${s.phaseIds.join(', ') || 'none of the library phases'}`);
  for (const n of result.notes) io.out(`Note: ${n}`);
  io.out(`\nCaution: ${CAUTION}`);
}
