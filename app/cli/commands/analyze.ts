import { basename, extname, join } from 'node:path';
import { readFile, stat } from 'node:fs/promises';
import type { Command } from 'commander';
import { stringify } from 'csv-stringify/sync';
import { formatHkl, type Phase } from '../../../core/crystal';
import { analyze, type AnalysisResult, type AnalysisStage } from '../../../core/pipeline';
import { parseMaskPolygons, type MaskPolygon } from '../../../core/rings';
import { parseRelative } from '../../common/quantity';
import { loadOpenCv } from '../../node/load-opencv';
import { processRowBandPool } from '../../node/row-band-pool';
import { addCameraOptions, readCameraFlags, type CameraFlags } from '../camera-options';
import { printCandidates, printCaution } from '../candidate-report';
import { printJson, type CliIo } from '../cli-io';
import { InputError, NothingFoundError, UsageError } from '../exit-codes';
import { fixed, kilovolts, withUncertainty } from '../number-format';
import { refuseExisting, writeOutput } from '../output-files';
import { collectPhases, resolvePhaseArgument } from '../phase-sources';
import { readImageArgument } from '../read-image-argument';
import { formatTable } from '../terminal-table';

interface AnalyzeOptions extends CameraFlags {
  cameraSigma?: string;
  phase?: string[];
  phases?: string[];
  mask?: string;
  center?: string;
  page?: string;
  distortion: boolean;
  beamStop: boolean;
  json?: boolean;
  out?: string;
  force?: boolean;
  quiet?: boolean;
}

const STAGE_WORDS: Record<AnalysisStage, string> = {
  masks: 'masking saturated, hot and beam-stop pixels',
  geometry: 'finding the centre and distortion',
  profile: 'measuring the rings',
  'd-spacings': 'computing d-spacings',
  indexing: 'indexing',
};

