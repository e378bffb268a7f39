import { basename, extname } from 'node:path';
import type { Command } from 'commander';
import { formatHkl, type Phase } from '../../../core/crystal';
import { encodeTiff } from '../../../core/image/encode-tiff';
import {
  amorphousCarbonHalos,
  resolveSimulationSpec,
  simulatePattern,
  simulationDescription,
  type SimulatedPhase,
  type SimulationSpec,
} from '../../../core/simulate';
import { refuseExisting, writeOutput } from '../output-files';
import { addCameraOptions, readCameraFlags, type CameraFlags } from '../camera-options';
import { printJson, type CliIo } from '../cli-io';
import { UsageError } from '../exit-codes';
import { fixed, kilovolts } from '../number-format';
import { collectPhases, resolvePhaseArgument } from '../phase-sources';
import { formatTable } from '../terminal-table';

interface SimulateOptions extends CameraFlags {
  phase?: string[];
  phases?: string[];
  out: string;
  size: string;
  width?: string;
  height?: string;
  center?: string;
  axisRatio: string;
  axisAngle: string;
  ringFwhm: string;
  eta: string;
  peakCounts: string;
  background?: string;
  supportHalo: string;
  beamStop: boolean;
  stopRadius?: string;
  stemAngle: string;
  directBeam: boolean;
  texture: string;
  textureAngle: string;
  grains?: string;
  hotPixels: string;
  gain: string;
  offset: string;
  readNoise: string;
  noise: boolean;
  float32?: boolean;
  supersampling: string;
  latticeScale: string;
  seed: string;
  scenario?: string;
  force?: boolean;
  json?: boolean;
}

interface NumberRule {
  min?: number;
  /** min is exclusive. */
  above?: number;
  max?: number;
  integer?: boolean;
  /** A suffix the value may carry: "px" or "deg". */
  unit?: 'px' | 'deg';
  example: string;
}

/** A plain number from the command line (with an optional px or deg suffix). @throws UsageError naming the flag */
function readNumber(text: string, flag: string, rule: NumberRule): number {
  const t = text.trim();
  const suffix = rule.unit ? new RegExp(`\\s*${rule.unit === 'deg' ? '(deg|°)' : 'px'}$`) : null;
  const bare = suffix ? t.replace(suffix, '') : t;
  const unitWord = rule.unit === 'px' ? ' (in px)' : rule.unit === 'deg' ? ' (in degrees)' : '';
  const v = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(bare) ? Number(bare) : NaN;
  if (!Number.isFinite(v)) throw new UsageError(`${flag}: "${text}" is not a number${unitWord}; e.g. ${flag} ${rule.example}`);
  if (rule.integer && !Number.isInteger(v)) throw new UsageError(`${flag}: "${text}" must be a whole number; e.g. ${flag} ${rule.example}`);
  if (rule.above !== undefined && !(v > rule.above)) throw new UsageError(`${flag}: ${text} must be > ${rule.above}; e.g. ${flag} ${rule.example}`);
  if (rule.min !== undefined && v < rule.min) throw new UsageError(`${flag}: ${text} must be >= ${rule.min}; e.g. ${flag} ${rule.example}`);
  if (rule.max !== undefined && v > rule.max) throw new UsageError(`${flag}: ${text} must be <= ${rule.max}; e.g. ${flag} ${rule.example}`);
  return v;
}

/** "x,y" in px (either may be negative: the centre may lie outside the image). */
function readPoint(text: string, flag: string): { x: number; y: number } {
  const parts = text.split(',');
  if (parts.length !== 2) throw new UsageError(`${flag}: "${text}" is not x,y in px; e.g. ${flag} 1023.5,1010.2`);
  return {
    x: readNumber(parts[0]!, `${flag} (x)`, { unit: 'px', example: '1023.5,1010.2' }),
    y: readNumber(parts[1]!, `${flag} (y)`, { unit: 'px', example: '1023.5,1010.2' }),
  };
}

/** "ID" or "ID:WEIGHT" (the weight after the last colon, when it is a number). */
function readPhaseWeight(text: string): { name: string; weight: number } {
  const colon = text.lastIndexOf(':');
  const tail = colon >= 0 ? text.slice(colon + 1) : '';
  if (colon > 0 && /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(tail.trim())) {
    return { name: text.slice(0, colon), weight: readNumber(tail, `--phase ${text.slice(0, colon)} (weight)`, { above: 0, example: 'Si:0.3' }) };
  }
  return { name: text, weight: 1 };
}

