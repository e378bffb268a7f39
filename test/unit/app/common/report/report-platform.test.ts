/**
 * app/common/report is shared by every surface, the browser renderer included:
 * it must use no Node API (no node: imports, fs, path, process, Buffer) and no
 * DOM. The compiler's settings for app/ allow Node typings, so this test reads
 * the sources and holds the line.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const folder = join(dirname(fileURLToPath(import.meta.url)), '../../../../../app/common/report');
const sources = readdirSync(folder).filter((f) => f.endsWith('.ts'));

describe('app/common/report', () => {
  it.each(sources)('%s imports no Node module and uses no Node or DOM global', (file) => {
    const text = readFileSync(join(folder, file), 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
    const imports = [...text.matchAll(/from\s+'([^']+)'/g)].map((m) => m[1]!);
    for (const spec of imports) {
      expect(spec.startsWith('.') || ['pdf-lib', 'fast-png'].includes(spec), `${file} imports ${spec}`).toBe(true);
      if (spec.startsWith('../')) expect(spec, `${file} reaches outside app/common and core/`).toMatch(/^\.\.\/\.\.\/\.\.\/core\//);
    }
    expect(text).not.toMatch(/\b(require\s*\(|process\.|Buffer\b|window\.|document\.)/);
  });
});
