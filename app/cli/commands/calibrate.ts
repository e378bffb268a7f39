import type { Command } from 'commander';
import {
  cameraUncertaintyBudget,
  DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
  fitCameraOnStandard,
  standardReferenceUncertainty,
  strongestRingsNotOfStandard,
  type CameraCalibration,
  type CameraUncertaintyBudget,
  type RingResidual,
} from '../../../core/calibration';
import { formatHkl, type Phase } from '../../../core/crystal';
import { dSpacingFromRadiusA } from '../../../core/physics';
import type { AnalysisCamera, AnalysisResult } from '../../../core/pipeline';
import { LabStoreError, type AddedCalibration, type LabStore, type NewCalibration } from '../../node/store';
import { addCameraOptions, readCameraFlags, type CameraFlags, type CameraSettings } from '../camera-options';
import { budgetLine, missingStrongestStandardRing } from '../calibration-camera';
import { printJson, type CliIo } from '../cli-io';
import { InputError, NothingFoundError, UsageError } from '../exit-codes';
import {
  addAnalysisShapeOptions,
  analyzeImageFile,
  nominalCameraSource,
  readAnalysisShape,
  resolveImageInput,
  stageReporter,
  withSampleCamera,
  type AnalysisShapeOptions,
  type ImageAnalysis,
  type ImageInput,
} from '../image-analysis';
import { fixed, kilovolts, withUncertainty } from '../number-format';
import { resolvePhaseArgument } from '../phase-sources';
import { openStoreForCommand, STORE_OPTION_HELP } from '../store-access';
import { formatTable } from '../terminal-table';
import { PLACEHOLDER_CAMERA_LENGTH_PX } from './analyze';

interface CalibrateOptions extends CameraFlags, AnalysisShapeOptions {
  standard: string;
  instrument?: string;
  save: string;
  store?: string;
  json?: boolean;
  quiet?: boolean;
}

/** The outlier rule of core/calibration/camera-length-fit.ts, for people. */
export const OUTLIER_RULE =
  'a ring is rejected when its standardised residual z = (R - (L/p) tan 2theta) / sigma_R departs from the median z by more than max(4, 4 x 1.4826 x MAD(z)); the worst goes first and the fit is repeated, while at least 3 rings remain';

const NOT_OF_STANDARD = (id: string): string => `no ${id} reflection within 0.2 % (plus 3 sigma) of its radius under the fitted camera: another phase, or an artefact; left out of the fit`;

/** One image's camera settings (command line, else its sample folder), checked. */
function settingsOf(input: ImageInput, opts: CalibrateOptions): CameraSettings {
  return readCameraFlags(withSampleCamera(opts, input), false);
}

function sameOrNull(a: number | null, b: number | null): boolean {
  return a === null || b === null ? a === b : Math.abs(a / b - 1) <= 1e-9;
}

/** Angle in [0, 180), as the store keeps it. */
function axisAngle(deg: number): number {
  const a = ((deg % 180) + 180) % 180;
  return a >= 180 ? 0 : a;
}

/** The store's record of a fit. */
export function calibrationRecordOf(
  fit: CameraCalibration,
  analyses: readonly ImageAnalysis[],
  paths: readonly string[],
  setting: { name: string; instrument: string | null; standard: Phase; camera: CameraSettings },
  notes: readonly string[],
): NewCalibration {
  const described = setting.camera.described;
  const physical = described && 'cameraLengthM' in described ? described : null;
  const residuals = fit.residuals.filter((r) => !r.rejected);
  const rejected = fit.residuals.filter((r) => r.rejected);
  const camera = { wavelengthA: fit.wavelengthA, cameraLengthPx: fit.cameraLengthPx };
  const notOfStandard = analyses.flatMap((a, image) =>
    a.result.rings.flatMap((ring, i) =>
      fit.standardRings[image]?.includes(i) ? [] : [{ hkl: null, dA: dSpacingFromRadiusA(ring.radiusPx, camera), radiusPx: ring.radiusPx, residualPpm: null, image, reason: NOT_OF_STANDARD(setting.standard.id) }],
    ),
  );
  const q = fit.distortion;
  return {
    name: setting.name,
    instrument: setting.instrument,
    voltageV: fit.voltageV,
    nominalCameraLengthM: physical ? physical.cameraLengthM : null,
    pixelSizeM: physical ? physical.pixelSizeM : null,
    standardPhaseId: setting.standard.id,
    cameraLengthPx: fit.cameraLengthPx,
    cameraLengthSigmaPx: fit.cameraLengthSigmaPx,
    axisRatio: Math.max(1, q.axisRatio),
    // No image gave a distortion fit (e.g. --no-distortion): circles were assumed.
    axisRatioSigma: Number.isFinite(q.axisRatioSigma) ? q.axisRatioSigma : 0,
    angleDeg: axisAngle(q.angleDeg),
    angleSigmaDeg: q.angleSigmaDeg !== null && Number.isFinite(q.angleSigmaDeg) ? q.angleSigmaDeg : null,
    residuals: residuals.map((r) => ({ hkl: [...r.hkl], dA: r.dFitA, residualPpm: r.residualPpm, radiusPx: r.radiusPx, image: r.imageIndex })),
    imageFingerprints: analyses.map((a, i) => ({ sha256: a.image.sha256, path: paths[i]! })),
    rejectedRings: [
      ...rejected.map((r) => ({
        hkl: [...r.hkl] as [number, number, number],
        dA: r.dFitA,
        radiusPx: r.radiusPx,
        residualPpm: r.residualPpm,
        image: r.imageIndex,
        reason: `outlier: z = ${r.standardisedResidual.toFixed(1)} (${r.residualPpm.toFixed(0)} ppm of d); rule: ${OUTLIER_RULE}`,
      })),
      ...notOfStandard,
    ],
    notes: notes.join('\n'),
  };
}

