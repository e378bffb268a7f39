import { mkdir } from 'node:fs/promises';
import { basename, extname, join } from 'node:path';
import cliProgress from 'cli-progress';
import type { Command } from 'commander';
import { stringify } from 'csv-stringify/sync';
import type { CameraUncertaintyBudget, ReproducibilitySource } from '../../../core/calibration';
import type { Phase } from '../../../core/crystal';
import type { AnalysisCamera } from '../../../core/pipeline';
import { checkFilm, type FilmCheck, type Verdict } from '../../../core/qa';
import { parseRelative } from '../../common/quantity';
import { LabStoreError, type CalibrationRecord, type LabStore } from '../../node/store';
import { addCameraOptions, readCameraFlags, type CameraFlags } from '../camera-options';
import { budgetForRecord, budgetLine, cameraFromRecord, distortionDisagreement, findStoredCalibration, readCameraReproducibility } from '../calibration-camera';
import { expandCheckArguments, type CheckInput } from '../check-inputs';
import { printJson, processIo, type CliIo } from '../cli-io';
import { EXIT, InputError, UsageError } from '../exit-codes';
import {
  addAnalysisShapeOptions,
  analysisOutput,
  analyzeImageFile,
  nominalCameraSource,
  readAnalysisShape,
  stageReporter,
  withSampleCamera,
  type AnalysisOutput,
  type AnalysisShape,
  type AnalysisShapeOptions,
  type ImageInput,
} from '../image-analysis';
import { fixed, withUncertainty } from '../number-format';
import { refuseExisting, writeOutput } from '../output-files';
import { resolvePhaseArgument } from '../phase-sources';
import { reportFilePaths, writeReportFiles } from '../report-files';
import { openStoreForCommand, STORE_OPTION_HELP } from '../store-access';
import { formatTable } from '../terminal-table';
import { givenVoltage, printAnalysis } from './analyze';

interface CheckOptions extends CameraFlags, AnalysisShapeOptions {
  cameraSigma?: string;
  cameraReproducibility?: string;
  calibration?: string;
  expect: string;
  tolerance: string;
  sampleId?: string;
  operator?: string;
  store?: string;
  json?: boolean;
  out?: string;
  report?: string;
  force?: boolean;
  quiet?: boolean;
}

/** The stable JSON of one check (README, `check`). */
export interface CheckJson {
  verdict: Verdict;
  reasons: string[];
  expected: { phase: string; aA: number; tolerance: number };
  measured: { aA: number; aSigmaA: number } | null;
  unexplainedRings: Array<{ dA: number; candidates: string[] }>;
  calibration: string | null;
  analysis: AnalysisOutput;
}

/** A finished check of one image, or why an image could not be checked. */
type CheckOutcome =
  | { ok: true; path: string; json: CheckJson; check: FilmCheck; analysisId: number | null }
  | { ok: false; path: string; error: string };

/** The command's exit code for a verdict, or for a batch with images that could not be checked. */
export class CheckExit extends Error {
  override name = 'CheckExit';
  constructor(readonly exitCode: number) {
    super(`check finished with exit code ${exitCode}`);
  }
}

export const CHECK_CAUTION =
  "The verdict supports, and does not replace, the lab's qualified review and its quality procedures: review the image, the reasons and the calibration before releasing a film.";

const VERDICT_EXIT: Record<Verdict, number> = { pass: EXIT.ok, fail: EXIT.checkFail, inconclusive: EXIT.checkInconclusive };

/** Worst first: an image that could not be checked, then fail, inconclusive, pass. */
export function batchExitCode(outcomes: readonly CheckOutcome[]): number {
  if (outcomes.some((o) => !o.ok)) return EXIT.input;
  const verdicts = outcomes.map((o) => (o.ok ? o.json.verdict : 'pass'));
  if (verdicts.includes('fail')) return EXIT.checkFail;
  if (verdicts.includes('inconclusive')) return EXIT.checkInconclusive;
  return EXIT.ok;
}

