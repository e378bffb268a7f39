import type { Command } from 'commander';
import { parseQuantity } from '../../common/quantity';
import { calibrationDrift, LabStoreError, sameCalibrationSetting, type CalibrationDrift, type CalibrationRecord } from '../../node/store';
import { openStoreForCommand, STORE_OPTION_HELP } from '../store-access';
import { printJson, type CliIo } from '../cli-io';
import { InputError, UsageError } from '../exit-codes';
import { fixed, kilovolts } from '../number-format';
import { formatTable } from '../terminal-table';

interface CalibrationsOptions {
  instrument?: string;
  voltage?: string;
  store?: string;
  json?: boolean;
}

/** "71428.3 ± 5.2": the value to the uncertainty's second significant digit. */
function plusMinus(value: number, sigma: number | null): string {
  if (sigma === null || !Number.isFinite(sigma) || sigma <= 0) return value.toPrecision(6);
  const decimals = Math.max(0, Math.min(8, 1 - Math.floor(Math.log10(sigma))));
  return `${value.toFixed(decimals)} ± ${sigma.toFixed(decimals)}`;
}

function signedPercent(fraction: number): string {
  return `${fraction >= 0 ? '+' : '-'}${Math.abs(fraction * 100).toFixed(2)}%`;
}

/** Each calibration with the drift check against the one before it at the same setting (oldest first). */
function withDrift(all: CalibrationRecord[]): Array<{ calibration: CalibrationRecord; drift: CalibrationDrift | null }> {
  return all.map((calibration, i) => {
    let previous: CalibrationRecord | null = null;
    for (let j = i - 1; j >= 0; j--) {
      if (sameCalibrationSetting(all[j]!, calibration)) {
        previous = all[j]!;
        break;
      }
    }
    return { calibration, drift: previous ? calibrationDrift(previous, calibration) : null };
  });
}

/** `annula calibrations`: the camera calibrations saved in the lab store, with the drift check. */
export function registerCalibrations(program: Command, io: CliIo): void {
  program
    .command('calibrations')
    .description('list the camera calibrations saved in the lab store, flagging possible drift between calibrations at the same setting')
    .option('--instrument <name>', 'only calibrations of this instrument (case ignored)')
    .option('--voltage <value>', 'only calibrations at this accelerating voltage, e.g. 200kV')
    .option('--store <file>', STORE_OPTION_HELP)
    .option('--json', 'print JSON: an array of calibration records, oldest first, each with "drift" (null, or { previousName, relativeChange, flagged, ... })')
    .addHelpText(
      'after',
      '\nA calibration whose camera length differs by more than 1% from the previous one for the same\n' +
        'instrument, voltage, nominal camera length and pixel size is flagged as possible drift.\n\n' +
        'Example:\n  annula calibrations --instrument "TEM-2 north bay" --voltage 200kV',
    )
    .action(async (opts: CalibrationsOptions) => {
      const voltageV = opts.voltage === undefined ? undefined : parseQuantity(opts.voltage, 'voltage', '--voltage');
      if (opts.instrument !== undefined && opts.instrument.trim() === '') throw new UsageError('--instrument needs a name, e.g. --instrument "TEM-2 north bay"');
      const { store, location } = await openStoreForCommand(opts.store, { create: false, io });
      if (store === null) {
        if (opts.json) printJson(io, []);
        else io.out(`No calibrations yet: there is no lab store at ${location.path}. Calibrations are saved there by annula calibrate --save <name>.`);
        return;
      }
      let rows;
      try {
        // The drift check looks at every calibration of a setting, so filter after it.
        const all = withDrift(await store.listCalibrations());
        const wanted = await store.listCalibrations({ ...(opts.instrument !== undefined ? { instrument: opts.instrument } : {}), ...(voltageV !== undefined ? { voltageV } : {}) });
        const names = new Set(wanted.map((c) => c.name));
        rows = all.filter((r) => names.has(r.calibration.name));
      } catch (error) {
        if (error instanceof LabStoreError) throw new InputError(error.message);
        throw error;
      } finally {
        await store.close();
      }
      if (opts.json) {
        printJson(io, rows.map((r) => ({ ...r.calibration, drift: r.drift })));
        return;
      }
      if (rows.length === 0) {
        const filters = [opts.instrument !== undefined ? `instrument "${opts.instrument}"` : '', voltageV !== undefined ? `${kilovolts(voltageV)} kV` : ''].filter(Boolean);
        io.out(`No calibrations${filters.length ? ` for ${filters.join(' at ')}` : ''} in ${location.path}.`);
        return;
      }
      io.out(
        formatTable(
          ['name', 'instrument', 'kV', 'nominal L (m)', 'L/p (px)', 'axis ratio', 'date', 'standard', 'drift'],
          rows.map(({ calibration: c, drift }) => [
            c.name,
            c.instrument ?? '-',
            kilovolts(c.voltageV),
            fixed(c.nominalCameraLengthM, 3),
            plusMinus(c.cameraLengthPx, c.cameraLengthSigmaPx),
            plusMinus(c.axisRatio, c.axisRatioSigma),
            c.created.slice(0, 10),
            c.standardPhaseId,
            drift === null ? '' : `${signedPercent(drift.relativeChange)}${drift.flagged ? ' POSSIBLE DRIFT' : ''}`,
          ]),
          ['left', 'left', 'right', 'right', 'right', 'right', 'left', 'left', 'left'],
        ),
      );
      io.out(`${rows.length} calibration${rows.length === 1 ? '' : 's'} in ${location.path}. Drift: change of L/p from the previous calibration at the same setting.`);
      for (const { calibration, drift } of rows) {
        if (drift?.flagged) io.err(`warning: "${calibration.name}": ${drift.message}`);
      }
    });
}
