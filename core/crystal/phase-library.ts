/**
 * Annula's built-in phase library: cubic phases that thin-film and microscopy
 * labs meet (fcc and bcc metals, diamond-type and zincblende semiconductors, rock
 * salt halides, oxides, nitrides and carbides, CsCl-type and L1_2 alloys,
 * fluorites, perovskites, spinels, cuprite, LaB6, bixbyites) and a few non-cubic
 * phases films often contain. The records, each with the citation of its
 * lattice constant, are in data/phase-library.ts; they are read through the same
 * reader as a user's JSON phase description, so a library phase and a user's
 * phase are checked alike.
 */

import { PHASE_LIBRARY_RECORDS } from './data/phase-library';
import type { Phase } from './phase';
import { phaseFromDescription } from './phase-description';

let library: readonly Phase[] | undefined;
let byKey: Map<string, Phase> | undefined;

/**
 * Every library phase, in the order of the data file, each with origin 'library'.
 * Built on first call and shared afterwards: the array and its phases are frozen,
 * so copy a phase (structuredClone) before changing it.
 */
export function phaseLibrary(): readonly Phase[] {
  if (!library) {
    library = Object.freeze(
      PHASE_LIBRARY_RECORDS.map((record) => deepFreeze(phaseFromDescription(record, `phase library entry "${record.id}"`, 'library'))),
    );
  }
  return library;
}

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const v of Object.values(value)) deepFreeze(v);
  }
  return value;
}

/**
 * A library phase by its id or its name, ignoring case and surrounding spaces:
 * "Au", "au", "gold", "TiO2-rutile", "magnetite".
 *
 * @returns the phase, or undefined when none has that id or name
 */
export function findPhase(idOrName: string): Phase | undefined {
  if (typeof idOrName !== 'string') return undefined;
  if (!byKey) {
    byKey = new Map();
    for (const p of phaseLibrary()) {
      for (const key of [p.id, p.name]) {
        const k = key.trim().toLowerCase();
        if (!byKey.has(k)) byKey.set(k, p);
      }
    }
  }
  return byKey.get(idOrName.trim().toLowerCase());
}
