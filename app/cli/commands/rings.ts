import type { Command } from 'commander';
import { formatHkl, predictRings } from '../../../core/crystal';
import { UsageError } from '../exit-codes';
import { reciprocalScalePerNmPerPx, ringRadiusPx } from '../../../core/physics';
import { parseLengthWithDefault } from '../../common/quantity';
import { addCameraOptions, readCameraFlags, type CameraFlags } from '../camera-options';
import { printJson, type CliIo } from '../cli-io';
import { collectPhases, resolvePhaseArgument } from '../phase-sources';
import { fixed, kilovolts } from '../number-format';
import { formatTable } from '../terminal-table';

/** Smallest d with tabulated scattering factors: s = 1/(2d) <= 2 1/Å. */
const MIN_D_A = 0.25;

interface RingsOptions extends CameraFlags {
  dMin: string;
  phases?: string[];
  json?: boolean;
}

/** `annula rings <phase>`: the rings a random polycrystal of the phase shows, with radii when a camera is given. */
export function registerRings(program: Command, io: CliIo): void {
  addCameraOptions(
    program
      .command('rings')
      .argument('<phase>', 'library phase id or name (see annula phases), or a .cif / .json phase file')
      .description('predicted rings of a phase: hkl, multiplicity, d, 1/d, kinematic intensity and radius on the detector'),
    false,
  )
    .option('--d-min <length>', 'smallest d to list (plain numbers are Å)', '0.8')
    .option('--phases <files...>', 'add phases from CIF or JSON files so <phase> can name them')
    .option('--json', 'print JSON: phase, voltageV, wavelengthA, cameraLengthPx, rings[] (hkl, families, multiplicity, dA, inverseDPerA, relativeIntensity, radiusPx)')
    .addHelpText(
      'after',
      '\nIntensities are kinematic (electron scattering factors, Debye-Waller B), for a random polycrystal:\n' +
        'the azimuthally averaged profile height, sum of m |F|^2 d^2, scaled so the strongest ring is 100.\n' +
        'Texture, thickness (dynamical scattering) and the detector response change observed intensities.\n' +
        'Radii use the exact flat-detector geometry R = L tan(2 asin(lambda / 2d)).\n\n' +
        'Example:\n  annula rings Au --voltage 200kV --camera-length 1m --pixel-size 14um',
    )
    .action((phaseArg: string, opts: RingsOptions) => {
      const camera = readCameraFlags(opts, false);
      const dMinA = parseLengthWithDefault(opts.dMin, 'angstrom', '--d-min') / 1e-10;
      if (dMinA < MIN_D_A) {
        throw new UsageError(`--d-min: ${opts.dMin} is below ${MIN_D_A} Å, where the electron scattering factors (tabulated to sin(theta)/lambda = 2 1/Å) end; give --d-min ${MIN_D_A} or more`);
      }
      const notes: string[] = [];
      const extra = opts.phases ? collectPhases(opts.phases, notes).filter((p) => p.origin !== 'library') : [];
      const phase = resolvePhaseArgument(phaseArg, extra);
      const geometry = camera.cameraLengthPx === null ? null : { wavelengthA: camera.wavelengthA, cameraLengthPx: camera.cameraLengthPx };
      const rings = predictRings(phase, { dMinA }).map((r) => {
        let radiusPx: number | null = null;
        if (geometry) {
          try {
            radiusPx = ringRadiusPx(r.dA, geometry);
          } catch {
            radiusPx = null; // beyond 90 degrees: not on a flat detector
          }
        }
        return {
          hkl: r.families[0]!.hkl,
          families: r.families.map((f) => f.hkl),
          multiplicity: r.multiplicity,
          dA: r.dA,
          inverseDPerA: 1 / r.dA,
          relativeIntensity: r.relativeIntensity,
          radiusPx,
        };
      });
      const result = {
        phase: { id: phase.id, name: phase.name, formula: phase.formula, spaceGroup: phase.spaceGroup, cell: phase.cell, source: phase.source },
        voltageV: camera.voltageV,
        wavelengthA: camera.wavelengthA,
        cameraLengthPx: camera.cameraLengthPx,
        reciprocalScalePerNmPerPx: geometry ? reciprocalScalePerNmPerPx(geometry) : null,
        dMinA,
        rings,
      };
      if (opts.json) {
        printJson(io, result);
        return;
      }
      const cameraText = geometry ? `, camera length ${fixed(geometry.cameraLengthPx, 1)} px` : '';
      io.out(`${phase.id} (${phase.name}), ${phase.spaceGroup}, a = ${phase.cell.aA} Å; ${kilovolts(camera.voltageV)} kV, lambda = ${fixed(camera.wavelengthA * 100, 4)} pm${cameraText}`);
      io.out(
        formatTable(
          ['#', 'hkl', 'm', 'd (Å)', '1/d (1/Å)', 'I rel', ...(geometry ? ['R (px)'] : [])],
          rings.map((r, i) => [
            String(i + 1),
            r.families.map(formatHkl).join(' + '),
            String(r.multiplicity),
            fixed(r.dA, 4),
            fixed(r.inverseDPerA, 4),
            fixed(r.relativeIntensity, 1),
            ...(geometry ? [fixed(r.radiusPx, 2)] : []),
          ]),
          ['right', 'left', 'right', 'right', 'right', 'right', 'right'],
        ),
      );
      for (const n of notes) io.err(`note: ${n}`);
    });
}