/**
 * A standard film's strongest ring must be one of the standard's
 * (core/calibration/strongest-measured-ring-check.ts): when it is not, the fit matched a
 * subset of the rings under a wrong camera or the film is not the standard.
 * @throws NothingFoundError naming the first image's ring
 */
function refuseUnexplainedStrongest(fit: CameraCalibration, results: readonly AnalysisResult[], inputs: readonly ImageInput[], standard: Phase): void {
  const unexplained = strongestRingsNotOfStandard(fit, results)[0];
  if (!unexplained) return;
  const { imageIndex, radiusPx, snr, dA } = unexplained;
  throw new NothingFoundError(
    `the strongest ring of ${inputs[imageIndex]!.argument} (R = ${radiusPx.toFixed(2)} px, SNR ${snr.toFixed(0)}, d = ${dA.toFixed(4)} Å under the fit) is not a ring of ${standard.id} under the fitted camera (L/p = ${fit.cameraLengthPx.toFixed(1)} px): the film is probably not ${standard.id}, or the fit matched the wrong rings; check --standard and the nominal camera; nothing was saved`,
  );
}

/** Saves the record; a name taken meanwhile is a usage error, other store problems input errors. */
async function save(store: LabStore, record: NewCalibration): Promise<AddedCalibration> {
  try {
    return await store.addCalibration(record);
  } catch (error) {
    if (error instanceof LabStoreError) {
      if (error.reason === 'duplicate') throw new UsageError(error.message);
      throw new InputError(error.message);
    }
    throw error;
  }
}

/** Refuses a name the store already has, before any image is analysed. */
async function refuseTakenName(store: LabStore, name: string): Promise<void> {
  let existing;
  try {
    existing = await store.findCalibration(name);
  } catch (error) {
    if (error instanceof LabStoreError) throw new InputError(error.message);
    throw error;
  }
  if (!existing) return;
  const as = existing.name !== name ? ` (as "${existing.name}")` : '';
  throw new UsageError(
    `--save: a calibration named "${name}" already exists${as} in ${store.path}, saved ${existing.created.slice(0, 10)}; saved calibrations are never replaced: choose another name, e.g. --save "${name} ${new Date().toISOString().slice(0, 10)}"`,
  );
}

