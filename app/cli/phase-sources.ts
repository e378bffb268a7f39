/**
 * The phases a command works with: the built-in library plus any the user
 * adds from files (CIF, or Annula's JSON phase description).
 */
import { readFileSync, statSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { findPhase, phaseFromCif, phaseFromDescription, phaseLibrary, PhaseInputError, type Phase } from '../../core/crystal';
import { InputError, UsageError } from './exit-codes';

function readText(path: string): string {
  let isFile = false;
  try {
    isFile = statSync(path).isFile();
  } catch {
    throw new InputError(`phase file "${path}" does not exist; check the path`);
  }
  if (!isFile) throw new InputError(`phase file "${path}" is not a file`);
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(`phase file "${path}" cannot be read: ${(e as Error).message}`);
  }
}

/** Reads one phase file: .cif as CIF, .json as a phase description (one object or an array). */
export function readPhaseFile(path: string): Phase[] {
  const ext = extname(path).toLowerCase();
  const text = readText(path);
  const name = basename(path);
  try {
    if (ext === '.cif') return [phaseFromCif(text, name)];
    if (ext === '.json') {
      let json: unknown;
      try {
        json = JSON.parse(text);
      } catch (e) {
        throw new InputError(`phase file "${path}" is not valid JSON: ${(e as Error).message}`);
      }
      const list = Array.isArray(json) ? json : [json];
      return list.map((item, i) => phaseFromDescription(item, list.length > 1 ? `${name}[${i}]` : name));
    }
  } catch (e) {
    if (e instanceof PhaseInputError) throw new InputError(e.message);
    throw e;
  }
  throw new InputError(`phase file "${path}": unknown kind "${ext || '(no extension)'}"; give a .cif file or a .json phase description`);
}

/**
 * The library followed by the user's phases. A user phase whose id is already
 * taken keeps its place under "<id>@<file>", and a note says so.
 */
export function collectPhases(paths: readonly string[], notes: string[]): Phase[] {
  const phases: Phase[] = [...phaseLibrary()];
  const ids = new Set(phases.map((p) => p.id.toLowerCase()));
  for (const path of paths) {
    for (const phase of readPhaseFile(path)) {
      let id = phase.id;
      if (ids.has(id.toLowerCase())) {
        id = `${phase.id}@${basename(path)}`;
        notes.push(`phase "${phase.id}" from ${basename(path)} is listed as "${id}" (the library already has "${phase.id}")`);
      }
      ids.add(id.toLowerCase());
      phases.push({ ...phase, id });
    }
  }
  return phases;
}

/** A phase named on the command line: a library id or name, or the path of a .cif/.json file. */
export function resolvePhaseArgument(arg: string, extra: readonly Phase[] = []): Phase {
  const lower = arg.toLowerCase();
  if (lower.endsWith('.cif') || lower.endsWith('.json')) {
    const phases = readPhaseFile(arg);
    if (phases.length !== 1) throw new UsageError(`"${arg}" holds ${phases.length} phases; name one of them with --phases ${arg} and its id`);
    return phases[0]!;
  }
  const hit = extra.find((p) => p.id.toLowerCase() === lower || p.name.toLowerCase() === lower) ?? findPhase(arg);
  if (!hit) {
    throw new UsageError(`no phase "${arg}" in the library; run "annula phases" for the list, or give a .cif or .json file`);
  }
  return hit;
}
