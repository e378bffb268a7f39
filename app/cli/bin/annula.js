#!/usr/bin/env node
// Entry point of the `annula` command. It loads the TypeScript sources through
// tsx, so the CLI runs from a fresh clone with no build step.
import { register } from 'tsx/esm/api';

// A reader that stops early (`annula phases | head`) is not an error.
process.stdout.on('error', (e) => {
  if (e.code === 'EPIPE') process.exit(0);
  throw e;
});

register();
const { main } = await import('../main.ts');
process.exitCode = await main(process.argv.slice(2));
