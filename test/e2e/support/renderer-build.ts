import { existsSync } from 'node:fs';
import { resolve } from 'node:path';

/** The e2e tests run against the built renderer: npm test builds it first (npm run build:renderer). */
export function assertRendererBuilt(): void {
  const index = resolve(import.meta.dirname, '..', '..', '..', 'out', 'renderer', 'index.html');
  if (!existsSync(index)) throw new Error(`${index} is missing: run npm run build:renderer before the browser tests`);
}
