import { basename, extname, join } from 'node:path';
import type { Command } from 'commander';
import { stringify } from 'csv-stringify/sync';
import { cameraUncertaintyBudget, standardReferenceUncertainty, type CameraUncertaintyBudget, type ReproducibilitySource } from '../../../core/calibration';
import { formatHkl, type Phase } from '../../../core/crystal';
import { reindexAnalysis, type AnalysisCamera, type AnalysisResult } from '../../../core/pipeline';
import { parseQuantity, parseRelative } from '../../common/quantity';
import type { ReportCalibration } from '../../common/report';
import type { CalibrationRecord } from '../../node/store';
import { addCameraOptions, readCameraFlags, type CameraFlags } from '../camera-options';
import {
  budgetForRecord,
  budgetLine,
  cameraFromFit,
  cameraFromRecord,
  distortionDisagreement,
  findStoredCalibration,
  fitCameraOnStandard,
  missingStrongestStandardRing,
  readCameraReproducibility,
} from '../calibration-camera';
import { printCandidates, printCaution } from '../candidate-report';
import { printJson, type CliIo } from '../cli-io';
import { NothingFoundError, UsageError } from '../exit-codes';
import {
  addAnalysisShapeOptions,
  analysisOutput,
  analyzeImageFile,
  nominalCameraSource,
  readAnalysisShape,
  resolveImageInput,
  stageReporter,
  withSampleCamera,
  type AnalysisOutput,
  type AnalysisShapeOptions,
  type ImageAnalysis,
  type InternalStandardSummary,
} from '../image-analysis';
import { fixed, kilovolts, withUncertainty } from '../number-format';
import { refuseExisting, writeOutput } from '../output-files';
import { resolvePhaseArgument } from '../phase-sources';
import { reportFilePaths, reportStem, writeReportFiles } from '../report-files';
import { openStoreForCommand, STORE_OPTION_HELP } from '../store-access';
import { formatTable } from '../terminal-table';

interface AnalyzeOptions extends CameraFlags, AnalysisShapeOptions {
  cameraSigma?: string;
  cameraReproducibility?: string;
  calibration?: string;
  internalStandard?: string;
  store?: string;
  json?: boolean;
  out?: string;
  report?: string;
  force?: boolean;
  quiet?: boolean;
}

/** The default transfer term, as --help says it. */
const CAMERA_REPRODUCIBILITY_DEFAULT_TEXT = '0.1% (assumes the eucentric height and standard focus, as for the standard: from memory)';

/** Rows of the ring table, for CSV and for people. */
export function ringRows(result: Pick<AnalysisResult, 'rings'>): Array<Record<string, string | number | null>> {
  return result.rings.map((r, i) => ({ ring: i + 1, ...r, hkl: r.hkl ? formatHkl(r.hkl) : null }));
}

/**
 * L/p standing in for an unknown camera while the rings are measured (only d and the
 * indexing depend on the camera, and both are redone with the fitted one): 1 m over 14 µm.
 */
export const PLACEHOLDER_CAMERA_LENGTH_PX = 1 / 14e-6;

/** The voltage given on the command line or by the sample folder, or null. */
export function givenVoltage(flags: CameraFlags): number | null {
  return flags.voltage === undefined ? null : parseQuantity(flags.voltage, 'voltage', '--voltage');
}

/**
 * The camera for an analysis with a stored calibration: the record's camera, checked against
 * the voltage the command line or the sample folder gives, its uncertainty the whole budget
 * (fit, the standard's reference a, the transfer term `reproducibility`). The camera flags of
 * the command line conflict with it (a sample folder's recorded nominal camera is simply not used).
 */
export async function calibrationCameraFor(
  name: string,
  storeOption: string | undefined,
  flags: CameraFlags,
  commandFlags: CameraFlags,
  io: CliIo,
  library: readonly Phase[],
  reproducibility: { relative: number; source: ReproducibilitySource },
): Promise<{ camera: AnalysisCamera; record: CalibrationRecord; budget: CameraUncertaintyBudget; warnings: string[] }> {
  const clash = (['cameraLength', 'pixelSize', 'scale'] as const).find((k) => commandFlags[k] !== undefined);
  if (clash) {
    const flag = { cameraLength: '--camera-length', pixelSize: '--pixel-size', scale: '--scale' }[clash];
    throw new UsageError(`${flag} and --calibration both describe the camera; give one of them (the calibration's camera length is used with --calibration)`);
  }
  const { store, location } = await openStoreForCommand(storeOption, { create: false, io });
  if (!store) throw new UsageError(`--calibration: there is no lab store at ${location.path} yet; make a calibration first with annula calibrate --save <name>, or point --store (or ANNULA_STORE) at the store`);
  try {
    const record = await findStoredCalibration(store, name);
    const voltageV = givenVoltage(flags);
    const { budget, warnings } = budgetForRecord(record, library, reproducibility);
    return { camera: cameraFromRecord(record, voltageV, flags.voltage === commandFlags.voltage ? '--voltage' : 'the sample folder', budget), record, budget, warnings };
  } finally {
    await store.close();
  }
}

