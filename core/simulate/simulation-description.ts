/**
 * The text a simulated image carries in its TIFF ImageDescription: a one-line JSON
 * object with what a person or program needs to recognise the image and find its truth
 * (the simulator, the scenario, seed, voltage, wavelength, camera length in px, frame,
 * phases, and the truth file's name). Characters outside 7-bit ASCII are written as
 * JSON \uXXXX escapes, since a TIFF ASCII field holds 7-bit ASCII (TIFF 6.0, section 2),
 * and JSON.parse gives the original text back.
 */

import type { SimulationTruth } from './simulation-truth';

/**
 * The ImageDescription of a simulated image.
 * @param truthFileName the truth file's name as it sits beside the image, or null
 */
export function simulationDescription(truth: SimulationTruth, truthFileName: string | null): string {
  const summary = {
    simulator: 'annula simulate',
    note: 'simulated image of an invented scenario, not a measurement',
    scenario: truth.scenario,
    truthFile: truthFileName,
    seed: truth.seed,
    voltageV: truth.voltageV,
    wavelengthA: truth.wavelengthA,
    cameraLengthPx: truth.cameraLengthPx,
    frame: truth.frame,
    phases: truth.phases.map((p) => ({ id: p.id, weight: p.weight, latticeScale: p.latticeScale })),
    ringCount: truth.rings.length,
  };
  return JSON.stringify(summary).replace(/[\u0080-\uffff]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}