/** Stage lines on stderr, from the first stage that starts more than a second after the run began. */
function stageReporter(io: CliIo, quiet: boolean): (stage: AnalysisStage, fraction: number) => void {
  const started = Date.now();
  return (stage, fraction) => {
    if (quiet || fraction !== 0 || Date.now() - started < 1000) return;
    io.err(`annula analyze: ${STAGE_WORDS[stage]} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
  };
}

interface SampleFolder {
  imagePath: string;
  camera: { voltage?: string; cameraLength?: string; pixelSize?: string };
}

/** A sample folder (samples/<name>/sample.json): its image and recorded camera settings; null for a plain file. */
async function readSampleFolder(path: string): Promise<SampleFolder | null> {
  let isFolder = false;
  try {
    isFolder = (await stat(path)).isDirectory();
  } catch {
    return null; // not there: readImageArgument reports it
  }
  if (!isFolder) return null;
  const file = join(path, 'sample.json');
  let json: { image?: unknown; camera?: Record<string, unknown> };
  try {
    json = JSON.parse(await readFile(file, 'utf8'));
  } catch {
    throw new InputError(`${path} is a folder without a readable sample.json; give an image file, or a sample folder such as samples/gold-standard`);
  }
  if (typeof json.image !== 'string') throw new InputError(`${file}: "image" (the pattern's file name) is missing`);
  const text = (v: unknown): string | undefined => (typeof v === 'string' ? v : undefined);
  return {
    imagePath: join(path, json.image),
    camera: { voltage: text(json.camera?.voltage), cameraLength: text(json.camera?.cameraLength), pixelSize: text(json.camera?.pixelSize) },
  };
}

async function readMask(path: string): Promise<MaskPolygon[]> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch {
    throw new InputError(`mask file "${path}" cannot be read; check the path`);
  }
  try {
    return parseMaskPolygons(JSON.parse(text));
  } catch (e) {
    throw new InputError(`mask file "${path}": ${(e as Error).message}`);
  }
}

function readCenter(text: string): { x: number; y: number } {
  const parts = text.split(',').map((s) => Number(s.trim()));
  if (parts.length !== 2 || parts.some((v) => !Number.isFinite(v))) {
    throw new UsageError(`--center: "${text}" is not two numbers x,y in pixels, e.g. --center 1024.5,1010`);
  }
  return { x: parts[0]!, y: parts[1]! };
}

/** Rows of the ring table, for CSV and for people. */
export function ringRows(result: AnalysisResult): Array<Record<string, string | number | null>> {
  return result.rings.map((r, i) => ({ ring: i + 1, ...r, hkl: r.hkl ? formatHkl(r.hkl) : null }));
}


/** `annula analyze <image>`: centre, distortion, rings, d-spacings and candidates of one pattern. */
export function registerAnalyze(program: Command, io: CliIo): void {
  const collect = (value: string, list: string[] | undefined): string[] => [...(list ?? []), value];
  addCameraOptions(
    program
      .command('analyze')
      .argument('<image>', 'the pattern: TIFF, PNG or JPEG (8 to 32 bit; RGB is reduced to luminance), or a sample folder holding sample.json (e.g. samples/gold-standard)')
      .description('measure a ring pattern: centre, elliptical distortion, ring radii, d-spacings, and the lattices and phases that explain them'),
    true,
  )
    .option('--camera-sigma <value>', 'relative standard uncertainty of the camera length, e.g. 1% (default: none, the camera is taken as exact and the result says so)')
    .option('--phase <id>', 'match only this phase (library id or name, or a .cif/.json file); repeat for several', collect)
    .option('--phases <files...>', 'add phases from CIF or JSON files to the library')
    .option('--mask <file.json>', 'regions to exclude: [{ "points": [[x, y], ...] }, ...] in pixel coordinates')
    .option('--center <x,y>', 'start the centre search here (pixels), e.g. when the pattern is faint')
    .option('--page <n>', 'page of a multi-page TIFF, from 0', undefined)
    .option('--no-distortion', 'fit circles only (no elliptical distortion)')
    .option('--no-beam-stop', 'do not look for a beam stop')
    .option('--json', 'print the full result as JSON (stable keys; see README)')
    .option('--out <dir>', 'also write <image>.analysis.json, <image>.rings.csv and <image>.profile.csv into this folder')
    .option('--force', 'with --out, replace files of the same names')
    .option('--quiet', 'no progress lines on stderr')
    .addHelpText(
      'after',
      '\nd-spacings use the exact flat-detector geometry d = lambda / (2 sin(atan(R / L) / 2)).\n' +
        'Without --camera-sigma the camera length is taken as exact: calibrate on a standard film for real uncertainties.\n\n' +
        'Example:\n  annula analyze film.tif --voltage 200kV --camera-length 1m --pixel-size 14um --phase Au',
    )
    .action(async (imageArg: string, opts: AnalyzeOptions) => {
      const sample = await readSampleFolder(imageArg);
      const imagePath = sample ? sample.imagePath : imageArg;
      if (sample) {
        // The sample's recorded settings, unless the command line gives its own.
        opts.voltage ??= sample.camera.voltage;
        if (opts.scale === undefined) {
          opts.cameraLength ??= sample.camera.cameraLength;
          opts.pixelSize ??= sample.camera.pixelSize;
        }
      }
      const camera = readCameraFlags(opts, true);
      const cameraLengthPx = camera.cameraLengthPx!;
      const relSigma = opts.cameraSigma === undefined ? 0 : parseRelative(opts.cameraSigma, '--camera-sigma');
      const page = opts.page === undefined ? undefined : Number(opts.page);
      if (page !== undefined && !(Number.isInteger(page) && page >= 0)) throw new UsageError(`--page: "${opts.page}" is not a page number (0, 1, 2, ...)`);
      const notes: string[] = [];
      const library = collectPhases(opts.phases ?? [], notes);
      const phases: Phase[] = opts.phase ? opts.phase.map((p) => resolvePhaseArgument(p, library.filter((x) => x.origin !== 'library'))) : library;
      const polygons = opts.mask ? await readMask(opts.mask) : undefined;
      const start = opts.center ? readCenter(opts.center) : undefined;
      const stem = basename(imagePath, extname(imagePath));
      const outputs = opts.out ? ['analysis.json', 'rings.csv', 'profile.csv'].map((suffix) => join(opts.out!, `${stem}.${suffix}`)) : [];
      if (opts.out && !opts.force) await refuseExisting(outputs);

      // Threads for the pixel passes: they boot while the image is read (a pass that finds them
      // not ready yet runs here; the results never depend on it).
      const pool = processRowBandPool();
      const image = await readImageArgument(imagePath, page);
      const described = camera.described;
      const source =
        described && 'cameraLengthM' in described
          ? `nominal: camera length ${described.cameraLengthM} m, pixel ${described.pixelSizeM * 1e6} µm`
          : `nominal: reciprocal scale ${described && 'scalePerNmPerPx' in described ? described.scalePerNmPerPx : '?'} /nm per px`;
      const result = analyze(
        pool.share(image.raster),
        {
          camera: { voltageV: camera.voltageV, cameraLengthPx, cameraLengthSigmaPx: relSigma * cameraLengthPx, source, calibrated: false },
          image: { bitsPerSample: image.info.bitsPerSample, sampleFormat: image.info.sampleFormat },
          phases,
          ...(polygons ? { maskPolygons: polygons } : {}),
          ...(start ? { startFrame: { centerXPx: start.x, centerYPx: start.y, axisRatio: 1, angleDeg: 0 } } : {}),
          fitDistortion: opts.distortion,
          detectBeamStop: opts.beamStop,
        },
        stageReporter(io, opts.quiet ?? false),
        loadOpenCv(),
        { rowBands: pool },
      );
      // The documented key order: image (with the file's path and fingerprint) first, then the rest as analyze returns it.
      const { image: imageSummary, ...rest } = result;
      const output = {
        image: { path: imagePath, ...imageSummary, sha256: image.sha256 },
        ...rest,
        warnings: [...image.info.warnings, ...notes, ...result.warnings],
      };

      if (opts.out) {
        const rows = ringRows(result);
        await writeOutput(outputs[0]!, JSON.stringify(output, null, 2) + '\n', opts.force ?? false);
        await writeOutput(outputs[1]!, stringify(rows, { header: true, columns: rows.length ? Object.keys(rows[0]!) : ['ring'] }), opts.force ?? false);
        await writeOutput(
          outputs[2]!,
          stringify(
            result.profile.radiusPx.map((r, k) => ({ radiusPx: r, mean: result.profile.mean[k], background: result.profile.background[k] })),
            { header: true, columns: ['radiusPx', 'mean', 'background'] },
          ),
          opts.force ?? false,
        );
      }
      if (opts.json) printJson(io, output);
      else printReadable(io, output, result);
      if (opts.out && !opts.json) io.out(`\nwrote ${outputs.join(', ')}`);

      if (result.status !== 'ok') throw new NothingFoundError(`no rings found in ${imagePath}: ${result.warnings.filter((w) => /^no (rings|pattern)/.test(w)).join('; ') || 'see the warnings'}`);
      if (!result.conclusion.conclusive) throw new NothingFoundError(`rings measured, but no convincing answer: ${result.conclusion.reason}`);
    });
}

function printReadable(io: CliIo, output: { image: { path: string }; warnings: string[] }, r: AnalysisResult): void {
  io.out(`${output.image.path}: ${r.image.width} x ${r.image.height}, ${r.image.bitsPerSample} bit; ${kilovolts(r.voltageV)} kV, lambda = ${fixed(r.wavelengthA * 100, 4)} pm; camera length ${fixed(r.camera.cameraLengthPx, 1)} px (${r.camera.source})`);
  if (r.status === 'no-geometry' && !Number.isFinite(r.center.xPx)) {
    io.out('No pattern centre could be found.');
  } else {
    io.out(`Centre (${withUncertainty(r.center.xPx, r.center.sigmaXPx)}, ${withUncertainty(r.center.yPx, r.center.sigmaYPx)}) px; distortion q = ${withUncertainty(r.distortion.axisRatio, r.distortion.axisRatioSigma)}, major axis at ${r.distortion.angleSigmaDeg === null ? 'undetermined angle' : `${withUncertainty(r.distortion.angleDeg, r.distortion.angleSigmaDeg)} deg`}`);
    io.out(`Masked: ${(r.masks.excludedFraction * 100).toFixed(1)}% of pixels (${r.masks.saturatedPixels} saturated, ${r.masks.hotPixels} hot, beam stop ${r.masks.beamStopFound ? 'found' : 'not found'})`);
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
    printCandidates(io, r.rings.length, { candidates: r.candidates, ambiguities: r.ambiguities, secondPhase: r.secondPhase, conclusion: r.conclusion, notes: r.notes });
  }
  for (const w of output.warnings) io.out(`Warning: ${w}`);
  printCaution(io);
}