export function checkJsonOf(check: FilmCheck, calibration: string | null, analysis: AnalysisOutput): CheckJson {
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

/** Creates the output folder before any work (creating a folder never loses anything). */
async function ensureFolder(dir: string, flag: string): Promise<void> {
  try {
    await mkdir(dir, { recursive: true });
  } catch (error) {
    throw new UsageError(`${flag}: the folder ${dir} cannot be created (${(error as Error).message}); choose another folder`);
  }
}

/** Distinct file-name stems for a batch: the sample folder's name or the image's, numbered when they repeat. */
function stemsOf(inputs: readonly ImageInput[]): string[] {
  const base = inputs.map((x) => (x.sample ? basename(x.sample.folder) : basename(x.imagePath, extname(x.imagePath))));
  const count = new Map<string, number>();
  base.forEach((b) => count.set(b, (count.get(b) ?? 0) + 1));
  const used = new Map<string, number>();
  return base.map((b) => {
    if (count.get(b)! === 1) return b;
    const k = (used.get(b) ?? 0) + 1;
    used.set(b, k);
    return `${b}-${k}`;
  });
}

interface Context {
  opts: CheckOptions;
  io: CliIo;
  shape: AnalysisShape;
  expected: Phase;
  tolerance: number;
  record: CalibrationRecord | null;
  /** The calibration's uncertainty budget for these images (null without a calibration), and its warnings. */
  budget: CameraUncertaintyBudget | null;
  budgetWarnings: string[];
  store: LabStore;
  batch: boolean;
}

/** The camera for one image: the calibration's (voltage checked), or the nominal one. */
function cameraFor(input: ImageInput, ctx: Context): AnalysisCamera {
  const flags = withSampleCamera(ctx.opts, input);
  if (ctx.record) return cameraFromRecord(ctx.record, givenVoltage(flags), flags.voltage === ctx.opts.voltage ? '--voltage' : `${input.argument}'s sample.json`, ctx.budget!);
  const nominal = readCameraFlags(flags, true);
  const relSigma = ctx.opts.cameraSigma === undefined ? 0 : parseRelative(ctx.opts.cameraSigma, '--camera-sigma');
  return { voltageV: nominal.voltageV, cameraLengthPx: nominal.cameraLengthPx!, cameraLengthSigmaPx: relSigma * nominal.cameraLengthPx!, source: nominalCameraSource(nominal), calibrated: false };
}

/** Analyses, checks, records (and reports) one image. Errors propagate to the caller. */
async function checkOne(input: ImageInput, stem: string, ctx: Context): Promise<{ json: CheckJson; check: FilmCheck; analysisId: number }> {
  const { opts, shape, expected, record } = ctx;
  const camera = cameraFor(input, ctx);
  const analysis = await analyzeImageFile({ imagePath: input.imagePath, camera, shape, onProgress: stageReporter(ctx.io, 'check', (opts.quiet ?? false) || ctx.batch) });
  const extraWarnings = [...shape.notes, ...ctx.budgetWarnings];
  const disagreement = record ? distortionDisagreement(analysis.result, record) : null;
  if (disagreement) extraWarnings.push(disagreement);
  const output = analysisOutput(analysis, input.imagePath, { calibration: record?.name ?? null, cameraUncertainty: ctx.budget, extraWarnings });
  const check = checkFilm(analysis.result, expected, { tolerance: ctx.tolerance, library: shape.library, ...(ctx.budget ? { cameraUncertainty: ctx.budget } : {}) });
  const json = checkJsonOf(check, record?.name ?? null, output);
  let added;
  try {
    added = await ctx.store.addAnalysis({
      sampleId: opts.sampleId ?? null,
      operator: opts.operator ?? null,
      imageSha256: analysis.image.sha256,
      imagePath: input.imagePath,
      calibration: record?.name ?? null,
      phase: expected.id,
      aA: check.measured ? check.measured.aA : null,
      aSigmaA: check.measured ? check.measured.aSigmaA : null,
      verdict: check.verdict,
      tolerance: ctx.tolerance,
      result: json,
    });
  } catch (error) {
    if (error instanceof LabStoreError) throw new InputError(`the check of ${input.imagePath} was not recorded: ${error.message}`);
    throw error;
  }
  if (opts.report) {
    await writeReportFiles(
      opts.report,
      { analysis: output, raster: analysis.image.raster, phase: expected, phases: shape.library, calibration: record, check, sampleId: opts.sampleId ?? null, operator: opts.operator ?? null, json },
      { force: opts.force ?? false, stem },
    );
  }
  return { json, check, analysisId: added.id };
}

/** One line per image for the batch summary and the CSV. */
function summaryRow(o: CheckOutcome, ctx: Context): Record<string, string | number | null> {
  if (!o.ok) {
    return { image: o.path, verdict: 'not checked', phase: ctx.expected.id, expectedAA: ctx.expected.cell.aA, tolerance: ctx.tolerance, aA: null, aSigmaA: null, deviation: null, expandedUncertainty: null, unexplainedRingsA: '', calibration: ctx.record?.name ?? null, sampleId: ctx.opts.sampleId ?? null, sha256: null, analysisId: null, reasons: o.error };
  }
  const m = o.check.measured;
  return {
    image: o.path,
    verdict: o.json.verdict,
    phase: ctx.expected.id,
    expectedAA: ctx.expected.cell.aA,
    tolerance: ctx.tolerance,
    aA: m ? m.aA : null,
    aSigmaA: m ? m.aSigmaA : null,
    deviation: m ? m.deviation : null,
    expandedUncertainty: m ? m.expandedUncertainty : null,
    unexplainedRingsA: o.json.unexplainedRings.map((u) => u.dA.toFixed(4)).join(' '),
    calibration: o.json.calibration,
    sampleId: ctx.opts.sampleId ?? null,
    sha256: o.json.analysis.image.sha256,
    analysisId: o.analysisId,
    reasons: o.json.reasons.join(' | '),
  };
}

/** Progress on stderr: a bar when stderr is a terminal, else one line per image. */
function progress(io: CliIo, total: number, quiet: boolean): { tick(path: string, what: string): void; stop(): void } {
  if (quiet) return { tick: () => {}, stop: () => {} };
  if (io === processIo && process.stderr.isTTY) {
    const bar = new cliProgress.SingleBar({ format: 'annula check [{bar}] {value}/{total} {image}', stream: process.stderr, hideCursor: true, clearOnComplete: true }, cliProgress.Presets.shades_classic);
    bar.start(total, 0, { image: '' });
    return { tick: (path) => bar.increment(1, { image: basename(path) }), stop: () => bar.stop() };
  }
  let done = 0;
  return { tick: (path, what) => io.err(`annula check: ${++done}/${total} ${path}: ${what}`), stop: () => {} };
}

/** `annula check <image...>`: is each film the expected phase with the expected lattice constant? */
export function registerCheck(program: Command, io: CliIo): void {
  addAnalysisShapeOptions(
    addCameraOptions(
      program
        .command('check')
        .argument('<image...>', 'patterns of the film: image files, sample folders, folders of images, or glob patterns such as "qa/*.tif" (quoted)')
        .description('check that a film is the expected phase with the expected lattice constant: pass, fail or inconclusive, with reasons; every check is recorded in the lab store'),
      false,
    ).option('--camera-sigma <value>', 'relative standard uncertainty of a nominal camera length, e.g. 1% (a nominal camera never passes)'),
  )
    .requiredOption('--expect <phase>', 'the phase the film should be: a library id or name (e.g. TiN), or a .cif/.json file')
    .option('--calibration <name>', 'the camera of this saved calibration (see annula calibrations); without it the nominal camera is used and no film can pass')
    .option('--camera-reproducibility <value>', 'with --calibration: relative standard uncertainty of the camera length between images at the same settings (specimen height, focus, lens hysteresis), e.g. 0.3%; default 0.1% (assumes the eucentric height and standard focus, as for the standard: from memory); 0 only if written')
    .option('--tolerance <value>', 'allowed relative deviation of a from the expected phase, e.g. 0.5% or 2000ppm', '0.5%')
    .option('--sample-id <id>', 'the sample id recorded with each check, e.g. S-104')
    .option('--operator <name>', 'who ran the check (recorded)')
    .option('--store <file>', STORE_OPTION_HELP)
    .option('--json', 'print JSON (stable keys; see README): one object for one image, an array for a batch')
    .option('--out <dir>', 'also write check-summary.csv (one row per image) into this folder')
    .option('--report <dir>', 'also write each image\'s PDF report, ring table (CSV) and check JSON into this folder')
    .option('--force', 'with --out or --report, replace files of the same names')
    .option('--quiet', 'no progress on stderr')
    .addHelpText(
      'after',
      '\nVerdict (JCGM 106 guarded acceptance, expanded uncertainty U = 2u): pass when |a/a_expected - 1| + U <= tolerance,\n' +
        'fail when |a/a_expected - 1| - U > tolerance, inconclusive otherwise and whenever U > tolerance. U includes the camera\'s\n' +
        'budget: the fit, the standard\'s reference lattice constant and the transfer to each image (--camera-reproducibility),\n' +
        'as a root sum of squares of relative standard uncertainties (JCGM 100). Rings the expected\n' +
        'phase cannot explain (a possible second phase) fail; strong expected rings missing, or a nominal camera, make a pass inconclusive.\n' +
        'Exit code: 0 pass, 5 fail, 6 inconclusive; for a batch the worst (fail, then inconclusive), and 3 when any image could not be checked.\n\n' +
        'Examples:\n  annula check film.tif --calibration "TEM-2 200kV March" --expect TiN --tolerance 0.5% --sample-id S-104\n' +
        '  annula check "qa/2026-03/*.tif" --calibration "TEM-2 200kV March" --expect TiN --out qa-results/',
    )
    .action(async (args: string[], opts: CheckOptions) => {
      const tolerance = parseRelative(opts.tolerance, '--tolerance');
      if (!(tolerance > 0 && tolerance < 0.5)) throw new UsageError(`--tolerance: ${opts.tolerance} is not a relative tolerance between 0 and 50 %, e.g. 0.5%`);
      for (const [flag, value] of [['--sample-id', opts.sampleId], ['--operator', opts.operator]] as const) {
        if (value !== undefined && value.trim() === '') throw new UsageError(`${flag} needs a value`);
      }
      if (opts.calibration !== undefined) {
        const clash = (['cameraLength', 'pixelSize', 'scale', 'cameraSigma'] as const).find((k) => opts[k] !== undefined);
        if (clash) throw new UsageError(`--${clash.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)} and --calibration both describe the camera; give one of them`);
      } else if (opts.cameraReproducibility !== undefined) {
        throw new UsageError('--camera-reproducibility goes with --calibration <name>: it is the uncertainty of carrying a calibration over to these images; for a nominal camera use --camera-sigma');
      }
      const reproducibility: { relative: number; source: ReproducibilitySource } = readCameraReproducibility(opts.cameraReproducibility);
      const shape = await readAnalysisShape(opts);
      const expected = resolvePhaseArgument(opts.expect, shape.library.filter((x) => x.origin !== 'library'));
      const { inputs, batch } = await expandCheckArguments(args);
      const images = inputs.filter((x): x is Extract<CheckInput, { ok: true }> => x.ok).map((x) => x.input);
      // Report file names: the sample id for one image (as report-files names them), else each image's own name.
      const stems = !batch && opts.sampleId ? [opts.sampleId] : stemsOf(images);
      const csvPath = opts.out ? join(opts.out, 'check-summary.csv') : null;
      if (csvPath && !opts.force) await refuseExisting([csvPath]);
      if (opts.out) await ensureFolder(opts.out, '--out');
      if (opts.report && !opts.force) await refuseExisting(stems.flatMap((s) => Object.values(reportFilePaths(opts.report!, s, true))), '--report folder');
      if (!batch && !inputs[0]!.ok) throw new InputError(inputs[0]!.reason);

      const { store, location } = await openStoreForCommand(opts.store, { create: opts.calibration === undefined, io });
      if (!store) throw new UsageError(`--calibration: there is no lab store at ${location.path} yet; make a calibration first with annula calibrate --save <name>, or point --store (or ANNULA_STORE) at the store`);
      const outcomes: CheckOutcome[] = [];
      try {
        const record = opts.calibration !== undefined ? await findStoredCalibration(store, opts.calibration) : null;
        const found = record ? budgetForRecord(record, shape.library, reproducibility) : null;
        const ctx: Context = { opts, io, shape, expected, tolerance, record, budget: found?.budget ?? null, budgetWarnings: found?.warnings ?? [], store, batch };
        const bar = progress(io, inputs.length, (opts.quiet ?? false) || !batch);
        let k = 0;
        for (const entry of inputs) {
          if (!entry.ok) {
            outcomes.push({ ok: false, path: entry.argument, error: entry.reason });
            bar.tick(entry.argument, `not checked: ${entry.reason}`);
            continue;
          }
          const stem = stems[k++]!;
          try {
            const done = await checkOne(entry.input, stem, ctx);
            outcomes.push({ ok: true, path: entry.input.imagePath, ...done });
            bar.tick(entry.input.imagePath, done.json.verdict);
          } catch (error) {
            if (!batch || !(error instanceof InputError || error instanceof UsageError)) throw error;
            outcomes.push({ ok: false, path: entry.input.imagePath, error: error.message });
            bar.tick(entry.input.imagePath, `not checked: ${error.message}`);
          }
        }
        bar.stop();
        const rows = outcomes.map((o) => summaryRow(o, ctx));
        if (csvPath) await writeOutput(csvPath, stringify(rows, { header: true, columns: Object.keys(rows[0]!) }), opts.force ?? false);

        if (opts.json) {
          const docs = outcomes.map((o) => (o.ok ? o.json : { image: o.path, error: o.error }));
          printJson(io, batch ? docs : docs[0]);
        } else if (!batch && outcomes[0]!.ok) {
          const o = outcomes[0]!;
          printAnalysis(io, o.json.analysis, { caution: false });
          io.out('');
          printVerdict(io, o.json, o.check);
          io.out(`Recorded as analysis ${o.analysisId} in ${store.path}.`);
        } else {
          printSummary(io, rows);
          if (ctx.budget) io.out(`Uncertainty budget of the ${budgetLine(ctx.budget)}.`);
        }
        if (!opts.json && csvPath) io.out(`wrote ${csvPath}`);
        if (!opts.json && opts.report) io.out(`wrote the reports into ${opts.report}`);
        if (!opts.json) io.out(`\nCaution: ${CHECK_CAUTION}`);
        for (const o of outcomes) if (!o.ok) io.err(`annula: ${o.path} was not checked: ${o.error}`);
      } finally {
        await store.close();
      }
      const code = batch ? batchExitCode(outcomes) : VERDICT_EXIT[(outcomes[0] as Extract<CheckOutcome, { ok: true }>).json.verdict];
      if (code !== EXIT.ok) throw new CheckExit(code);
    });
}

function printVerdict(io: CliIo, json: CheckJson, check: FilmCheck): void {
  const e = json.expected;
  io.out(`Verdict: ${json.verdict.toUpperCase()} (expected ${e.phase}, a = ${e.aA} Å, tolerance ${fixed(e.tolerance * 100, 3)}%${json.calibration ? `, calibration "${json.calibration}"` : ', nominal camera'})`);
  const m = check.measured;
  if (m) io.out(`Measured a = ${withUncertainty(m.aA, m.aSigmaA)} Å: ${m.deviation >= 0 ? '+' : ''}${fixed(m.deviation * 100, 3)}% from the expected value, expanded uncertainty (k = 2) ${fixed(m.expandedUncertainty * 100, 3)}%`);
  for (const r of json.reasons) io.out(`- ${r}`);
  for (const u of json.unexplainedRings) io.out(`Unexplained ring at d = ${u.dA.toFixed(4)} Å${u.candidates.length ? `: could be ${u.candidates.join(', ')}` : ''}`);
}

function printSummary(io: CliIo, rows: ReadonlyArray<Record<string, string | number | null>>): void {
  const num = (v: string | number | null, d: number, scale = 1): string => (typeof v === 'number' ? (v * scale).toFixed(d) : '-');
  io.out(
    formatTable(
      ['#', 'image', 'verdict', 'a (Å)', 'u(a) (Å)', 'deviation', 'U (k=2)', 'unexplained d (Å)'],
      rows.map((r, i) => [String(i + 1), String(r.image), String(r.verdict), num(r.aA, 5), num(r.aSigmaA, 5), r.deviation === null ? '-' : `${num(r.deviation, 3, 100)}%`, r.expandedUncertainty === null ? '-' : `${num(r.expandedUncertainty, 3, 100)}%`, String(r.unexplainedRingsA ?? '')]),
      ['right', 'left', 'left', 'right', 'right', 'right', 'right', 'left'],
    ),
  );
  const count = (v: string): number => rows.filter((r) => r.verdict === v).length;
  io.out(`${rows.length} image${rows.length === 1 ? '' : 's'}: ${count('pass')} pass, ${count('fail')} fail, ${count('inconclusive')} inconclusive${count('not checked') ? `, ${count('not checked')} not checked` : ''}.`);
  for (const r of rows) if (r.verdict !== 'pass') io.out(`${r.image}: ${r.reasons}`);
}