/** Ring list "1, 2, 4" (1-based, as the ring tables number them). */
function ringList(indices: readonly number[]): string {
  return indices.map((i) => String(i + 1)).join(', ');
}

/**
 * Internal standard: the camera fitted on the standard's rings of this very analysis, then
 * the other rings indexed with it (the standard's phase left out of their candidates).
 * @throws NothingFoundError when the standard's rings cannot calibrate the camera
 */
export function applyInternalStandard(
  result: AnalysisResult,
  standard: Phase,
  phases: readonly Phase[],
  nominalCameraLengthPx: number | null,
): { result: AnalysisResult; summary: InternalStandardSummary; budget: CameraUncertaintyBudget; warnings: string[] } {
  const outcome = fitCameraOnStandard([result], standard, nominalCameraLengthPx);
  if (!outcome.ok) throw new NothingFoundError(`--internal-standard ${standard.id}: the camera could not be calibrated on its rings: ${outcome.reason}`);
  const fit = outcome.calibration;
  const missing = missingStrongestStandardRing(fit, [result], standard);
  if (missing.length) throw new NothingFoundError(`--internal-standard ${standard.id}: the camera could not be calibrated on its rings: ${missing[0]!.replace(/^image 1: /, '')}; is ${standard.id} in this film? (check the nominal camera length too)`);
  const mine = fit.standardRings[0] ?? [];
  const others = result.rings.map((_, i) => i).filter((i) => !mine.includes(i));
  // Same image: no transfer term; the standard's reference a stays in (an internal standard removes
  // the camera's drift between images, not the uncertainty of what the standard's lattice constant is).
  const budget = cameraUncertaintyBudget(fit.cameraLengthSigmaPx / fit.cameraLengthPx, standardReferenceUncertainty({ id: standard.id, aA: standard.cell.aA }), { relative: 0, source: 'same image' });
  const camera = cameraFromFit(fit, `internal standard ${standard.id} (rings ${ringList(mine)} of this image)`, budget);
  const reindexed = reindexAnalysis(result, camera, phases.filter((p) => p.id !== standard.id), { ringIndices: others });
  // The standard's rings keep its indices (residuals are in the order of standardRings for image 0).
  const residuals = fit.residuals.map((r, k) => ({ ringIndex: mine[k]!, hkl: r.hkl, residualPpm: r.residualPpm, rejected: r.rejected }));
  const rings = reindexed.rings.map((r, i) => {
    const own = residuals.find((x) => x.ringIndex === i);
    return own ? { ...r, hkl: own.hkl, phase: standard.id } : r;
  });
  const warnings = fit.warnings.filter((w) => !/left out of the calibration$/.test(w)).map((w) => `internal standard ${standard.id}: ${w}`);
  if (others.length === 0) warnings.push(`internal standard ${standard.id}: every measured ring belongs to it; no ring is left for the unknown phase`);
  // The rings left for the unknown could themselves be the standard's under another camera (two
  // fcc phases a few percent apart, say): when they fit it with as many rings, the choice is a guess.
  if (others.length >= 3) {
    const alternative = fitCameraOnStandard([{ ...result, rings: others.map((i) => result.rings[i]!) }], standard, nominalCameraLengthPx);
    const used = (o: typeof outcome): number => (o.ok ? o.calibration.residuals.filter((r) => !r.rejected).length : 0);
    if (alternative.ok && used(alternative) >= used(outcome)) {
      warnings.push(
        `internal standard ${standard.id}: the other rings fit ${standard.id} just as well under a camera ${((alternative.calibration.cameraLengthPx / fit.cameraLengthPx - 1) * 100).toFixed(1)}% away (${used(alternative)} rings against ${used(outcome)}): which rings are the standard's is ambiguous; give the nominal camera length closely, or calibrate on a separate standard film`,
      );
    }
  }
  return {
    result: { ...reindexed, rings },
    summary: { phase: standard.id, ringIndices: mine, cameraLengthPx: fit.cameraLengthPx, cameraLengthSigmaPx: fit.cameraLengthSigmaPx, residuals },
    budget,
    warnings,
  };
}