/** The truth file beside an image: "film.tif" -> "film.truth.json". */
export function truthPathFor(imagePath: string): string {
  return imagePath.slice(0, imagePath.length - extname(imagePath).length) + '.truth.json';
}

/**
 * Prints "annula simulate: 40%" lines (each tenth once) on stderr, from the first report
 * more than one second after the start; quicker runs print nothing.
 * @param now clock in ms (injected by tests)
 */
export function progressReporter(io: CliIo, now: () => number = Date.now): (fraction: number) => void {
  const started = now();
  let lastTenth = -1;
  return (fraction) => {
    if (now() - started < 1000) return;
    const tenth = Math.floor(fraction * 10);
    if (tenth <= lastTenth) return;
    lastTenth = tenth;
    io.err(`annula simulate: ${tenth * 10}%`);
  };
}

/** `annula simulate`: a simulated ring pattern as a 16-bit TIFF, with its truth beside it. */
export function registerSimulate(program: Command, io: CliIo): void {
  const collect = (value: string, list: string[] | undefined): string[] => [...(list ?? []), value];
  addCameraOptions(
    program
      .command('simulate')
      .description('simulate a ring pattern of a polycrystalline film: a 16-bit TIFF and a truth JSON beside it'),
    true,
  )
    .option('--phase <id[:weight]>', 'a phase of the film (library id, or a .cif/.json file); repeat for a mixture, weight = height of its strongest ring relative to the others (e.g. --phase Au --phase Si:0.3)', collect)
    .option('--phases <files...>', 'add phases from CIF or JSON files so --phase can name them')
    .requiredOption('--out <file.tif>', 'image to write (.tif or .tiff); the truth goes to <name>.truth.json beside it')
    .option('--size <px>', 'detector width and height, px', '2048')
    .option('--width <px>', 'detector width, px (instead of --size)')
    .option('--height <px>', 'detector height, px (instead of --size)')
    .option('--center <x,y>', 'pattern centre in px, may lie outside the image (default: the image centre)')
    .option('--axis-ratio <q>', 'elliptical distortion, major/minor axis >= 1', '1')
    .option('--axis-angle <deg>', 'major-axis direction, degrees from +x toward +y', '0')
    .option('--ring-fwhm <px>', 'ring width (FWHM in corrected radius), px', '3')
    .option('--eta <fraction>', 'Lorentzian fraction of the pseudo-Voigt ring shape, 0 to 1', '0.5')
    .option('--peak-counts <electrons>', 'height of the strongest ring above the background, electrons per pixel', '1000')
    .option('--background <electrons>', 'diffuse background under the strongest ring, electrons per pixel; 0 for none (default: peak counts / 5)')
    .option('--support-halo <electrons>', 'height of the amorphous carbon support film halos (2.1 Å; the 1.2 Å halo at half), electrons per pixel', '0')
    .option('--no-beam-stop', 'leave out the beam stop')
    .option('--stop-radius <px>', 'beam stop disc radius, px (default: 4% of the smaller side)')
    .option('--stem-angle <deg>', 'direction of the beam stop stem, degrees from +x toward +y', '90')
    .option('--no-direct-beam', 'leave out the direct beam')
    .option('--texture <amplitude>', 'texture: ring intensity 1 + A cos(2 (azimuth - angle)), A from 0 to 1', '0')
    .option('--texture-angle <deg>', 'azimuth of the texture maxima, degrees from +x toward +y', '0')
    .option('--grains <n>', 'grains diffracting into each ring (spotty rings); default smooth rings')
    .option('--hot-pixels <n>', 'number of hot pixels', '0')
    .option('--gain <adu-per-electron>', 'detector gain, ADU per electron', '1')
    .option('--offset <adu>', 'detector offset, ADU', '100')
    .option('--read-noise <adu>', 'Gaussian read noise, ADU', '2')
    .option('--no-noise', 'no shot or read noise: the expected values (still rounded to 16 bits unless --float32)')
    .option('--float32', 'write 32-bit float samples, unrounded and unclipped')
    .option('--supersampling <n>', 'samples per pixel side for the pixel-area integral, 1 to 16', '3')
    .option('--lattice-scale <factor>', 'isotropic strain: every cell length (and d) times this', '1')
    .option('--seed <n>', 'seed of every random draw, 0 to 4294967295', '1')
    .option('--scenario <text>', 'the invented scenario the image stands for, kept in the truth')
    .option('--force', 'replace the image and truth files if they exist')
    .option('--json', 'print the truth JSON (as written to the truth file)')
    .addHelpText(
      'after',
      '\nRings: kinematic intensities of a random polycrystal at the exact flat-detector radius\n' +
        'R = L tan(2 asin(lambda / 2d)), pseudo-Voigt in the corrected (area-preserving) radius.\n' +
        'Then diffuse background, halos, direct beam, beam stop, Poisson noise on the electron counts,\n' +
        'gain, read noise, offset, rounding and clipping to 0..65535.\n\n' +
        'Example:\n  annula simulate --phase Au --voltage 200kV --camera-length 1m --pixel-size 14um --size 2048 --out gold.tif',
    )
    .action(async (opts: SimulateOptions) => {
      const camera = readCameraFlags(opts, true);
      if (!opts.phase || opts.phase.length === 0) throw new UsageError('name at least one phase, e.g. --phase Au (or --phase Au --phase Si:0.3 for a mixture)');
      const ext = extname(opts.out).toLowerCase();
      if (ext !== '.tif' && ext !== '.tiff') throw new UsageError(`--out: "${opts.out}" must end in .tif or .tiff; e.g. --out gold.tif`);
      const truthPath = truthPathFor(opts.out);

      const side = (flag: string, text: string): number => readNumber(text, flag, { integer: true, min: 1, max: 16384, unit: 'px', example: '2048' });
      const size = side('--size', opts.size);
      const widthPx = opts.width === undefined ? size : side('--width', opts.width);
      const heightPx = opts.height === undefined ? size : side('--height', opts.height);
      const center = opts.center === undefined ? { x: (widthPx - 1) / 2, y: (heightPx - 1) / 2 } : readPoint(opts.center, '--center');
      const notes: string[] = [];
      const extra = opts.phases ? collectPhases(opts.phases, notes).filter((p) => p.origin !== 'library') : [];
      const latticeScale = readNumber(opts.latticeScale, '--lattice-scale', { above: 0, example: '1.002' });
      const textureAmplitude = readNumber(opts.texture, '--texture', { min: 0, max: 1, example: '0.4' });
      const grains = opts.grains === undefined ? null : readNumber(opts.grains, '--grains', { integer: true, min: 1, max: 1_000_000, example: '200' });
      const phases: SimulatedPhase[] = opts.phase.map((text) => {
        const { name, weight } = readPhaseWeight(text);
        const phase: Phase = resolvePhaseArgument(name, extra);
        return {
          phase,
          weight,
          latticeScale,
          texture: textureAmplitude > 0 ? { shape: 'cosine', amplitude: textureAmplitude, azimuthDeg: readNumber(opts.textureAngle, '--texture-angle', { unit: 'deg', example: '30' }) } : null,
          grainsPerRing: grains,
        };
      });
      const peakCounts = readNumber(opts.peakCounts, '--peak-counts', { above: 0, example: '1000' });
      const backgroundCounts = opts.background === undefined ? peakCounts / 5 : readNumber(opts.background, '--background', { min: 0, example: '200' });
      const haloCounts = readNumber(opts.supportHalo, '--support-halo', { min: 0, example: '150' });
      const hotPixelCount = readNumber(opts.hotPixels, '--hot-pixels', { integer: true, min: 0, example: '10' });
      const spec: SimulationSpec = {
        widthPx,
        heightPx,
        voltageV: camera.voltageV,
        cameraLengthPx: camera.cameraLengthPx!,
        frame: {
          centerXPx: center.x,
          centerYPx: center.y,
          axisRatio: readNumber(opts.axisRatio, '--axis-ratio', { min: 1, example: '1.02' }),
          angleDeg: readNumber(opts.axisAngle, '--axis-angle', { unit: 'deg', example: '35' }),
        },
        phases,
        peakCounts,
        ringFwhmPx: readNumber(opts.ringFwhm, '--ring-fwhm', { min: 0.5, unit: 'px', example: '3' }),
        ringEta: readNumber(opts.eta, '--eta', { min: 0, max: 1, example: '0.5' }),
        background: backgroundCounts > 0 ? { levelCounts: backgroundCounts } : null,
        halos: haloCounts > 0 ? amorphousCarbonHalos(haloCounts) : [],
        directBeam: opts.directBeam ? {} : null,
        beamStop: opts.beamStop
          ? {
              ...(opts.stopRadius === undefined ? {} : { radiusPx: readNumber(opts.stopRadius, '--stop-radius', { above: 0, unit: 'px', example: '60' }) }),
              stemAngleDeg: readNumber(opts.stemAngle, '--stem-angle', { unit: 'deg', example: '90' }),
            }
          : null,
        hotPixels: hotPixelCount > 0 ? { count: hotPixelCount } : null,
        detector: {
          gainAduPerElectron: readNumber(opts.gain, '--gain', { above: 0, example: '1' }),
          offsetAdu: readNumber(opts.offset, '--offset', { min: 0, example: '100' }),
          readNoiseAdu: readNumber(opts.readNoise, '--read-noise', { min: 0, example: '2' }),
        },
        noise: opts.noise,
        output: opts.float32 ? 'float32' : 'uint16',
        supersampling: readNumber(opts.supersampling, '--supersampling', { integer: true, min: 1, max: 16, example: '3' }),
        seed: readNumber(opts.seed, '--seed', { integer: true, min: 0, max: 4294967295, example: '7' }),
        ...(opts.scenario === undefined ? {} : { scenario: opts.scenario }),
      };
      try {
        resolveSimulationSpec(spec);
      } catch (error) {
        if (error instanceof RangeError || error instanceof TypeError) throw new UsageError(`${error.message}; check the options (annula simulate --help)`);
        throw error;
      }
      const overwrite = opts.force === true;
      if (!overwrite) await refuseExisting([opts.out, truthPath]);

      const { raster, truth } = simulatePattern(spec, { onProgress: progressReporter(io) });
      const described = camera.described;
      const tiff = encodeTiff(raster, {
        sampleFormat: truth.image.sampleFormat,
        description: simulationDescription(truth, basename(truthPath)),
        software: 'annula simulate',
        // Lossless deflate with the horizontal predictor: about a third of the raw size for these images.
        compression: 'deflate',
        ...(described && 'pixelSizeM' in described ? { resolution: { xPerUnit: 0.01 / described.pixelSizeM, yPerUnit: 0.01 / described.pixelSizeM, unit: 'cm' as const } } : {}),
      });
      const truthText = JSON.stringify(truth, null, 2) + '\n';
      await writeOutput(opts.out, tiff, overwrite);
      await writeOutput(truthPath, truthText, overwrite);

      if (opts.json) {
        printJson(io, truth);
      } else {
        io.out(
          `${widthPx} x ${heightPx} px, ${truth.phases.map((p) => `${p.id}${p.weight !== 1 ? `:${p.weight}` : ''}`).join(' + ')}, ${kilovolts(truth.voltageV)} kV, ` +
            `camera length ${fixed(truth.cameraLengthPx, 1)} px, centre (${fixed(truth.frame.centerXPx, 2)}, ${fixed(truth.frame.centerYPx, 2)}), seed ${truth.seed}`,
        );
        io.out(
          formatTable(
            ['phase', 'hkl', 'd (Å)', 'R (px)', 'peak (e/px)', 'background (e/px)', 'visible'],
            truth.rings.map((r) => [
              r.phaseId,
              r.families.map(formatHkl).join(' + '),
              fixed(r.dA, 4),
              fixed(r.radiusPx, 3),
              fixed(r.peakCounts, 1),
              fixed(r.backgroundCounts, 1),
              `${Math.round(100 * r.visibleFraction)}%`,
            ]),
            ['left', 'left', 'right', 'right', 'right', 'right', 'right'],
          ),
        );
        io.out(`saturated pixels: ${truth.saturated.pixelCount}; hot pixels: ${truth.hotPixels.length}`);
        io.out(`wrote ${opts.out} and ${truthPath}`);
      }
      for (const n of [...notes, ...truth.notes]) io.err(`note: ${n}`);
    });
}
