/**
 * Runs a Python snippet with Debian's /usr/bin/python3 (where python3-scipy and
 * python3-gemmi live) and returns its JSON output. Reference tests use this to
 * compare Annula against general-purpose libraries.
 *
 * When a module is missing the test is skipped, unless ANNULA_REQUIRE_REFERENCE=1
 * (CI sets it), in which case the missing reference is a failure.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export const PYTHON = '/usr/bin/python3';

const cache = new Map<string, boolean>();

/** True when /usr/bin/python3 can import every module named. */
export function pythonHas(...modules: string[]): boolean {
  const key = modules.join(',');
  if (!cache.has(key)) {
    let ok = existsSync(PYTHON);
    if (ok) {
      try {
        execFileSync(PYTHON, ['-c', modules.map((m) => `import ${m}`).join('; ')], { stdio: 'ignore' });
      } catch {
        ok = false;
      }
    }
    cache.set(key, ok);
  }
  return cache.get(key)!;
}

/**
 * Whether to run a reference test: true when the modules are present; false
 * (skip) when they are absent; throws when absent and ANNULA_REQUIRE_REFERENCE=1.
 */
export function referenceAvailable(...modules: string[]): boolean {
  const ok = pythonHas(...modules);
  if (!ok && process.env.ANNULA_REQUIRE_REFERENCE === '1') {
    throw new Error(`reference library missing: ${modules.join(', ')} for ${PYTHON} (apt-get install python3-${modules[0]})`);
  }
  return ok;
}

/** Runs `code` (which must print one JSON document) with `input` available as the variable INPUT. */
export function runPythonJson<T>(code: string, input: unknown = null): T {
  const prelude = 'import json, sys\nINPUT = json.loads(sys.stdin.read())\n';
  const out = execFileSync(PYTHON, ['-c', prelude + code], {
    input: JSON.stringify(input),
    encoding: 'utf8',
    maxBuffer: 1 << 26,
  });
  return JSON.parse(out) as T;
}
