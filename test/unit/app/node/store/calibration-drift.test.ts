import { describe, expect, it } from 'vitest';
import { calibrationDrift, DRIFT_THRESHOLD, sameCalibrationSetting } from '../../../../../app/node/store';

const previous = { name: 'TEM-2 January', created: '2026-01-12T08:00:00.000Z', cameraLengthPx: 1000, cameraLengthSigmaPx: 1 };

describe('calibrationDrift(previous, next)', () => {
  it('flags a change of more than 1% either way and says so in words', () => {
    const up = calibrationDrift(previous, { name: 'March', created: '2026-03-02T00:00:00.000Z', cameraLengthPx: 1014, cameraLengthSigmaPx: 1 });
    expect(DRIFT_THRESHOLD).toBe(0.01);
    expect(up.flagged).toBe(true);
    expect(up.relativeChange).toBeCloseTo(0.014, 14);
    expect(up.message).toBe(
      'camera length 1.40% above "TEM-2 January" (2026-01-12), more than 1%: possible drift; check the microscope\'s settings (lens currents, specimen height, detector) before using it',
    );
    const down = calibrationDrift(previous, { ...previous, name: 'April', cameraLengthPx: 988 });
    expect(down.flagged).toBe(true);
    expect(down.message).toMatch(/^camera length 1\.20% below "TEM-2 January"/);
  });

  it('does not flag changes within 1% (0.99% up, 0.99% down, none)', () => {
    for (const l of [1009.9, 990.1, 1000]) {
      const d = calibrationDrift(previous, { ...previous, name: 'x', cameraLengthPx: l });
      expect(d.flagged).toBe(false);
      expect(d.message).toMatch(/within 1%$/);
    }
  });

  it('gives the standard uncertainty of the change from both sigmas (worked by hand: 1020(2) over 1000(1) -> 0.0022451)', () => {
    const d = calibrationDrift(previous, { ...previous, name: 'x', cameraLengthPx: 1020, cameraLengthSigmaPx: 2 });
    // 1.02 * sqrt((1/1000)^2 + (2/1020)^2) = 1.02 * sqrt(1e-6 + 3.84468e-6) = 1.02 * 0.00220106 = 0.00224508
    expect(d.relativeChangeSigma).toBeCloseTo(0.00224508, 7);
  });

  it('takes another threshold, and refuses a non-positive camera length or a threshold outside (0, 1)', () => {
    expect(calibrationDrift(previous, { ...previous, cameraLengthPx: 1006 }, 0.005).flagged).toBe(true);
    expect(() => calibrationDrift(previous, { ...previous, cameraLengthPx: 0 })).toThrow(/next\.cameraLengthPx must be a positive number of pixels; got 0/);
    expect(() => calibrationDrift({ ...previous, cameraLengthPx: Number.NaN }, previous)).toThrow(RangeError);
    expect(() => calibrationDrift(previous, previous, 1.5)).toThrow(/threshold must be a fraction in \(0, 1\)/);
  });
});

describe('sameCalibrationSetting(a, b)', () => {
  const a = { instrument: 'TEM-2 north bay', voltageV: 200e3, nominalCameraLengthM: 1, pixelSizeM: 14e-6 };
  it('matches the same instrument (ASCII case ignored), voltage, nominal camera length and pixel pitch', () => {
    expect(sameCalibrationSetting(a, { ...a, instrument: 'tem-2 NORTH BAY', voltageV: 200e3 * (1 + 1e-9) })).toBe(true);
    expect(sameCalibrationSetting({ ...a, instrument: null, nominalCameraLengthM: null }, { ...a, instrument: null, nominalCameraLengthM: null })).toBe(true);
  });
  it('tells apart another instrument, voltage, camera length, binning, or a missing value', () => {
    expect(sameCalibrationSetting(a, { ...a, instrument: 'TEM-1 south bay' })).toBe(false);
    expect(sameCalibrationSetting(a, { ...a, voltageV: 300e3 })).toBe(false);
    expect(sameCalibrationSetting(a, { ...a, nominalCameraLengthM: 1.2 })).toBe(false);
    expect(sameCalibrationSetting(a, { ...a, pixelSizeM: 28e-6 })).toBe(false);
    expect(sameCalibrationSetting(a, { ...a, nominalCameraLengthM: null })).toBe(false);
    expect(sameCalibrationSetting(a, { ...a, instrument: null })).toBe(false);
  });
});