/** `annula analyze <image>`: centre, distortion, rings, d-spacings and candidates of one pattern. */
export function registerAnalyze(program: Command, io: CliIo): void {
  addAnalysisShapeOptions(
    addCameraOptions(
      program
        .command('analyze')
        .argument('<image>', 'the pattern: TIFF, PNG or JPEG (8 to 32 bit; RGB is reduced to luminance), or a sample folder holding sample.json (e.g. samples/gold-standard)')
        .description('measure a ring pattern: centre, elliptical distortion, ring radii, d-spacings, and the lattices and phases that explain them'),
      false,
    ).option('--camera-sigma <value>', 'relative standard uncertainty of a nominal camera length, e.g. 1% (default: none, the camera is taken as exact and the result says so)'),
  )
    .option('--calibration <name>', 'use the camera of this saved calibration (see annula calibrations); its uncertainty budget enters every d and a')
    .option('--camera-reproducibility <value>', `with --calibration: relative standard uncertainty of the camera length between images at the same settings (specimen height, focus, lens hysteresis), e.g. 0.3%; default ${CAMERA_REPRODUCIBILITY_DEFAULT_TEXT}; 0 only if written`)
    .option('--internal-standard <phase>', 'a known phase in the same film (e.g. Au): calibrate the camera on its rings in this image, then index the other rings')
    .option('--store <file>', STORE_OPTION_HELP)
    .option('--json', 'print the full result as JSON (stable keys; see README)')
    .option('--out <dir>', 'also write <image>.analysis.json, <image>.rings.csv and <image>.profile.csv into this folder')
    .option('--report <dir>', 'also write the PDF report, the ring table (CSV) and the JSON into this folder')
    .option('--force', 'with --out or --report, replace files of the same names')
    .option('--quiet', 'no progress lines on stderr')
    .addHelpText(
      'after',
      '\nd-spacings use the exact flat-detector geometry d = lambda / (2 sin(atan(R / L) / 2)).\n' +
        'The camera: --camera-length with --pixel-size (or --scale), a saved --calibration, or an --internal-standard.\n' +
        'A nominal camera length is taken as exact unless --camera-sigma says otherwise: calibrate on a standard film for real uncertainties.\n' +
        'A calibrated camera\'s relative uncertainty is the root sum of squares (JCGM 100) of the fit, the standard\'s reference lattice\n' +
        'constant (value, temperature under the beam, thin film) and, with --calibration, the transfer to this image (--camera-reproducibility).\n\n' +
        'Examples:\n  annula analyze film.tif --voltage 200kV --camera-length 1m --pixel-size 14um --phase Au\n' +
        '  annula analyze film.tif --voltage 200kV --calibration "TEM-2 200kV March"\n' +
        '  annula analyze film-on-gold.tif --voltage 200kV --camera-length 1m --pixel-size 14um --internal-standard Au',
    )
    .action(async (imageArg: string, opts: AnalyzeOptions) => {
      if (opts.calibration !== undefined && opts.internalStandard !== undefined) {
        throw new UsageError('--calibration and --internal-standard both set the camera; give one of them');
      }
      if (opts.cameraSigma !== undefined && (opts.calibration !== undefined || opts.internalStandard !== undefined)) {
        throw new UsageError(`--camera-sigma is for a nominal camera; with ${opts.calibration !== undefined ? '--calibration' : '--internal-standard'} the uncertainty comes from the fit`);
      }
      if (opts.cameraReproducibility !== undefined && opts.calibration === undefined) {
        throw new UsageError(
          opts.internalStandard !== undefined
            ? '--camera-reproducibility is for a calibration carried over from another image; an --internal-standard is on this image, so there is no transfer term (its reference lattice constant still counts)'
            : '--camera-reproducibility goes with --calibration <name>: it is the uncertainty of carrying a calibration over to this image; for a nominal camera use --camera-sigma',
        );
      }
      const reproducibility = readCameraReproducibility(opts.cameraReproducibility);
      const input = await resolveImageInput(imageArg);
      const flags = withSampleCamera(opts, input);
      const shape = await readAnalysisShape(opts);
      const standard = opts.internalStandard !== undefined ? resolvePhaseArgument(opts.internalStandard, shape.library.filter((x) => x.origin !== 'library')) : null;
      const stem = basename(input.imagePath, extname(input.imagePath));
      const outputs = opts.out ? ['analysis.json', 'rings.csv', 'profile.csv'].map((suffix) => join(opts.out!, `${stem}.${suffix}`)) : [];
      if (opts.out && !opts.force) await refuseExisting(outputs);
      if (opts.report && !opts.force) await refuseExisting(Object.values(reportFilePaths(opts.report, reportStem(input.imagePath), false)), '--report folder');

      const extraWarnings = [...shape.notes];
      let camera: AnalysisCamera;
      let record: CalibrationRecord | null = null;
      let nominalLp: number | null = null;
      let cameraUncertainty: CameraUncertaintyBudget | null = null;
      if (opts.calibration !== undefined) {
        const found = await calibrationCameraFor(opts.calibration, opts.store, flags, opts, io, shape.library, reproducibility);
        ({ camera, record } = found);
        cameraUncertainty = found.budget;
        extraWarnings.push(...found.warnings);
        if (flags.voltage === undefined) extraWarnings.push(`no voltage was given: the calibration's ${kilovolts(camera.voltageV)} kV was assumed`);
      } else {
        const nominal = readCameraFlags(flags, standard === null);
        const relSigma = opts.cameraSigma === undefined ? 0 : parseRelative(opts.cameraSigma, '--camera-sigma');
        nominalLp = nominal.cameraLengthPx;
        camera = nominal.cameraLengthPx
          ? { voltageV: nominal.voltageV, cameraLengthPx: nominal.cameraLengthPx, cameraLengthSigmaPx: relSigma * nominal.cameraLengthPx, source: nominalCameraSource(nominal), calibrated: false }
          : { voltageV: nominal.voltageV, cameraLengthPx: PLACEHOLDER_CAMERA_LENGTH_PX, cameraLengthSigmaPx: 0, source: 'placeholder (no camera given)', calibrated: false };
      }

      const analysis: ImageAnalysis = await analyzeImageFile({
        imagePath: input.imagePath,
        camera,
        shape,
        ...(standard ? { phases: [standard] } : {}),
        onProgress: stageReporter(io, 'analyze', opts.quiet ?? false),
      });
      let internalStandard: InternalStandardSummary | null = null;
      if (standard) {
        const applied = applyInternalStandard(analysis.result, standard, shape.phases, nominalLp);
        analysis.result = applied.result;
        internalStandard = applied.summary;
        cameraUncertainty = applied.budget;
        extraWarnings.push(...applied.warnings);
      }
      if (record) {
        const disagreement = distortionDisagreement(analysis.result, record);
        if (disagreement) extraWarnings.push(disagreement);
      }
      const output = analysisOutput(analysis, input.imagePath, { calibration: record?.name ?? null, internalStandard, cameraUncertainty, extraWarnings });
      const result = analysis.result;

      if (opts.out) await writeAnalysisFiles(outputs, output, opts.force ?? false);
      const report = opts.report
        ? await writeReportFiles(
            opts.report,
            {
              analysis: output,
              raster: analysis.image.raster,
              phases: shape.phases,
              calibration: record ?? (internalStandard && standard ? internalStandardForReport(internalStandard, standard, output.camera.source) : null),
            },
            { force: opts.force ?? false },
          )
        : null;
      if (opts.json) printJson(io, output);
      else printAnalysis(io, output);
      if (opts.out && !opts.json) io.out(`\nwrote ${outputs.join(', ')}`);
      if (report && !opts.json) io.out(`${opts.out ? '' : '\n'}wrote ${report.pdf}, ${report.csv}, ${report.json}`);

      if (result.status !== 'ok') throw new NothingFoundError(`no rings found in ${input.imagePath}: ${result.warnings.filter((w) => /^no (rings|pattern)/.test(w)).join('; ') || 'see the warnings'}`);
      if (!result.conclusion.conclusive) throw new NothingFoundError(`rings measured, but no convincing answer: ${result.conclusion.reason}`);
    });
}

