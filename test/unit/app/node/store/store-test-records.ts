/**
 * Invented records for the lab-store tests: a fictional coatings lab ("Halden Coatings
 * test lab") with two fictional microscopes. The camera lengths are round invented values,
 * not measurements.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { NewAnalysis, NewCalibration } from '../../../../../app/node/store';

/** 64 hex digits made from a short tag, so fingerprints are readable in failures. */
export function fingerprint(tag: string): string {
  return Array.from(tag.padEnd(32, '-'), (c) => c.charCodeAt(0).toString(16).padStart(2, '0')).join('').slice(0, 64);
}

export function calibration(overrides: Partial<NewCalibration> & { name: string }): NewCalibration {
  return {
    instrument: 'TEM-2 north bay',
    voltageV: 200e3,
    nominalCameraLengthM: 1,
    pixelSizeM: 14e-6,
    created: '2026-03-02T09:15:00Z',
    standardPhaseId: 'Au',
    cameraLengthPx: 71_000,
    cameraLengthSigmaPx: 6,
    axisRatio: 1.012,
    axisRatioSigma: 0.0008,
    angleDeg: 33.5,
    angleSigmaDeg: 1.9,
    residuals: [
      { hkl: [1, 1, 1], dA: 2.3546, residualPpm: 41 },
      { hkl: [2, 0, 0], dA: 2.0391, residualPpm: -23 },
      { hkl: [2, 2, 0], dA: 1.4419, residualPpm: 7 },
    ],
    imageFingerprints: [{ sha256: fingerprint('gold film 1'), path: 'standards/gold-1.tif' }],
    rejectedRings: [{ hkl: [3, 1, 1], dA: 1.2297, residualPpm: 910, reason: 'residual above 3 sigma' }],
    notes: 'invented test record',
    ...overrides,
  };
}

export function analysis(overrides: Partial<NewAnalysis> = {}): NewAnalysis {
  return {
    sampleId: 'S-104',
    operator: 'R. Vale (fictional)',
    created: '2026-03-03T10:00:00Z',
    imageSha256: fingerprint('film S-104'),
    imagePath: 'films/S-104.tif',
    calibration: null,
    phase: 'TiN',
    aA: 4.2417,
    aSigmaA: 0.0009,
    verdict: 'pass',
    tolerance: 0.005,
    result: { rings: [{ dA: 2.449, hkl: [1, 1, 1] }], status: 'ok' },
    ...overrides,
  };
}

/** A fresh temporary folder and its removal. */
export function temporaryFolder(prefix: string): { dir: string; remove: () => void } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, remove: () => rmSync(dir, { recursive: true, force: true }) };
}
