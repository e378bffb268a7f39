/** Where the built renderer and the bundled samples are, from this file's place in the repository. */
import { fileURLToPath } from 'node:url';
import { resolve } from 'node:path';

const repositoryRoot = resolve(fileURLToPath(new URL('.', import.meta.url)), '..', '..');

export const DEFAULT_RENDERER_DIR = resolve(repositoryRoot, 'out', 'renderer');
export const DEFAULT_SAMPLES_DIR = resolve(repositoryRoot, 'samples');