/** `annula calibrate <image...>`: the camera length fitted on a standard film's rings, saved in the lab store. */
export function registerCalibrate(program: Command, io: CliIo): void {
  addAnalysisShapeOptions(
    addCameraOptions(
      program
        .command('calibrate')
        .argument('<image...>', 'one or more patterns of the standard film (TIFF, PNG, JPEG, or sample folders), all at the same voltage and camera setting')
        .description('calibrate the camera length on the rings of a standard film (exact geometry), and save it in the lab store'),
      false,
    ),
    false,
  )
    .requiredOption('--standard <phase>', 'the standard film: a library phase (e.g. Au) or a .cif/.json file; its lattice constant is the reference')
    .requiredOption('--save <name>', 'name of the new calibration (never replaces one of the same name)')
    .option('--instrument <name>', 'the microscope, e.g. "TEM-2 north bay" (recorded, and used for the drift check)')
    .option('--store <file>', STORE_OPTION_HELP)
    .option('--json', 'print the saved record, the fit and the drift check as JSON')
    .option('--quiet', 'no progress lines on stderr')
    .addHelpText(
      'after',
      '\nThe nominal camera (--camera-length with --pixel-size, or --scale) is optional: it narrows the ring\n' +
        'assignment to within 15 % of it and a fit more than 5 % away is warned about. The fit is\n' +
        'R_i = (L/p) tan(2 asin(lambda / 2 d_i)), weighted by each ring radius\'s uncertainty, the uncertainty\n' +
        'widened by the Birge ratio when the rings scatter more than their fits say.\n' +
        'A new calibration more than 1% from the previous one at the same instrument, voltage and nominal camera\n' +
        'length is flagged as possible drift.\n\n' +
        'Example:\n  annula calibrate gold-1.tif gold-2.tif --standard Au --voltage 200kV --camera-length 0.8m --pixel-size 28um \\\n' +
        '    --instrument "TEM-2 north bay" --save "TEM-2 200kV 0.8m March"',
    )
    .action(async (imageArgs: string[], opts: CalibrateOptions) => {
      const name = opts.save.trim();
      if (name === '') throw new UsageError('--save needs a name for the calibration, e.g. --save "TEM-2 200kV March"');
      const instrument = opts.instrument === undefined ? null : opts.instrument.trim();
      if (instrument === '') throw new UsageError('--instrument needs a name, e.g. --instrument "TEM-2 north bay"');
      const shape = await readAnalysisShape(opts);
      const standard = resolvePhaseArgument(opts.standard);
      const inputs = await Promise.all(imageArgs.map((a) => resolveImageInput(a)));
      const settings = inputs.map((input) => settingsOf(input, opts));
      const first = settings[0]!;
      settings.forEach((s, i) => {
        if (!sameOrNull(s.voltageV, first.voltageV)) {
          throw new UsageError(`${inputs[i]!.argument} is at ${kilovolts(s.voltageV)} kV but ${inputs[0]!.argument} at ${kilovolts(first.voltageV)} kV; calibrate each voltage on its own`);
        }
        if (!sameOrNull(s.cameraLengthPx, first.cameraLengthPx)) {
          throw new UsageError(`${inputs[i]!.argument} and ${inputs[0]!.argument} have different nominal cameras; calibrate each camera setting on its own (or give one with --camera-length and --pixel-size)`);
        }
      });
      const nominalLp = first.cameraLengthPx;
      const camera: AnalysisCamera = nominalLp
        ? { voltageV: first.voltageV, cameraLengthPx: nominalLp, cameraLengthSigmaPx: 0, source: nominalCameraSource(first), calibrated: false }
        : { voltageV: first.voltageV, cameraLengthPx: PLACEHOLDER_CAMERA_LENGTH_PX, cameraLengthSigmaPx: 0, source: 'placeholder (no nominal camera given)', calibrated: false };

      const { store } = await openStoreForCommand(opts.store, { create: true, io });
      if (!store) throw new InputError('the lab store could not be opened'); // create: true always gives one
      try {
        await refuseTakenName(store, name);
        const analyses: ImageAnalysis[] = [];
        for (const input of inputs) {
          analyses.push(await analyzeImageFile({ imagePath: input.imagePath, camera, shape, phases: [standard], onProgress: stageReporter(io, 'calibrate', opts.quiet ?? false) }));
        }
        const results: AnalysisResult[] = analyses.map((a) => a.result);
        const outcome = fitCameraOnStandard(results, standard, nominalLp);
        if (!outcome.ok) {
          if (!opts.json && outcome.residuals.length) printResiduals(io, outcome.residuals, inputs.length);
          throw new NothingFoundError(`the camera could not be calibrated on ${standard.id}: ${outcome.reason}; nothing was saved`);
        }
        const fit = outcome.calibration;
        refuseUnexplainedStrongest(fit, results, inputs, standard);
        const missing = missingStrongestStandardRing(fit, results, standard);
        if (missing.length) throw new NothingFoundError(`the fit on ${standard.id} is not trusted: ${missing.join('; ')}; check --standard and the nominal camera; nothing was saved`);
        const notes = [
          ...analyses.flatMap((a, i) => a.image.info.warnings.map((w) => `image ${i + 1}: ${w}`)),
          ...shape.notes,
          ...fit.warnings,
          ...(shape.fitDistortion ? [] : ['the distortion was not fitted (--no-distortion): circles were assumed']),
        ];
        const paths = inputs.map((x) => x.imagePath);
        const record = calibrationRecordOf(fit, analyses, paths, { name, instrument, standard, camera: first }, notes);
        const added = await save(store, record);
        // What the camera's uncertainty will be when this calibration is applied to a later image at the default transfer term.
        const budget = cameraUncertaintyBudget(fit.cameraLengthSigmaPx / fit.cameraLengthPx, standardReferenceUncertainty({ id: standard.id, aA: standard.cell.aA }), {
          relative: DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
          source: 'default',
        });
        if (opts.json) {
          printJson(io, {
            calibration: added.calibration,
            store: store.path,
            fit: {
              reducedChiSquare: fit.reducedChiSquare,
              usedRings: fit.residuals.filter((r) => !r.rejected).length,
              nominalCameraLengthPx: fit.nominalCameraLengthPx,
              deviationFromNominal: fit.deviationFromNominal,
              outlierRule: OUTLIER_RULE,
              residuals: fit.residuals,
              cameraUncertainty: budget,
            },
            instrumentAdded: added.instrumentAdded,
            drift: added.drift,
            warnings: notes,
          });
        } else {
          printCalibration(io, standard, fit, added, paths, notes, budget);
        }
        if (added.drift?.flagged) io.err(`warning: "${name}": ${added.drift.message}`);
      } finally {
        await store.close();
      }
    });
}

