// Entry of a RowBandPool thread: worker threads do not inherit the TypeScript loader
// that runs the CLI and the tests, so each registers tsx itself, then loads the worker.
import { register } from 'tsx/esm/api';

register();
await import('./row-band-worker.ts');