/** The report's calibration section for an internal standard (no stored record). */
function internalStandardForReport(s: InternalStandardSummary, standard: Phase, source: string): ReportCalibration {
  return { name: source, date: new Date().toISOString().slice(0, 10), standard: `${standard.id} (${standard.name}), internal`, cameraLengthPx: s.cameraLengthPx, cameraLengthSigmaPx: s.cameraLengthSigmaPx };
}

/** --out: the JSON, the ring table and the profile. */
async function writeAnalysisFiles(paths: string[], output: AnalysisOutput, force: boolean): Promise<void> {
  const rows = ringRows(output);
  await writeOutput(paths[0]!, JSON.stringify(output, null, 2) + '\n', force);
  await writeOutput(paths[1]!, stringify(rows, { header: true, columns: rows.length ? Object.keys(rows[0]!) : ['ring'] }), force);
  await writeOutput(
    paths[2]!,
    stringify(
      output.profile.radiusPx.map((r, k) => ({ radiusPx: r, mean: output.profile.mean[k], background: output.profile.background[k] })),
      { header: true, columns: ['radiusPx', 'mean', 'background'] },
    ),
    force,
  );
}

/** The readable report of one analysis (shared with check). */
export function printAnalysis(io: CliIo, r: AnalysisOutput, options: { caution?: boolean } = {}): void {
  io.out(`${r.image.path}: ${r.image.width} x ${r.image.height}, ${r.image.bitsPerSample} bit; ${kilovolts(r.voltageV)} kV, lambda = ${fixed(r.wavelengthA * 100, 4)} pm; camera length ${withUncertainty(r.camera.cameraLengthPx, r.camera.cameraLengthSigmaPx)} px (${r.camera.source})`);
  if (r.status === 'no-geometry' && !Number.isFinite(r.center.xPx)) {
    io.out('No pattern centre could be found.');
  } else {
    io.out(`Centre (${withUncertainty(r.center.xPx, r.center.sigmaXPx)}, ${withUncertainty(r.center.yPx, r.center.sigmaYPx)}) px; distortion q = ${withUncertainty(r.distortion.axisRatio, r.distortion.axisRatioSigma)}, major axis at ${r.distortion.angleSigmaDeg === null ? 'undetermined angle' : `${withUncertainty(r.distortion.angleDeg, r.distortion.angleSigmaDeg)} deg`}`);
    io.out(`Masked: ${(r.masks.excludedFraction * 100).toFixed(1)}% of pixels (${r.masks.saturatedPixels} saturated, ${r.masks.hotPixels} hot, beam stop ${r.masks.beamStopFound ? 'found' : 'not found'})`);
  }
  if (r.internalStandard) {
    const s = r.internalStandard;
    io.out(
      `Camera fitted on the internal standard ${s.phase}, rings ${ringList(s.ringIndices)}: L/p = ${withUncertainty(s.cameraLengthPx, s.cameraLengthSigmaPx)} px (fit alone); residuals ${s.residuals.map((x) => `${formatHkl(x.hkl)} ${x.residualPpm.toFixed(0)} ppm${x.rejected ? ' (rejected)' : ''}`).join(', ')}`,
    );
  }
  if (r.cameraUncertainty) {
    io.out(`Uncertainty budget of the ${budgetLine(r.cameraUncertainty)}; it enters every d and a.`);
    if (r.internalStandard) io.out(`The internal standard is on this image, so no camera drift between images enters; the uncertainty of ${r.internalStandard.phase}'s reference lattice constant does, and is what an internal standard cannot remove.`);
  }
  if (r.rings.length > 0) {
    io.out('');
    io.out(
      formatTable(
        ['#', 'R (px)', 'd (Å)', 'FWHM (px)', 'SNR', 'around', 'hkl', 'phase'],
        r.rings.map((x, i) => [
          String(i + 1),
          withUncertainty(x.radiusPx, x.radiusSigmaPx),
          withUncertainty(x.dA, x.dSigmaA),
          fixed(x.fwhmPx, 2),
          fixed(x.snr, 0),
          Number.isFinite(x.continuity) ? `${fixed(x.continuity * 100, 0)}%` : '-',
          x.hkl ? formatHkl(x.hkl) : '',
          x.phase ?? '',
        ]),
        ['right', 'right', 'right', 'right', 'right', 'right', 'left', 'left'],
      ),
    );
    io.out('');
    const indexedCount = r.internalStandard ? r.rings.length - r.internalStandard.ringIndices.length : r.rings.length;
    printCandidates(io, indexedCount, { candidates: r.candidates, ambiguities: r.ambiguities, secondPhase: r.secondPhase, conclusion: r.conclusion, notes: r.notes });
  }
  for (const w of r.warnings) io.out(`Warning: ${w}`);
  if (options.caution ?? true) printCaution(io);
}