function printResiduals(io: CliIo, residuals: readonly RingResidual[], imageCount: number): void {
  io.out(
    formatTable(
      [...(imageCount > 1 ? ['image'] : []), 'hkl', 'R (px)', 'd ref (Å)', 'd fit (Å)', 'residual (ppm)', 'z', ''],
      residuals.map((r) => [
        ...(imageCount > 1 ? [String(r.imageIndex + 1)] : []),
        r.label,
        fixed(r.radiusPx, 3),
        r.dRefA.toFixed(5),
        fixed(r.dFitA, 5),
        fixed(r.residualPpm, 0),
        fixed(r.standardisedResidual, 1),
        r.rejected ? 'rejected' : '',
      ]),
      [...(imageCount > 1 ? ['right' as const] : []), 'left', 'right', 'right', 'right', 'right', 'right', 'left'],
    ),
  );
}

export const CALIBRATION_CAUTION =
  "A calibration is only as good as the standard's lattice constant (check the library value against its source or the standard's certificate) " +
  "and holds only at the settings it was made at; follow the lab's own calibration procedures.";

function printCalibration(io: CliIo, standard: Phase, fit: CameraCalibration, added: AddedCalibration, paths: readonly string[], notes: readonly string[], budget: CameraUncertaintyBudget): void {
  const c = added.calibration;
  io.out(`Calibration "${c.name}" on ${c.standardPhaseId} (reference a = ${standard.cell.aA} Å), ${kilovolts(c.voltageV)} kV, ${paths.length} image${paths.length === 1 ? '' : 's'}: ${paths.join(', ')}`);
  const rel = c.cameraLengthSigmaPx / c.cameraLengthPx;
  const length = c.pixelSizeM ? `; camera length ${withUncertainty(c.cameraLengthPx * c.pixelSizeM, c.cameraLengthSigmaPx * c.pixelSizeM)} m at ${fixed(c.pixelSizeM * 1e6, 2)} µm pixels` : '';
  io.out(`L/p = ${withUncertainty(c.cameraLengthPx, c.cameraLengthSigmaPx)} px (${fixed(rel * 1e6, 1)} ppm)${length}; reduced chi-square ${fixed(fit.reducedChiSquare, 2)}`);
  if (fit.deviationFromNominal !== null) io.out(`Nominal camera: L/p = ${fixed(fit.nominalCameraLengthPx, 1)} px; the fit is ${fixed(fit.deviationFromNominal * 100, 2)}% from it`);
  io.out(`Distortion: q = ${withUncertainty(c.axisRatio, c.axisRatioSigma)}, major axis at ${c.angleSigmaDeg === null ? 'undetermined angle' : `${withUncertainty(c.angleDeg, c.angleSigmaDeg)} deg`}`);
  io.out('');
  printResiduals(io, fit.residuals, paths.length);
  io.out(`\nOutlier rule: ${OUTLIER_RULE}.`);
  for (const r of c.rejectedRings) {
    io.out(`Left out: ${r.hkl ? `ring ${formatHkl(r.hkl)}` : `ring at R = ${fixed(r.radiusPx, 2)} px (d = ${fixed(r.dA, 4)} Å)`}${paths.length > 1 && r.image !== null ? ` of image ${r.image + 1}` : ''}: ${r.hkl ? r.reason.replace(/; rule: .*$/, '') : r.reason}`);
  }
  for (const w of notes) io.out(`Warning: ${w}`);
  if (added.drift) io.out(`Drift check: ${added.drift.message}`);
  else io.out('Drift check: no earlier calibration at this instrument, voltage and nominal camera length.');
  if (added.instrumentAdded) io.out(`Instrument "${c.instrument}" was added to the lab store.`);
  io.out(`Saved as calibration "${c.name}" in the lab store. Use it with: annula analyze <image> --calibration "${c.name}"`);
  io.out(`Applied to a later image, the uncertainty budget of the ${budgetLine(budget)}. The saved record keeps the fit's own uncertainty; the reference and transfer terms are added when it is applied.`);
  io.out(`\nCaution: ${CALIBRATION_CAUTION}`);
}
