/**
 * The `annula` command line. `main(argv, io)` returns the exit code instead of
 * exiting, so tests run commands in-process; bin/annula.js sets process.exitCode.
 */
import { Command, CommanderError } from 'commander';
import { QuantityError } from '../common/quantity';
import { processIo, type CliIo } from './cli-io';
import { EXIT, InputError, NothingFoundError, UsageError } from './exit-codes';
import { registerAnalyze } from './commands/analyze';
import { registerCalibrate } from './commands/calibrate';
import { registerCalibrations } from './commands/calibrations';
import { CheckExit, registerCheck } from './commands/check';
import { registerHistory } from './commands/history';
import { registerIndex } from './commands/index-rings';
import { registerPhases } from './commands/phases';
import { registerRings } from './commands/rings';
import { registerServe } from './commands/serve';
import { registerSimulate } from './commands/simulate';
import { registerWavelength } from './commands/wavelength';

const EXIT_CODE_HELP = `
Exit codes:
  0  done (for check: the film passed)
  1  internal error in Annula (please report it)
  2  command-line mistake: unknown option, missing or malformed value, wrong unit
  3  an input file is missing, unreadable or invalid
  4  nothing found: no rings in the image, or no lattice explains the rings
  5  check: the film failed
  6  check: inconclusive
  For a batch check the worst: 3 when an image could not be checked, else 5 before 6 before 0.`;

function buildProgram(io: CliIo): Command {
  const program = new Command('annula')
    .description('Phase and lattice constant, with an honest uncertainty, from electron-diffraction ring patterns.')
    .version('0.1.0', '--version', 'print the version')
    .helpOption('-h, --help', 'show help for annula or for a command')
    .showHelpAfterError('(add --help for usage)')
    .addHelpText('after', EXIT_CODE_HELP)
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.out(s.replace(/\n$/, '')),
      writeErr: (s) => io.err(s.replace(/\n$/, '')),
      outputError: (s, write) => write(`annula: ${s.replace(/^error: /, '')}`),
    });
  registerWavelength(program, io);
  registerPhases(program, io);
  registerRings(program, io);
  registerIndex(program, io);
  registerAnalyze(program, io);
  registerSimulate(program, io);
  registerCalibrate(program, io);
  registerCalibrations(program, io);
  registerCheck(program, io);
  registerHistory(program, io);
  registerServe(program, io);
  for (const sub of program.commands) {
    sub.exitOverride().showHelpAfterError(`(run annula ${sub.name()} --help for usage)`);
    sub.configureOutput(program.configureOutput());
  }
  return program;
}

/** Runs the CLI on `argv` (without node and script) and returns the exit code. */
export async function main(argv: string[], io: CliIo = processIo): Promise<number> {
  const program = buildProgram(io);
  if (argv.length === 0) {
    io.out(program.helpInformation());
    return EXIT.ok;
  }
  try {
    await program.parseAsync(argv, { from: 'user' });
    return EXIT.ok;
  } catch (error) {
    return reportError(error, io);
  }
}

function reportError(error: unknown, io: CliIo): number {
  if (error instanceof CheckExit) return error.exitCode; // the verdict was printed
  if (error instanceof CommanderError) {
    // commander has already printed its message (help, version, or the mistake).
    const quiet = ['commander.helpDisplayed', 'commander.help', 'commander.version'];
    return quiet.includes(error.code) ? EXIT.ok : EXIT.usage;
  }
  if (error instanceof QuantityError || error instanceof UsageError) {
    io.err(`annula: ${error.message}`);
    return EXIT.usage;
  }
  if (error instanceof InputError) {
    io.err(`annula: ${error.message}`);
    return EXIT.input;
  }
  if (error instanceof NothingFoundError) {
    io.err(`annula: ${error.message}`);
    return EXIT.nothingFound;
  }
  const message = error instanceof Error ? error.message : String(error);
  io.err(`annula: internal error: ${message}`);
  io.err('This is a defect in Annula; please report it with the command you ran.');
  if (process.env.ANNULA_DEBUG === '1' && error instanceof Error && error.stack) io.err(error.stack);
  return EXIT.internal;
}
