import type { Command } from 'commander';
import { indexRings, type MeasuredRing } from '../../../core/indexing';
import { parseLengthWithDefault, parseRelative } from '../../common/quantity';
import { printJson, type CliIo } from '../cli-io';
import { NothingFoundError, UsageError } from '../exit-codes';
import { collectPhases } from '../phase-sources';
import { printCandidates, printCaution } from '../candidate-report';

interface IndexOptions {
  d: string;
  sigma: string;
  intensity?: string;
  calibrationSigma?: string;
  phases?: string[];
  library: boolean;
  json?: boolean;
}

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
        printCandidates(io, rings.length, output);
        printCaution(io);
      }
      if (!result.conclusion.conclusive) {
        throw new NothingFoundError(`no convincing answer: ${result.conclusion.reason}`);
      }
    });
}

