import type { Command } from 'commander';
import { electronBeam } from '../../../core/physics';
import { parseQuantity } from '../../common/quantity';
import { printJson, type CliIo } from '../cli-io';
import { formatTable } from '../terminal-table';
import { kilovolts } from '../number-format';

interface WavelengthOptions {
  voltage: string;
  json?: boolean;
}

/** `annula wavelength`: the relativistic electron wavelength and beam kinematics at one voltage. */
export function registerWavelength(program: Command, io: CliIo): void {
  program
    .command('wavelength')
    .description('relativistic electron wavelength, gamma and v/c at an accelerating voltage')
    .requiredOption('--voltage <value>', 'accelerating voltage with its unit, e.g. 200kV')
    .option('--json', 'print JSON: voltageV, wavelengthA, wavelengthPm, gamma, betaVOverC, ewaldRadiusPerA')
    .addHelpText('after', '\nConstants: CODATA 2018. Example:\n  annula wavelength --voltage 300kV --json')
    .action((opts: WavelengthOptions) => {
      const beam = electronBeam(parseQuantity(opts.voltage, 'voltage', '--voltage'));
      if (opts.json) {
        printJson(io, beam);
        return;
      }
      io.out(`Electron beam at ${kilovolts(beam.voltageV)} kV (CODATA 2018 constants)`);
      io.out(
        formatTable(
          ['quantity', 'value', 'unit'],
          [
            ['wavelength', beam.wavelengthPm.toFixed(5), 'pm'],
            ['wavelength', beam.wavelengthA.toFixed(7), 'Å'],
            ['gamma', beam.gamma.toFixed(6), ''],
            ['v/c', beam.betaVOverC.toFixed(6), ''],
            ['Ewald radius 1/lambda', beam.ewaldRadiusPerA.toFixed(4), '1/Å'],
          ],
          ['left', 'right', 'left'],
        ),
      );
    });
}
