#!/usr/bin/env node
// Entry point of the `annula` command. It loads the TypeScript sources through
// tsx, so the CLI runs from a fresh clone with no build step.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../main.ts');
process.exitCode = await main(process.argv.slice(2));
